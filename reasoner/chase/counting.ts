// Number restrictions of any size, read by counting. The rule of ≥n R.B has n + n(n−1)/2 head atoms and that of
// ≤n R.B an (n+1)-atom body: joining them costs a stack frame per atom and, for ≤n, one match per ordered choice of
// n + 1 successors. Instead, for a centre c the chase collects the successors that satisfy the rule's template once:
// ≥n holds iff n of them are pairwise ≉ (a clique of the ≉ graph); ≤n is violated iff more than n are distinct
// elements, and one instance — n + 1 of them, a pair not known ≉ among them when there is one — is enough at a time,
// since merging any two of them makes the centre's successors fewer and is then checked again (engine.ts).

import type { CountingTemplate } from './program.js';
import { DISTINCT_ID, type FactStore } from './store.js';
import type { DependencySets } from './dependencies.js';

/**
 * Appends to `out` the successors y of centre c (a representative) that have every link and class of the template,
 * each once; with `deps`, also the dependency set of each one's rows.
 */
export function countedSuccessors(st: FactStore, t: CountingTemplate, c: number, out: number[], deps: number[] | null, sets: DependencySets | null): void {
  const first = t.links[0]!;
  for (let r = first.out ? st.firstBinaryFrom(first.pred, c) : st.firstBinaryTo(first.pred, c); r >= 0; r = first.out ? st.nextBinaryFrom(r) : st.nextBinaryTo(r)) {
    if (!st.binaryValid(r)) continue;
    const y = first.out ? st.binaryObj[r]! : st.binarySubj[r]!;
    let dep = st.binaryDep[r]!, ok = true;
    for (let k = 1; k < t.links.length && ok; k++) {
      const l = t.links[k]!, row = l.out ? st.binaryRow(l.pred, c, y) : st.binaryRow(l.pred, y, c);
      if (row < 0) ok = false; else if (sets) dep = sets.union(dep, st.binaryDep[row]!);
    }
    for (let k = 0; k < t.classes.length && ok; k++) {
      const row = st.unaryRow(t.classes[k]!, y);
      if (row < 0) ok = false; else if (sets) dep = sets.union(dep, st.unaryDep[row]!);
    }
    if (!ok) continue;
    out.push(y);
    deps?.push(dep);
  }
}

/** Calls `f` with each centre c that has y among its candidate successors (by the template's first link). */
export function forEachCentre(st: FactStore, t: CountingTemplate, y: number, f: (c: number) => void): void {
  const first = t.links[0]!;
  for (let r = first.out ? st.firstBinaryTo(first.pred, y) : st.firstBinaryFrom(first.pred, y); r >= 0; r = first.out ? st.nextBinaryTo(r) : st.nextBinaryFrom(r)) {
    if (st.binaryValid(r)) f(first.out ? st.binarySubj[r]! : st.binaryObj[r]!);
  }
}

const distinct = (st: FactStore, a: number, b: number) => st.binaryRow(DISTINCT_ID, a, b) >= 0;

/** Steps of the exact clique search before it gives up (then the ≥n head is taken as not holding: sound, see below). */
const CLIQUE_BUDGET = 20_000;

/**
 * Whether n of the elements are pairwise ≉. Greedy first (the successors one ≥n application created are pairwise ≉
 * and in order), then a bounded exact search. "No" when unsure is sound for the restricted chase: the trigger then
 * fires, and applying a trigger whose head already holds adds elements but no fact a model lacks.
 */
export function hasDistinctSubset(st: FactStore, ys: readonly number[], n: number): boolean {
  if (ys.length < n) return false;
  const clique: number[] = [];
  for (const y of ys) {
    if (clique.every((c) => distinct(st, c, y))) clique.push(y);
    if (clique.length >= n) return true;
  }
  if (n > 2_000) return false; // the exact search recurses once per member
  let budget = CLIQUE_BUDGET;
  const extend = (size: number, candidates: readonly number[]): boolean => {
    if (size >= n) return true;
    for (let i = 0; i < candidates.length; i++) {
      if (size + candidates.length - i < n || --budget < 0) return false;
      const v = candidates[i]!, next: number[] = [];
      for (let j = i + 1; j < candidates.length; j++) if (distinct(st, v, candidates[j]!)) next.push(candidates[j]!);
      if (extend(size + 1, next)) return true;
    }
    return false;
  };
  return extend(0, ys);
}

/**
 * Indices of m of the successors for one ≤(m−1) instance: a pair with no ≉ between them first when there is one (its
 * merge is a real choice), then the others in order. With none, the m are pairwise ≉ and the instance closes the
 * branch, as it should.
 */
export function pickViolation(st: FactStore, ys: readonly number[], m: number): number[] {
  let a = 0, b = 1;
  search: for (let i = 0; i < ys.length; i++) for (let j = i + 1; j < ys.length; j++) {
    if (!distinct(st, ys[i]!, ys[j]!)) { a = i; b = j; break search; }
  }
  const out = [a, b];
  for (let i = 0; i < ys.length && out.length < m; i++) if (i !== a && i !== b) out.push(i);
  return out;
}
