// The chase's fact store: elements and integer-encoded columnar relations (unary and binary) with hash indexes,
// growth by appending rows, and exact undo to a mark (the trail for branching). No object per fact.

import { PairMap, growInt32, mix2, mix3 } from './hash.js';

/** Built-in predicate ids: unary 0 is ⊤ (every element), binary 0 is ≉ (stored so merges rewrite it). */
export const TOP_ID = 0;
export const DISTINCT_ID = 0;

/** A position on the trail: undoing to it restores exactly the store as it was. */
export interface StoreMark {
  readonly elements: number;
  readonly unary: number;
  readonly binary: number;
  readonly merges: number;
}

/**
 * Elements 0..named-1 are named individuals; later ones are anonymous, each with a parent (the element whose
 * existential created it) and a depth. `rep` is the union–find of equality (merged elements point to their
 * representative, pruned anonymous elements hold -1); a row is valid while all its elements are representatives.
 */
export class FactStore {
  elementCount = 0;
  rep = new Int32Array(64);
  parent = new Int32Array(64);
  depth = new Int32Array(64);
  firstChild = new Int32Array(64);
  nextSibling = new Int32Array(64);
  /** Two independent sums of per-predicate random keys over the element's unary rows (its label), and the label size. */
  /**
   * A change stamp per element, from one clock that only grows: set anew whenever a unary fact about the element or a
   * binary fact with it is added or removed, and when its id is (re)used. Equal stamps mean an unchanged
   * neighbourhood, which lets blocking keep a verified blocker from one round to the next.
   */
  stamp = new Int32Array(64);
  private clock = 0;
  labelHashA = new Int32Array(64);
  labelHashB = new Int32Array(64);
  labelSize = new Int32Array(64);
  private unaryByElement = new Int32Array(64);
  private binaryBySubject = new Int32Array(64);
  private binaryByObject = new Int32Array(64);

  unaryCount = 0;
  unaryPred = new Int32Array(64);
  unaryElem = new Int32Array(64);
  /** The rule that derived the row (-1: input). */
  unaryRule = new Int32Array(64);
  /** The dependency set of the row (see dependencies.ts). */
  unaryDep = new Int32Array(64);
  private unaryNextByPred = new Int32Array(64);
  private unaryNextByElem = new Int32Array(64);
  private unaryHeadByPred: Int32Array;
  private unarySlots = new Int32Array(128);

  binaryCount = 0;
  binaryPred = new Int32Array(64);
  binarySubj = new Int32Array(64);
  binaryObj = new Int32Array(64);
  binaryRule = new Int32Array(64);
  binaryDep = new Int32Array(64);
  /** For a merged element: the dependency set of the merge. */
  mergeDep = new Int32Array(64);
  private binaryNextByPred = new Int32Array(64);
  private binaryNextByPS = new Int32Array(64);
  private binaryNextByPO = new Int32Array(64);
  private binaryNextBySubj = new Int32Array(64);
  private binaryNextByObj = new Int32Array(64);
  private binaryHeadByPred: Int32Array;
  private headByPS = new PairMap(64);
  private headByPO = new PairMap(64);
  private binarySlots = new Int32Array(128);

  private mergeTrail: number[] = [];
  private readonly keyA: Int32Array;
  private readonly keyB: Int32Array;

  constructor(readonly unaryPredicates: number, readonly binaryPredicates: number, readonly named: number) {
    this.unaryHeadByPred = new Int32Array(unaryPredicates).fill(-1);
    this.binaryHeadByPred = new Int32Array(binaryPredicates).fill(-1);
    // Deterministic random keys per predicate (xorshift), for the label hashes used by blocking.
    this.keyA = new Int32Array(unaryPredicates); this.keyB = new Int32Array(unaryPredicates);
    let s = 0x2545f491;
    for (let i = 0; i < unaryPredicates; i++) {
      s ^= s << 13; s ^= s >>> 17; s ^= s << 5; this.keyA[i] = s;
      s ^= s << 13; s ^= s >>> 17; s ^= s << 5; this.keyB[i] = s;
    }
    for (let i = 0; i < named; i++) this.newElement(-1);
  }

  /** Adds an element (parent -1 for named ones), gives it ⊤, and returns its id. */
  newElement(parent: number): number {
    const e = this.elementCount++;
    if (e >= this.rep.length) this.growElements(e + 1);
    this.rep[e] = e; this.parent[e] = parent;
    this.depth[e] = parent < 0 ? 0 : this.depth[parent]! + 1;
    this.firstChild[e] = -1; this.nextSibling[e] = -1;
    this.labelHashA[e] = 0; this.labelHashB[e] = 0; this.labelSize[e] = 0; this.stamp[e] = ++this.clock;
    this.unaryByElement[e] = -1; this.binaryBySubject[e] = -1; this.binaryByObject[e] = -1;
    if (parent >= 0) { this.nextSibling[e] = this.firstChild[parent]!; this.firstChild[parent] = e; }
    this.addUnary(TOP_ID, e, -1);
    return e;
  }

