// Integer hashing and an open-addressing map from pairs of ints to ints, for the chase's indexes (no object per entry).

/** Mixes two 32-bit ints into a 32-bit hash (multiply–xorshift, as in MurmurHash3's finaliser). */
export function mix2(a: number, b: number): number {
  let h = Math.imul(a, 0x9e3779b1) ^ Math.imul(b + 0x7f4a7c15, 0x85ebca77);
  h ^= h >>> 15; h = Math.imul(h, 0x2c1b3c6d); h ^= h >>> 12; h = Math.imul(h, 0x297a2d39); h ^= h >>> 15;
  return h;
}

/** Mixes three 32-bit ints. */
export function mix3(a: number, b: number, c: number): number {
  return mix2(mix2(a, b), c);
}

/**
 * Map (a, b) → value with linear probing. Keys are never deleted (the chase's chain heads only move back to an
 * older row on undo, so a key whose list became empty keeps the value -1).
 */
export class PairMap {
  private keysA: Int32Array;
  private keysB: Int32Array;
  private values: Int32Array;
  private used: Uint8Array;
  private count = 0;
  private mask: number;

  constructor(capacity = 1024) {
    let size = 16;
    while (size < capacity * 2) size <<= 1;
    this.keysA = new Int32Array(size); this.keysB = new Int32Array(size); this.values = new Int32Array(size); this.used = new Uint8Array(size);
    this.mask = size - 1;
  }

  /** Returns the value for (a, b), or -1. */
  get(a: number, b: number): number {
    let i = mix2(a, b) & this.mask;
    while (this.used[i]) {
      if (this.keysA[i] === a && this.keysB[i] === b) return this.values[i]!;
      i = (i + 1) & this.mask;
    }
    return -1;
  }

  /** Sets the value for (a, b). */
  set(a: number, b: number, value: number): void {
    let i = mix2(a, b) & this.mask;
    while (this.used[i]) {
      if (this.keysA[i] === a && this.keysB[i] === b) { this.values[i] = value; return; }
      i = (i + 1) & this.mask;
    }
    this.used[i] = 1; this.keysA[i] = a; this.keysB[i] = b; this.values[i] = value;
    if (++this.count * 2 > this.mask) this.grow();
  }

  get byteLength(): number { return this.keysA.byteLength * 3 + this.used.byteLength; }

  private grow(): void {
    const { keysA, keysB, values, used } = this;
    const size = (this.mask + 1) * 2;
    this.keysA = new Int32Array(size); this.keysB = new Int32Array(size); this.values = new Int32Array(size); this.used = new Uint8Array(size);
    this.mask = size - 1; this.count = 0;
    for (let i = 0; i < used.length; i++) if (used[i]) this.set(keysA[i]!, keysB[i]!, values[i]!);
  }
}

/** Returns a copy of `array` with room for at least `minimum` entries (growth by 1.5×, new entries filled). */
export function growInt32(array: Int32Array<ArrayBuffer>, minimum: number, fill = 0): Int32Array<ArrayBuffer> {
  let size = Math.max(16, array.length);
  while (size < minimum) size = Math.floor(size * 1.5) + 1;
  if (size === array.length) return array;
  const next = new Int32Array(size);
  next.set(array);
  if (fill !== 0) next.fill(fill, array.length);
  return next;
}

/** A set of int triples (a, b, c) with linear probing; for pairs pass c = 0. */
export class TripleSet {
  private keys: Int32Array;
  private used: Uint8Array;
  private count = 0;
  private mask: number;

  constructor(capacity = 64) {
    let size = 16;
    while (size < capacity * 2) size <<= 1;
    this.keys = new Int32Array(size * 3); this.used = new Uint8Array(size); this.mask = size - 1;
  }

  get size(): number { return this.count; }

  has(a: number, b: number, c: number): boolean {
    let i = mix3(a, b, c) & this.mask;
    while (this.used[i]) {
      const k = i * 3;
      if (this.keys[k] === a && this.keys[k + 1] === b && this.keys[k + 2] === c) return true;
      i = (i + 1) & this.mask;
    }
    return false;
  }

  /** Adds the triple; returns false if present. */
  add(a: number, b: number, c: number): boolean {
    let i = mix3(a, b, c) & this.mask;
    while (this.used[i]) {
      const k = i * 3;
      if (this.keys[k] === a && this.keys[k + 1] === b && this.keys[k + 2] === c) return false;
      i = (i + 1) & this.mask;
    }
    this.used[i] = 1; this.keys[i * 3] = a; this.keys[i * 3 + 1] = b; this.keys[i * 3 + 2] = c;
    if (++this.count * 2 > this.mask) this.grow();
    return true;
  }

  private grow(): void {
    const { keys, used } = this;
    const size = (this.mask + 1) * 2;
    this.keys = new Int32Array(size * 3); this.used = new Uint8Array(size); this.mask = size - 1; this.count = 0;
    for (let i = 0; i < used.length; i++) if (used[i]) this.add(keys[i * 3]!, keys[i * 3 + 1]!, keys[i * 3 + 2]!);
  }
}
