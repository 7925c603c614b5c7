// Number restrictions of any size, read by counting. The rule of ≥n R.B has n + n(n−1)/2 head atoms and that of
// ≤n R.B an (n+1)-atom body: joining them costs a stack frame per atom and, for ≤n, one match per ordered choice of
// n + 1 successors. Instead, for a centre c the chase collects the successors that satisfy the rule's template once:
// ≥n holds iff n of them are pairwise ≉ (a clique of the ≉ graph); ≤n is violated iff more than n are distinct
// elements, and one instance — n + 1 of them, a pair not known ≉ among them when there is one — is enough at a time,
// since merging any two of them makes the centre's successors fewer and is then checked again (`CountingQueue`).

import { UNARY, type CompiledProgram, type CompiledRule, type CountingTemplate } from './program.js';
import { DISTINCT_ID, type FactStore } from './store.js';
import type { DependencySets } from './dependencies.js';
import type { Chase } from './engine.js';

type Link = CountingTemplate['links'][number];

/** The rows of a link at its centre c — R(c, ·) for an out-link, R(·, c) else — newest first; -1 ends. */
const firstAtCentre = (st: FactStore, l: Link, c: number) => (l.out ? st.firstBinaryFrom(l.pred, c) : st.firstBinaryTo(l.pred, c));
const nextAtCentre = (st: FactStore, l: Link, r: number) => (l.out ? st.nextBinaryFrom(r) : st.nextBinaryTo(r));

/**
 * Appends to `out` the successors y of centre c (a representative) that have every link and class of the template,
 * each once; with `deps`, also the dependency set of each one's rows.
 */
export function countedSuccessors(st: FactStore, t: CountingTemplate, c: number, out: number[], deps: number[] | null, sets: DependencySets | null): void {
  const first = t.links[0]!;
  for (let r = firstAtCentre(st, first, c); r >= 0; r = nextAtCentre(st, first, r)) {
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

/**
 * The ≤n centres to count again in the chase's next round: queued by the rows a ≤n body reads and by merges, drained
 * by `saturate` into instances for `applyAll`, as a join would buffer matches. Cleared on undo (a mark is taken
 * only between rounds, when the queue is empty).
 */
export class CountingQueue {
  /** Some rule has a counting body. */
  readonly used: boolean;
  /** (rule, centre) pairs, and their keys for de-duplication within a round. */
  private readonly queue: number[] = [];
  private readonly queued = new Set<number>();
  /** The counting rules by the predicate of their first link (R(c, y): out), for `around`. */
  private readonly byLink = new Map<number, { rule: number; out: boolean }[]>();
  /** Per counting rule: centre → index of its newest pending instance (checked before another is recorded). */
  private readonly open = new Map<number, Map<number, number>>();
  private readonly ys: number[] = [];
  private readonly yDeps: number[] = [];

  constructor(private readonly program: CompiledProgram) {
    let used = false;
    for (const r of program.rules) {
      if (r.countingBody === null) continue;
      used = true;
      const l = r.countingBody.links[0]!;
      let list = this.byLink.get(l.pred);
      if (list === undefined) this.byLink.set(l.pred, (list = []));
      list.push({ rule: r.id, out: l.out });
    }
    this.used = used;
  }

  get length(): number { return this.queue.length; }

  clear(): void { this.queue.length = 0; this.queued.clear(); }

  private add(rule: number, centre: number): void {
    // De-duplicated within a round while the set is of moderate size; past it a pair may be counted twice (harmless).
    const key = centre * this.program.rules.length + rule, seen = this.queued;
    if (seen.size < 1 << 20) { if (seen.has(key)) return; seen.add(key); }
    this.queue.push(rule, centre);
  }

  /** A delta row read by body atom `i` of a ≤n rule: queues the centres whose successors it may have changed. */
  fromRow(st: FactStore, rule: CompiledRule, i: number, row: number): void {
    const t = rule.countingBody!, atom = rule.body[i]!;
    if (atom.kind !== UNARY) this.add(rule.id, atom.a === t.centre ? st.binarySubj[row]! : st.binaryObj[row]!);
    else if (atom.a === t.centre) {
      // A class of the centre: counted only if the centre has a successor by the first link at all (one lookup).
      const x = st.unaryElem[row]!;
      if (firstAtCentre(st, t.links[0]!, x) >= 0) this.add(rule.id, x);
    } else forEachCentre(st, t, st.unaryElem[row]!, (c) => this.add(rule.id, c));
  }

  /**
   * After a merge into e: queues the ≤n centres e's rows make it part of — e itself, where it is the centre of a
   * rule's first link, and the element at the other end, where it is the successor — since successors that were two
   * may now be one and no new row says so. Costs e's rows, not the number of rules.
   */
  around(st: FactStore, e: number): void {
    const by = this.byLink;
    for (let r = st.firstBinaryWithSubject(e); r >= 0; r = st.nextBinaryWithSubject(r)) {
      const rules = by.get(st.binaryPred[r]!);
      if (rules !== undefined && st.binaryValid(r)) for (const x of rules) this.add(x.rule, x.out ? e : st.binaryObj[r]!);
    }
    for (let r = st.firstBinaryWithObject(e); r >= 0; r = st.nextBinaryWithObject(r)) {
      const rules = by.get(st.binaryPred[r]!);
      if (rules !== undefined && st.binaryValid(r)) for (const x of rules) this.add(x.rule, x.out ? st.binarySubj[r]! : e);
    }
  }

  /** Records the pending instance just added for a centre. */
  recordOpen(rule: number, centre: number, index: number): void {
    let open = this.open.get(rule);
    if (open === undefined) this.open.set(rule, (open = new Map()));
    open.set(centre, index);
  }

  /** Counts every queued centre; appends (rule, dep, body elements…) to `out` for each instance found. */
  drain(chase: Chase, out: number[]): void {
    const q = this.queue, st = chase.store;
    for (let k = 0; k < q.length; k += 2) {
      const x = st.find(q[k + 1]!);
      if (x >= 0) this.match(chase, this.program.rules[q[k]!]!, x, out);
    }
    this.clear();
  }

  /**
   * Counts the successors of a ≤n centre and, when more than n are distinct elements and the centre has no instance
   * still open, appends one instance of the rule: n + 1 of them, a pair not known ≉ first (`pickViolation`).
   */
  private match(chase: Chase, rule: CompiledRule, x: number, out: number[]): void {
    const t = rule.countingBody!, st = chase.store, deps = chase.deps, pending = chase.pending;
    let dep = 0;
    for (const p of t.centreClasses) { const r = st.unaryRow(p, x); if (r < 0) return; dep = deps.union(dep, st.unaryDep[r]!); }
    const open = this.open.get(rule.id)?.get(x);
    if (open !== undefined && open >= chase.pendingCursor && open < pending.length && pending.rules[open] === rule.id
      && st.find(pending.pool[pending.offsets[open]! + t.centre]!) === x) {
      const r = chase.loadInstance(pending, open);
      if (r !== null && !chase.holds(r)) return;
    }
    const ys = this.ys, yDeps = this.yDeps;
    ys.length = 0; yDeps.length = 0;
    countedSuccessors(st, t, x, ys, yDeps, deps);
    if (ys.length < t.ys.length) return;
    const pick = pickViolation(st, ys, t.ys.length);
    const env = new Array<number>(rule.bodyVars).fill(0);
    env[t.centre] = x;
    pick.forEach((k, i) => { env[t.ys[i]!] = ys[k]!; dep = deps.union(dep, yDeps[k]!); });
    out.push(rule.id, dep, ...env);
  }
}