  /** Returns the representative of e, or -1 if e was pruned. */
  find(e: number): number {
    let r = this.rep[e]!;
    while (r !== e) { if (r < 0) return -1; e = r; r = this.rep[e]!; }
    return e;
  }

  isAlive(e: number): boolean { return this.rep[e] === e; }

  // ---- unary relation ----

  /** Returns the row of pred(e), or -1. `e` must be a representative. */
  unaryRow(pred: number, e: number): number {
    const mask = this.unarySlots.length - 1;
    let i = mix2(pred, e) & mask;
    for (;;) {
      const r = this.unarySlots[i]! - 1;
      if (r < 0) return -1;
      if (this.unaryPred[r] === pred && this.unaryElem[r] === e) return r;
      i = (i + 1) & mask;
    }
  }

  hasUnary(pred: number, e: number): boolean { return this.unaryRow(pred, e) >= 0; }

  /** Adds pred(e) for a representative e; returns false if already present. */
  addUnary(pred: number, e: number, rule: number, dep = 0): boolean {
    const mask = this.unarySlots.length - 1;
    let i = mix2(pred, e) & mask;
    for (;;) {
      const r = this.unarySlots[i]! - 1;
      if (r < 0) break;
      if (this.unaryPred[r] === pred && this.unaryElem[r] === e) return false;
      i = (i + 1) & mask;
    }
    const row = this.unaryCount++;
    if (row >= this.unaryPred.length) this.growUnary(row + 1);
    this.unaryPred[row] = pred; this.unaryElem[row] = e; this.unaryRule[row] = rule; this.unaryDep[row] = dep;
    this.unaryNextByPred[row] = this.unaryHeadByPred[pred]!; this.unaryHeadByPred[pred] = row;
    this.unaryNextByElem[row] = this.unaryByElement[e]!; this.unaryByElement[e] = row;
    this.labelHashA[e] = (this.labelHashA[e]! + this.keyA[pred]!) | 0;
    this.labelHashB[e] = (this.labelHashB[e]! + this.keyB[pred]!) | 0;
    this.labelSize[e]!++;
    this.stamp[e] = ++this.clock;
    if ((this.unaryCount << 1) > this.unarySlots.length) this.rehashUnary(); else this.unarySlots[i] = row + 1;
    return true;
  }

  /** First row of the list of pred's rows (newest first), -1 if none; continue with `nextUnaryByPred`. */
  firstUnaryOf(pred: number): number { return this.unaryHeadByPred[pred]!; }
  nextUnaryByPred(row: number): number { return this.unaryNextByPred[row]!; }
  /** First unary row about element e (newest first). */
  firstUnaryAbout(e: number): number { return this.unaryByElement[e]!; }
  nextUnaryByElem(row: number): number { return this.unaryNextByElem[row]!; }

  // ---- binary relation ----

  /** Returns the row of pred(s, o), or -1 (s, o representatives). */
  binaryRow(pred: number, s: number, o: number): number {
    const mask = this.binarySlots.length - 1;
    let i = mix3(pred, s, o) & mask;
    for (;;) {
      const r = this.binarySlots[i]! - 1;
      if (r < 0) return -1;
      if (this.binaryPred[r] === pred && this.binarySubj[r] === s && this.binaryObj[r] === o) return r;
      i = (i + 1) & mask;
    }
  }

  hasBinary(pred: number, s: number, o: number): boolean { return this.binaryRow(pred, s, o) >= 0; }

