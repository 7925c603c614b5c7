// Term dictionary: maps every term (IRI, blank node, N-Triples literal) to a dense integer id and back, stored as UTF-8 bytes.

/**
 * Term encoding, shared by every user of the dictionary (so that one dictionary can hold a whole ABox):
 * - an IRI is stored as the bare IRI text, without angle brackets (`http://example.org/a`);
 * - a blank node is stored as `_:label` (no IRI can start with `_:`: a scheme starts with a letter);
 * - a literal is stored in canonical N-Triples form, `"lexical"`, `"lexical"@lang` or `"lexical"^^<datatype>`
 *   (no IRI starts with `"`); see `syntax/terms.ts` for the canonicalisation.
 * - internal fresh names (`model/normal.ts` FRESH_PREFIX) start with U+0001 and never clash with the above.
 *
 * Storage: the UTF-8 bytes of all terms in one growable byte arena, an Int32Array of start offsets, and an
 * open-addressing hash table (FNV-1a over the bytes) of ids with their hashes. No JS string is kept per term:
 * a term costs its UTF-8 length (up to 2× while the arena grows) + 4–8 bytes of offsets + 16–32 bytes of
 * table (load 0.25–0.5), i.e. about length + 30 bytes, against ≈ length + 50 for a Map<string, number>
 * with a string array (tests/bench/intake.ts prints the measured figure). `internBytes` lets
 * readers intern straight from an input chunk, so a repeated term never becomes a string at all (the hot
 * path of dataset intake). `term(id)` decodes the bytes, through a small direct-mapped cache of 16k
 * decoded terms (bounded memory; the classes and properties of output facts hit it).
 */
export class TermDictionary {
  private arena: Buffer = Buffer.allocUnsafe(1 << 16);
  private arenaLength = 0;
  private starts = new Int32Array(1024);
  private count = 0;
  /** Slot → id + 1 (0 = empty). */
  private slots = new Int32Array(1 << 12);
  /** Slot → hash of the term there (to skip most byte comparisons). */
  private hashes = new Int32Array(1 << 12);
  private mask = (1 << 12) - 1;
  private scratch: Buffer = Buffer.allocUnsafe(1 << 12);
  /** A small direct-mapped cache of decoded terms (bounded memory; predicates and classes repeat in output). */
  private readonly cacheIds = new Int32Array(1 << 14).fill(-1);
  private readonly cacheTerms: string[] = new Array<string>(1 << 14);

  /** Returns the id of the term, adding it if new. Ids are dense: 0, 1, 2, … in order of first intern. */
  intern(term: string): number {
    const n = this.encode(term);
    return this.internBytes(this.scratch, 0, n);
  }

  /** Returns the id of a term already interned, or -1. */
  id(term: string): number {
    const n = this.encode(term);
    return this.lookup(this.scratch, 0, n, hashBytes(this.scratch, 0, n));
  }

  /** Returns true if the term is interned. */
  has(term: string): boolean {
    return this.id(term) >= 0;
  }

  /** Returns the term of an id; throws a RangeError for an id never given out. */
  term(id: number): string {
    if (!(id >= 0 && id < this.count)) throw new RangeError(`no term with id ${id} (dictionary size ${this.count})`);
    const slot = id & ((1 << 14) - 1);
    if (this.cacheIds[slot] === id) return this.cacheTerms[slot]!;
    const term = this.arena.toString('utf8', this.starts[id]!, this.end(id));
    this.cacheIds[slot] = id;
    this.cacheTerms[slot] = term;
    return term;
  }

  /** Number of distinct terms. */
  get size(): number {
    return this.count;
  }

  /** Bytes held (arena, offsets, hash table), for memory reports. */
  get byteLength(): number {
    return this.arena.length + this.starts.byteLength + this.slots.byteLength + this.hashes.byteLength;
  }

  /** Iterates [id, term] in id order. */
  *entries(): IterableIterator<[number, string]> {
    for (let i = 0; i < this.count; i++) yield [i, this.term(i)];
  }

  /** Interns the UTF-8 bytes bytes[start, end) (which must be valid UTF-8 in the encoding above). */
  internBytes(bytes: Uint8Array, start: number, end: number): number {
    return this.internHashed(bytes, start, end, hashBytes(bytes, start, end));
  }

