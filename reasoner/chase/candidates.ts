// Candidate facts of a component's cautious search (component.ts): named facts of a first model that are not yet
// known to be certain, as parsed keys, and the ground constraints the search checks after every choice — "this fact
// holds → ⊥" and, for a group, "some fact of the group holds → ⊥", the latter checked incrementally over the rows
// added since the last check, so that a group of thousands costs what the search itself adds.

import type { Chase } from './engine.js';

/** A named fact: kind (0 unary, 1 binary, 2 same) and its numbers: (pred, e), (pred, s, o) or (a, b). */
export type ParsedKey = readonly [kind: number, x: number, y: number, z: number];

/** Parses a fact key of component.ts ("u p e", "b p s o", "s a b"). */
export function parseKey(key: string): ParsedKey {
  const n = key.slice(1).split(' ').map(Number);
  return [key[0] === 'u' ? 0 : key[0] === 'b' ? 1 : 2, n[0]!, n[1]!, n[2] ?? 0];
}

/** Parses fact keys, each once (the constraints check them after every choice). */
export function keyParser(): (key: string) => ParsedKey {
  const cache = new Map<string, ParsedKey>();
  return (key) => {
    let p = cache.get(key);
    if (p === undefined) cache.set(key, (p = parseKey(key)));
    return p;
  };
}

/** If the fact holds in the chase's current branch, its dependency set; else -1. */
export function holdsKey(chase: Chase, [kind, x, y, z]: ParsedKey): number {
  const st = chase.store, deps = chase.deps;
  if (kind === 2) return st.find(x) === st.find(y) ? deps.union(chase.chainDep(x), chase.chainDep(y)) : -1;
  if (kind === 0) { const r = st.unaryRow(x, st.find(y)); return r < 0 ? -1 : deps.union(st.unaryDep[r]!, chase.chainDep(y)); }
  const r = st.binaryRow(x, st.find(y), st.find(z));
  return r < 0 ? -1 : deps.union(deps.union(st.binaryDep[r]!, chase.chainDep(y)), chase.chainDep(z));
}

/**
 * "Some fact of the group holds → ⊥", for one search. A full check looks at every fact; later checks look only at
 * the rows added since the last clean check (undo only removes rows, and a removed row cannot make a fact hold) and
 * at the named individuals merged away (a row about a representative holds for each of its named members). Any new
 * merge of a named individual makes the next check a full one (a `same` fact may have started to hold).
 */
export class GroupConstraint {
  private readonly unary = new Map<number, ParsedKey>();
  private readonly binary = new Map<number, Map<number, ParsedKey>>();
  private unaryMark = 0;
  private binaryMark = 0;
  private trailMark = 0;
  private full = true;
  /** Named individuals merged away, with the trail index of the merge (a stack that follows the trail). */
  private readonly mergedAt: number[] = [];
  private readonly merged: number[] = [];

  constructor(private readonly group: readonly ParsedKey[], private readonly named: number) {
    for (const k of group) {
      if (k[0] === 0) this.unary.set(k[1] * named + k[2], k);
      else if (k[0] === 1) {
        const ps = k[1] * named + k[2];
        let m = this.binary.get(ps);
        if (m === undefined) this.binary.set(ps, (m = new Map()));
        m.set(k[3], k);
      }
    }
  }

  /** The dependency set of a fact of the group that holds, else -1. */
  check(chase: Chase): number {
    const st = chase.store, named = this.named, trail = st.mergeTrailLength;
    while (this.mergedAt.length > 0 && this.mergedAt[this.mergedAt.length - 1]! >= trail) { this.mergedAt.pop(); this.merged.pop(); }
    if (this.trailMark > trail) this.trailMark = trail;
    for (let i = this.trailMark; i < trail; i += 2) {
      const e = st.mergedElement(i);
      if (e < named) { this.mergedAt.push(i); this.merged.push(e); this.full = true; }
    }
    this.trailMark = trail;
    this.unaryMark = Math.min(this.unaryMark, st.unaryCount);
    this.binaryMark = Math.min(this.binaryMark, st.binaryCount);
    const d = this.full ? this.checkAll(chase) : this.checkNew(chase);
    if (d >= 0) return d;
    this.full = false;
    this.unaryMark = st.unaryCount; this.binaryMark = st.binaryCount;
    return -1;
  }

  private checkAll(chase: Chase): number {
    for (const k of this.group) { const d = holdsKey(chase, k); if (d >= 0) return d; }
    return -1;
  }

  /** The named elements whose representative is `e` (e itself, and those merged into it). */
  private members(chase: Chase, e: number): number[] {
    if (this.merged.length === 0) return [e];
    const out = [e];
    for (const x of this.merged) if (chase.store.find(x) === e) out.push(x);
    return out;
  }

  private checkNew(chase: Chase): number {
    const st = chase.store, named = this.named;
    for (let r = this.unaryMark; r < st.unaryCount; r++) {
      const e = st.unaryElem[r]!;
      if (e >= named || !st.unaryValid(r)) continue;
      for (const x of this.members(chase, e)) {
        const k = this.unary.get(st.unaryPred[r]! * named + x);
        if (k !== undefined) { const d = holdsKey(chase, k); if (d >= 0) return d; }
      }
    }
    for (let r = this.binaryMark; r < st.binaryCount; r++) {
      const s = st.binarySubj[r]!, o = st.binaryObj[r]!;
      if (s >= named || o >= named || !st.binaryValid(r)) continue;
      const p = st.binaryPred[r]!;
      for (const x of this.members(chase, s)) {
        const byObject = this.binary.get(p * named + x);
        if (byObject === undefined) continue;
        for (const y of this.members(chase, o)) {
          const k = byObject.get(y);
          if (k !== undefined) { const d = holdsKey(chase, k); if (d >= 0) return d; }
        }
      }
    }
    return -1;
  }
}