  /** Adds pred(s, o); returns false if present. */
  addBinary(pred: number, s: number, o: number, rule: number, dep = 0): boolean {
    const mask = this.binarySlots.length - 1;
    let i = mix3(pred, s, o) & mask;
    for (;;) {
      const r = this.binarySlots[i]! - 1;
      if (r < 0) break;
      if (this.binaryPred[r] === pred && this.binarySubj[r] === s && this.binaryObj[r] === o) return false;
      i = (i + 1) & mask;
    }
    const row = this.binaryCount++;
    if (row >= this.binaryPred.length) this.growBinary(row + 1);
    this.binaryPred[row] = pred; this.binarySubj[row] = s; this.binaryObj[row] = o; this.binaryRule[row] = rule; this.binaryDep[row] = dep;
    this.binaryNextByPred[row] = this.binaryHeadByPred[pred]!; this.binaryHeadByPred[pred] = row;
    this.binaryNextByPS[row] = this.headByPS.get(pred, s); this.headByPS.set(pred, s, row);
    this.binaryNextByPO[row] = this.headByPO.get(pred, o); this.headByPO.set(pred, o, row);
    this.binaryNextBySubj[row] = this.binaryBySubject[s]!; this.binaryBySubject[s] = row;
    this.binaryNextByObj[row] = this.binaryByObject[o]!; this.binaryByObject[o] = row;
    this.stamp[s] = ++this.clock; this.stamp[o] = ++this.clock;
    if ((this.binaryCount << 1) > this.binarySlots.length) this.rehashBinary(); else this.binarySlots[i] = row + 1;
    return true;
  }

  firstBinaryOf(pred: number): number { return this.binaryHeadByPred[pred]!; }
  nextBinaryByPred(row: number): number { return this.binaryNextByPred[row]!; }
  /** Rows pred(s, ·), newest first. */
  firstBinaryFrom(pred: number, s: number): number { return this.headByPS.get(pred, s); }
  nextBinaryFrom(row: number): number { return this.binaryNextByPS[row]!; }
  /** Rows pred(·, o), newest first. */
  firstBinaryTo(pred: number, o: number): number { return this.headByPO.get(pred, o); }
  nextBinaryTo(row: number): number { return this.binaryNextByPO[row]!; }
  /** Rows with subject e / object e, any predicate. */
  firstBinaryWithSubject(e: number): number { return this.binaryBySubject[e]!; }
  nextBinaryWithSubject(row: number): number { return this.binaryNextBySubj[row]!; }
  firstBinaryWithObject(e: number): number { return this.binaryByObject[e]!; }
  nextBinaryWithObject(row: number): number { return this.binaryNextByObj[row]!; }

  unaryValid(row: number): boolean { const e = this.unaryElem[row]!; return this.rep[e] === e; }
  binaryValid(row: number): boolean {
    const s = this.binarySubj[row]!, o = this.binaryObj[row]!;
    return this.rep[s] === s && this.rep[o] === o;
  }

  // ---- equality ----

  /** Points `from` to `to` (both representatives) or prunes `from` (to = -1); undone by `undo`. */
  setRep(from: number, to: number, dep = 0): void {
    this.mergeTrail.push(from, this.rep[from]!);
    this.rep[from] = to;
    this.mergeDep[from] = dep;
  }

  /** Length of the merge trail (two entries per `setRep`); `mergedElement(i)` is the element of entry i (i even). */
  get mergeTrailLength(): number { return this.mergeTrail.length; }
  mergedElement(i: number): number { return this.mergeTrail[i]!; }

  // ---- trail ----

  mark(): StoreMark {
    return { elements: this.elementCount, unary: this.unaryCount, binary: this.binaryCount, merges: this.mergeTrail.length };
  }

  /** Restores the store exactly as it was at `m` (rows are removed newest first, so every index entry is the newest). */
  undo(m: StoreMark): void {
    const trail = this.mergeTrail;
    while (trail.length > m.merges) { const old = trail.pop()!; const e = trail.pop()!; this.rep[e] = old; }
    for (let row = this.binaryCount - 1; row >= m.binary; row--) {
      const p = this.binaryPred[row]!, s = this.binarySubj[row]!, o = this.binaryObj[row]!;
      this.binaryHeadByPred[p] = this.binaryNextByPred[row]!;
      this.headByPS.set(p, s, this.binaryNextByPS[row]!);
      this.headByPO.set(p, o, this.binaryNextByPO[row]!);
      this.binaryBySubject[s] = this.binaryNextBySubj[row]!;
      this.binaryByObject[o] = this.binaryNextByObj[row]!;
      this.stamp[s] = ++this.clock; this.stamp[o] = ++this.clock;
      this.clearSlot(this.binarySlots, mix3(p, s, o), row);
    }
    this.binaryCount = Math.min(this.binaryCount, m.binary);
    for (let row = this.unaryCount - 1; row >= m.unary; row--) {
      const p = this.unaryPred[row]!, e = this.unaryElem[row]!;
      this.unaryHeadByPred[p] = this.unaryNextByPred[row]!;
      this.unaryByElement[e] = this.unaryNextByElem[row]!;
      this.labelHashA[e] = (this.labelHashA[e]! - this.keyA[p]!) | 0;
      this.labelHashB[e] = (this.labelHashB[e]! - this.keyB[p]!) | 0;
      this.labelSize[e]!--;
      this.stamp[e] = ++this.clock;
      this.clearSlot(this.unarySlots, mix2(p, e), row);
    }
    this.unaryCount = Math.min(this.unaryCount, m.unary);
    for (let e = this.elementCount - 1; e >= m.elements; e--) {
      const p = this.parent[e]!;
      if (p >= 0) this.firstChild[p] = this.nextSibling[e]!;
    }
    this.elementCount = Math.min(this.elementCount, m.elements);
  }

