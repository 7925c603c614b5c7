// Pairwise anywhere blocking for the chase (Motik, Shearer, Horrocks, JAIR 2009, §4): which anonymous elements may
// not get new successors, recomputed before each generation round (dynamic blocking).

import { mix2 } from './hash.js';
import type { FactStore } from './store.js';

/**
 * Pairwise anywhere blocking (Motik et al. 2009, Def. 4.2, as we read it): an anonymous element y whose parent y′ is
 * anonymous is directly blocked by an older, not blocked z with parent z′ when L(y) = L(z), L(y′) = L(z′) and the
 * edge labels y′→y, y→y′ equal z′→z, z→z′; descendants of a blocked element are indirectly blocked.
 * `single`: L(y) = L(z) is enough — for programs without ≈ heads (no ≤n), as in tableaux for DLs with inverse roles
 * but no number restrictions (README, "Blocking"). Returns a byte per element (1 = blocked).
 */
export function blockedElements(st: FactStore, cache?: BlockerCache, single = false): Uint8Array {
  const status = new Uint8Array(st.elementCount), seen = new Map<number, number>();
  cache?.reserve(st.elementCount);
  for (let y = st.named; y < st.elementCount; y++) {
    if (st.rep[y] !== y) continue;
    const p = st.parent[y]!;
    if (p < st.named) continue;
    if (status[p]) { status[y] = 1; continue; }
    const key = single ? mix2(st.labelHashA[y]!, st.labelHashB[y]!) : mix2(mix2(mix2(st.labelHashA[y]!, st.labelHashB[y]!), mix2(st.labelHashA[p]!, st.labelHashB[p]!)), edgeHash(st, p, y));
    const z = seen.get(key);
    if (z === undefined) { seen.set(key, y); continue; }
    if (single) {
      // The cache compares the stamps of y and z only (the parents play no part).
      if (cache?.holds(st, y, y, z, z)) { status[y] = 1; continue; }
      if (sameLabel(st, y, z)) { status[y] = 1; cache?.record(st, y, y, z, z); }
      continue;
    }
    const q = st.parent[z]!;
    if (cache?.holds(st, y, p, z, q)) { status[y] = 1; continue; }
    if (sameLabel(st, y, z) && sameLabel(st, p, q) && sameEdges(st, p, y, q, z)) { status[y] = 1; cache?.record(st, y, p, z, q); }
  }
  return status;
}

/**
 * The blocker each element was last verified against, with the change stamps (`FactStore.stamp`) of the four elements
 * compared then: while none of them changed and the same z is the first unblocked element with y's key, the exact
 * comparison would give the same answer, so it is skipped. (Stamps wrap only after 2³² changes.)
 */
export class BlockerCache {
  private blocker = new Int32Array(0);
  private stamps = new Int32Array(0);

  reserve(n: number): void {
    if (this.blocker.length >= n) return;
    const size = Math.max(n, this.blocker.length * 2, 64);
    const b = new Int32Array(size).fill(-1); b.set(this.blocker); this.blocker = b;
    const s = new Int32Array(size * 4); s.set(this.stamps); this.stamps = s;
  }

  holds(st: FactStore, y: number, p: number, z: number, q: number): boolean {
    if (this.blocker[y] !== z) return false;
    const s = this.stamps, i = y * 4, t = st.stamp;
    return s[i] === t[y] && s[i + 1] === t[p] && s[i + 2] === t[z] && s[i + 3] === t[q];
  }

  record(st: FactStore, y: number, p: number, z: number, q: number): void {
    this.blocker[y] = z;
    const s = this.stamps, i = y * 4, t = st.stamp;
    s[i] = t[y]!; s[i + 1] = t[p]!; s[i + 2] = t[z]!; s[i + 3] = t[q]!;
  }
}

function edgeHash(st: FactStore, p: number, y: number): number {
  let h = 0;
  for (let r = st.firstBinaryWithSubject(y); r >= 0; r = st.nextBinaryWithSubject(r)) if (st.binaryObj[r] === p && st.binaryValid(r)) h = (h + mix2(st.binaryPred[r]!, 1)) | 0;
  for (let r = st.firstBinaryWithObject(y); r >= 0; r = st.nextBinaryWithObject(r)) if (st.binarySubj[r] === p && st.binaryValid(r)) h = (h + mix2(st.binaryPred[r]!, 2)) | 0;
  return h;
}

function sameLabel(st: FactStore, y: number, z: number): boolean {
  if (st.labelSize[y] !== st.labelSize[z]) return false;
  for (let r = st.firstUnaryAbout(y); r >= 0; r = st.nextUnaryByElem(r)) if (!st.hasUnary(st.unaryPred[r]!, z)) return false;
  return true;
}

/** Valid edges from a to b. A module function, not a closure: this runs for every blocked element in every round. */
function edgeCount(st: FactStore, a: number, b: number): number {
  let n = 0;
  for (let r = st.firstBinaryWithSubject(a); r >= 0; r = st.nextBinaryWithSubject(r)) if (st.binaryObj[r] === b && st.binaryValid(r)) n++;
  return n;
}

function sameEdges(st: FactStore, p: number, y: number, q: number, z: number): boolean {
  if (edgeCount(st, y, p) !== edgeCount(st, z, q) || edgeCount(st, p, y) !== edgeCount(st, q, z)) return false;
  for (let r = st.firstBinaryWithSubject(y); r >= 0; r = st.nextBinaryWithSubject(r)) if (st.binaryObj[r] === p && !st.hasBinary(st.binaryPred[r]!, z, q)) return false;
  for (let r = st.firstBinaryWithSubject(p); r >= 0; r = st.nextBinaryWithSubject(r)) if (st.binaryObj[r] === y && !st.hasBinary(st.binaryPred[r]!, q, z)) return false;
  return true;
}