  /** As internBytes, with `hash` = hashBytes(bytes, start, end) already computed by the caller's scan. */
  internHashed(bytes: Uint8Array, start: number, end: number, hash: number): number {
    const found = this.lookup(bytes, start, end, hash);
    if (found >= 0) return found;
    return this.add(bytes, start, end, hash);
  }

  /** Id of bytes[start, end) or -1. */
  private lookup(bytes: Uint8Array, start: number, end: number, hash: number): number {
    const length = end - start;
    for (let slot = hash & this.mask; ; slot = (slot + 1) & this.mask) {
      const entry = this.slots[slot]!;
      if (entry === 0) return -1;
      if (this.hashes[slot] !== hash) continue;
      const id = entry - 1, s = this.starts[id]!;
      if (this.end(id) - s !== length) continue;
      let i = 0;
      while (i < length && this.arena[s + i] === bytes[start + i]) i++;
      if (i === length) return id;
    }
  }

  private add(bytes: Uint8Array, start: number, end: number, hash: number): number {
    const length = end - start;
    if (this.arenaLength + length > this.arena.length) {
      const next = Buffer.allocUnsafe(Math.max(this.arena.length * 2, this.arenaLength + length));
      this.arena.copy(next, 0, 0, this.arenaLength);
      this.arena = next;
    }
    // Copy first: `bytes` may be the scratch buffer or an input chunk that is reused.
    if (bytes instanceof Buffer) bytes.copy(this.arena, this.arenaLength, start, end);
    else this.arena.set(bytes.subarray(start, end), this.arenaLength);
    if (this.count + 2 > this.starts.length) {
      const next = new Int32Array(this.starts.length * 2);
      next.set(this.starts);
      this.starts = next;
    }
    const id = this.count++;
    this.starts[id] = this.arenaLength;
    this.arenaLength += length;
    this.starts[id + 1] = this.arenaLength;
    if (this.count * 2 > this.mask + 1) this.rehash();
    this.place(id, hash);
    return id;
  }

  private place(id: number, hash: number): void {
    let slot = hash & this.mask;
    while (this.slots[slot] !== 0) slot = (slot + 1) & this.mask;
    this.slots[slot] = id + 1;
    this.hashes[slot] = hash;
  }

  private rehash(): void {
    const size = (this.mask + 1) * 2;
    const oldSlots = this.slots, oldHashes = this.hashes;
    this.slots = new Int32Array(size);
    this.hashes = new Int32Array(size);
    this.mask = size - 1;
    for (let i = 0; i < oldSlots.length; i++) {
      const entry = oldSlots[i]!;
      if (entry !== 0) this.place(entry - 1, oldHashes[i]!);
    }
  }

  private end(id: number): number {
    return id + 1 < this.count ? this.starts[id + 1]! : this.arenaLength;
  }

  /** Writes the UTF-8 of a string into the scratch buffer; returns its length. */
  private encode(term: string): number {
    if (term.length * 3 > this.scratch.length) this.scratch = Buffer.allocUnsafe(term.length * 3 + 16);
    return this.scratch.write(term, 0, 'utf8');
  }
}

/** FNV-1a offset basis and prime (32 bits); a caller may fold bytes itself as h = Math.imul(h ^ byte, FNV_PRIME). */
export const FNV_OFFSET = 0x811c9dc5 | 0, FNV_PRIME = 0x01000193;

/** FNV-1a, 32 bits, over bytes[start, end). */
export function hashBytes(bytes: Uint8Array, start: number, end: number): number {
  let h = FNV_OFFSET;
  for (let i = start; i < end; i++) h = Math.imul(h ^ bytes[i]!, FNV_PRIME);
  return h;
}

/** Kind of an encoded term, by its first character (see the encoding above). */
export function termKind(term: string): 'iri' | 'blank' | 'literal' | 'fresh' {
  const c = term.charCodeAt(0);
  if (c === 0x22 /* " */) return 'literal';
  if (c === 0x5f /* _ */ && term.charCodeAt(1) === 0x3a /* : */) return 'blank';
  if (c === 0x01) return 'fresh';
  return 'iri';
}