  /** Bytes held by the store's arrays. */
  get byteLength(): number {
    const arrays = [this.rep, this.mergeDep, this.unaryDep, this.binaryDep, this.parent, this.depth, this.firstChild, this.nextSibling, this.labelHashA, this.labelHashB, this.labelSize, this.stamp,
      this.unaryByElement, this.binaryBySubject, this.binaryByObject, this.unaryPred, this.unaryElem, this.unaryRule, this.unaryNextByPred,
      this.unaryNextByElem, this.unarySlots, this.binaryPred, this.binarySubj, this.binaryObj, this.binaryRule, this.binaryNextByPred,
      this.binaryNextByPS, this.binaryNextByPO, this.binaryNextBySubj, this.binaryNextByObj, this.binarySlots];
    return arrays.reduce((n, a) => n + a.byteLength, 0) + this.headByPS.byteLength + this.headByPO.byteLength;
  }

  // Insertion filled exactly one empty slot, and later insertions were undone first, so clearing it is exact.
  private clearSlot(slots: Int32Array, hash: number, row: number): void {
    const mask = slots.length - 1;
    let i = hash & mask;
    while (slots[i] !== row + 1) i = (i + 1) & mask;
    slots[i] = 0;
  }

  private rehashUnary(): void {
    // Reinsert in row order so that undo (newest first) stays exact after a resize.
    const slots = new Int32Array(this.unarySlots.length * 2), mask = slots.length - 1;
    for (let r = 0; r < this.unaryCount; r++) {
      let i = mix2(this.unaryPred[r]!, this.unaryElem[r]!) & mask;
      while (slots[i] !== 0) i = (i + 1) & mask;
      slots[i] = r + 1;
    }
    this.unarySlots = slots;
  }

  private rehashBinary(): void {
    const slots = new Int32Array(this.binarySlots.length * 2), mask = slots.length - 1;
    for (let r = 0; r < this.binaryCount; r++) {
      let i = mix3(this.binaryPred[r]!, this.binarySubj[r]!, this.binaryObj[r]!) & mask;
      while (slots[i] !== 0) i = (i + 1) & mask;
      slots[i] = r + 1;
    }
    this.binarySlots = slots;
  }

  private growElements(min: number): void {
    this.rep = growInt32(this.rep, min); this.mergeDep = growInt32(this.mergeDep, min); this.parent = growInt32(this.parent, min); this.depth = growInt32(this.depth, min);
    this.firstChild = growInt32(this.firstChild, min); this.nextSibling = growInt32(this.nextSibling, min);
    this.labelHashA = growInt32(this.labelHashA, min); this.labelHashB = growInt32(this.labelHashB, min); this.labelSize = growInt32(this.labelSize, min);
    this.stamp = growInt32(this.stamp, min);
    this.unaryByElement = growInt32(this.unaryByElement, min); this.binaryBySubject = growInt32(this.binaryBySubject, min);
    this.binaryByObject = growInt32(this.binaryByObject, min);
  }

  private growUnary(min: number): void {
    this.unaryPred = growInt32(this.unaryPred, min); this.unaryElem = growInt32(this.unaryElem, min); this.unaryRule = growInt32(this.unaryRule, min);
    this.unaryDep = growInt32(this.unaryDep, min);
    this.unaryNextByPred = growInt32(this.unaryNextByPred, min); this.unaryNextByElem = growInt32(this.unaryNextByElem, min);
  }

  private growBinary(min: number): void {
    this.binaryPred = growInt32(this.binaryPred, min); this.binarySubj = growInt32(this.binarySubj, min); this.binaryObj = growInt32(this.binaryObj, min);
    this.binaryRule = growInt32(this.binaryRule, min); this.binaryDep = growInt32(this.binaryDep, min); this.binaryNextByPred = growInt32(this.binaryNextByPred, min);
    this.binaryNextByPS = growInt32(this.binaryNextByPS, min); this.binaryNextByPO = growInt32(this.binaryNextByPO, min);
    this.binaryNextBySubj = growInt32(this.binaryNextBySubj, min); this.binaryNextByObj = growInt32(this.binaryNextByObj, min);
  }
}
