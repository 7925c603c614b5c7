// Pairwise anywhere blocking for the chase (Motik, Shearer, Horrocks, JAIR 2009, §4): which anonymous elements may
// not get new successors, recomputed before each generation round (dynamic blocking).

import { mix2 } from './hash.js';
import type { FactStore } from './store.js';

/**
 * Pairwise anywhere blocking (Motik et al. 2009, Def. 4.2, as we read it): an anonymous element y whose parent y′ is
 * anonymous is directly blocked by an older, not blocked z with parent z′ when L(y) = L(z), L(y′) = L(z′) and the
 * edge labels y′→y, y→y′ equal z′→z, z→z′; descendants of a blocked element are indirectly blocked.
 * Returns a byte per element (1 = blocked).
 */
export function blockedElements(st: FactStore): Uint8Array {
  const status = new Uint8Array(st.elementCount), seen = new Map<number, number>();
  for (let y = st.named; y < st.elementCount; y++) {
    if (st.rep[y] !== y) continue;
    const p = st.parent[y]!;
    if (p < st.named) continue;
    if (status[p]) { status[y] = 1; continue; }
    const key = mix2(mix2(mix2(st.labelHashA[y]!, st.labelHashB[y]!), mix2(st.labelHashA[p]!, st.labelHashB[p]!)), edgeHash(st, p, y));
    const z = seen.get(key);
    if (z !== undefined && sameLabel(st, y, z) && sameLabel(st, p, st.parent[z]!) && sameEdges(st, p, y, st.parent[z]!, z)) status[y] = 1;
    else if (z === undefined) seen.set(key, y);
  }
  return status;
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

function sameEdges(st: FactStore, p: number, y: number, q: number, z: number): boolean {
  const count = (a: number, b: number) => {
    let n = 0;
    for (let r = st.firstBinaryWithSubject(a); r >= 0; r = st.nextBinaryWithSubject(r)) if (st.binaryObj[r] === b && st.binaryValid(r)) n++;
    return n;
  };
  if (count(y, p) !== count(z, q) || count(p, y) !== count(q, z)) return false;
  for (let r = st.firstBinaryWithSubject(y); r >= 0; r = st.nextBinaryWithSubject(r)) if (st.binaryObj[r] === p && !st.hasBinary(st.binaryPred[r]!, z, q)) return false;
  for (let r = st.firstBinaryWithSubject(p); r >= 0; r = st.nextBinaryWithSubject(r)) if (st.binaryObj[r] === y && !st.hasBinary(st.binaryPred[r]!, q, z)) return false;
  return true;
}

