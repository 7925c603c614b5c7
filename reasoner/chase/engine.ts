// The chase on one fact store: semi-naive saturation of the non-generating rules (Datalog-first), equality by
// representatives with fact rewriting, the restricted chase for existential rules with pairwise anywhere blocking
// (Motik, Shearer, Horrocks, JAIR 2009, §4 "blocking"), and recording of the disjunctions to branch on.

import { BINARY, EQUAL, UNARY, type CompiledAtom, type CompiledProgram, type CompiledRule, type JoinStep } from './program.js';
import { DISTINCT_ID, FactStore, type StoreMark } from './store.js';
import { BlockerCache, blockedElements } from './blocking.js';
import type { Guard } from './guard.js';
import { DependencySets } from './dependencies.js';
import { CountingQueue, countedSuccessors, hasDistinctSubset } from './counting.js';

/** What closed a branch: the rule whose body matched (constraint, or an equality against ≉) and the matched elements. */
export interface Clash {
  readonly rule: number;
  readonly env: readonly number[];
  /** For a clash of ≈ against ≉: the two elements. */
  readonly distinct?: readonly [number, number];
  /** The choice points the clash depends on (a dependency set id). */
  readonly dep: number;
}

export interface ChaseMark {
  readonly store: StoreMark;
  readonly triggers: number;
  readonly triggerCursor: number;
  readonly shallow: number;
  readonly shallowCursor: number;
  readonly pending: number;
  readonly pendingCursor: number;
}

/** Rule instances waiting: (rule, env offset) pairs over one env pool. */
class InstanceList {
  rules: number[] = [];
  offsets: number[] = [];
  deps: number[] = [];
  pool: number[] = [];
  get length(): number { return this.rules.length; }
  push(rule: number, env: Int32Array, n: number, dep: number): void {
    this.rules.push(rule); this.offsets.push(this.pool.length); this.deps.push(dep);
    for (let i = 0; i < n; i++) this.pool.push(env[i]!);
  }
  truncate(n: number): void {
    if (n >= this.rules.length) return;
    this.pool.length = this.offsets[n]!; this.rules.length = n; this.offsets.length = n; this.deps.length = n;
  }
}

/** An edge between e and x lies in the forest of created elements: two named individuals, or a parent and its child. */
function treeEdge(st: FactStore, e: number, x: number): boolean {
  return (e < st.named && x < st.named) || st.parent[e] === x || st.parent[x] === e;
}

export class Chase {
  readonly store: FactStore;
  clash: Clash | null = null;
  private deltaUnary = 0;
  private deltaBinary = 0;
  readonly triggers = new InstanceList();
  readonly pending = new InstanceList();
  /** Every pending disjunction before this index holds in the current branch. */
  pendingCursor = 0;
  /** Every trigger before this index holds (or lost its elements) in the current branch: satisfaction is kept. */
  triggerCursor = 0;
  /**
   * The triggers whose centre can never be blocked (a named element or its direct successor), in order, and the
   * prefix of them that holds: a round that defers the other triggers (`generate(true)`) reads only these.
   */
  private readonly shallow: number[] = [];
  private shallowCursor = 0;
  private readonly env: Int32Array;
  private readonly out: number[] = [];
  /** Dependency set of the row matched at each join step. */
  private readonly stepDep = new Int32Array(64);
  readonly deps = new DependencySets();
  private readonly maxVars: number;
  /** The blocking status of the last round (a hint only: element ids may have been reused since). */
  private lastBlocked: Uint8Array | null = null;
  /** Blockers verified in earlier rounds (blocking.ts). */
  private readonly blockers = new BlockerCache();
  /** The ≤n centres to count again (counting.ts). */
  private readonly counting: CountingQueue;
  /** Constraints on the classes of one element (disjointness): checked in `merge` before edges are rewritten. */
  private readonly classConstraints: readonly CompiledRule[];
  /** Successors of a ≥n head's centre, counted by `holds`. */
  private readonly counted: number[] = [];
  private readonly seen = new Set<number>();
  /** Join steps taken, so that long joins check the guard too. */
  private joinSteps = 0;

  /**
   * `singleBlocking`: block on the element's label alone (blocking.ts), which the optimised path asks for on programs
   * without ≈ heads; else pairwise.
   */
  constructor(readonly program: CompiledProgram, named: number, private readonly guard: Guard, private readonly singleBlocking = false) {
    this.store = new FactStore(program.unaryNames.length, program.binaryNames.length, named);
    this.maxVars = Math.max(1, ...program.rules.map((r) => r.vars));
    this.env = new Int32Array(this.maxVars);
    this.counting = new CountingQueue(program);
    this.classConstraints = program.rules.filter((r) => r.shape === 'constraint' && r.body.every((a) => a.kind === UNARY && a.a === 0));
  }

  mark(): ChaseMark {
    return { store: this.store.mark(), triggers: this.triggers.length, triggerCursor: this.triggerCursor, shallow: this.shallow.length, shallowCursor: this.shallowCursor, pending: this.pending.length, pendingCursor: this.pendingCursor };
  }

  undo(m: ChaseMark): void {
    this.store.undo(m.store);
    this.triggers.truncate(m.triggers); this.pending.truncate(m.pending); this.pendingCursor = m.pendingCursor; this.triggerCursor = m.triggerCursor;
    this.shallow.length = m.shallow; this.shallowCursor = m.shallowCursor;
    this.deltaUnary = Math.min(this.deltaUnary, this.store.unaryCount);
    this.deltaBinary = Math.min(this.deltaBinary, this.store.binaryCount);
    this.counting.clear();
    this.clash = null;
  }

  /** Adds ≉ in both directions (the relation is symmetric; storing both keeps joins one-directional). */
  addDistinct(a: number, b: number, rule: number, dep = 0): void {
    this.store.addBinary(DISTINCT_ID, a, b, rule, dep); this.store.addBinary(DISTINCT_ID, b, a, rule, dep);
  }

  /** The dependency set of the merges that lead from e to its representative. */
  chainDep(e: number): number {
    const st = this.store;
    let dep = 0;
    while (st.rep[e] !== e && st.rep[e]! >= 0) { dep = this.deps.union(dep, st.mergeDep[e]!); e = st.rep[e]!; }
    return dep;
  }

  /**
   * Merges the elements of a ≈ b (Motik et al. 2009, ≈-rule): into a named element if either is named, else into the
   * older; the merged-away element's facts are rewritten onto the representative, and if it was anonymous its
   * descendants are pruned (which keeps the forest shape and termination). Returns false on a clash with ≉.
   */
  merge(a: number, b: number, rule: number, env: ArrayLike<number>, dep = 0): boolean {
    const st = this.store, deps = this.deps;
    dep = deps.union(dep, deps.union(this.chainDep(a), this.chainDep(b)));
    a = st.find(a); b = st.find(b);
    if (a < 0 || b < 0 || a === b) return true;
    const to = Math.min(a, b), from = Math.max(a, b); // named ids come first, and older anonymous ids are smaller
    const known = st.binaryRow(DISTINCT_ID, a, b);
    if (known >= 0) { this.clash = { rule, env: Array.from(env), distinct: [to, from], dep: deps.union(dep, st.binaryDep[known]!) }; return false; }
    if (this.program.successor >= 0 && (this.offTree(from) || this.offTree(to))) this.guard.copiedMerges++;
    st.setRep(from, to, dep);
    if (from >= st.named) this.prune(from, dep);
    for (let r = st.firstUnaryAbout(from); r >= 0; r = st.nextUnaryByElem(r)) st.addUnary(st.unaryPred[r]!, to, st.unaryRule[r]!, deps.union(st.unaryDep[r]!, dep));
    // Disjoint classes met in one element close the branch before its edges are rewritten (a merge tried and undone
    // thousands of times under ≤n costs its classes only).
    for (const c of this.classConstraints) {
      let d = 0;
      for (const a of c.body) { const r = st.unaryRow(a.pred, to); if (r < 0) { d = -1; break; } d = deps.union(d, st.unaryDep[r]!); }
      if (d >= 0) { this.clash = { rule: c.id, env: [to], dep: d }; return false; }
    }
    // The successor relation is not carried over (blocking off): the merged-away element was created for its
    // predecessor, its representative was not, so the relation stays a forest and copies never include a merged one.
    const succ = this.program.successor;
    for (let r = st.firstBinaryWithSubject(from); r >= 0; r = st.nextBinaryWithSubject(r)) {
      if (st.binaryPred[r] === succ) continue;
      const o0 = st.binaryObj[r]!, o = st.find(o0);
      if (o >= 0) st.addBinary(st.binaryPred[r]!, to, o, st.binaryRule[r]!, deps.union(deps.union(st.binaryDep[r]!, dep), this.chainDep(o0)));
    }
    for (let r = st.firstBinaryWithObject(from); r >= 0; r = st.nextBinaryWithObject(r)) {
      if (st.binaryPred[r] === succ) continue;
      const s0 = st.binarySubj[r]!, s = st.find(s0);
      if (s >= 0) st.addBinary(st.binaryPred[r]!, s, to, st.binaryRule[r]!, deps.union(deps.union(st.binaryDep[r]!, dep), this.chainDep(s0)));
    }
    const clashRow = st.binaryRow(DISTINCT_ID, to, to);
    if (clashRow >= 0) { this.clash = { rule, env: Array.from(env), distinct: [to, from], dep: deps.union(dep, st.binaryDep[clashRow]!) }; return false; }
    // Successors that were two may now be one (no new row says so): the ≤n centres around `to` are counted again.
    if (this.counting.used) this.counting.around(st, to);
    return true;
  }

  /**
   * Blocking off (the published rewriting): whether element e has an edge to an element that is neither its parent
   * nor its child, pairs of named individuals aside — a copied successor edge, or one a merge carried over from such
   * an edge. Merges of such elements are counted: the exactness argument does not cover them (README, "The
   * published rewriting", what is left open).
   */
  private offTree(e: number): boolean {
    const st = this.store, succ = this.program.successor;
    for (let r = st.firstBinaryWithSubject(e); r >= 0; r = st.nextBinaryWithSubject(r)) if (st.binaryValid(r) && st.binaryPred[r] !== succ && !treeEdge(st, e, st.binaryObj[r]!)) return true;
    for (let r = st.firstBinaryWithObject(e); r >= 0; r = st.nextBinaryWithObject(r)) if (st.binaryValid(r) && st.binaryPred[r] !== succ && !treeEdge(st, e, st.binarySubj[r]!)) return true;
    return false;
  }

  private prune(e: number, dep: number): void {
    const st = this.store;
    for (let c = st.firstChild[e]!; c >= 0; c = st.nextSibling[c]!) {
      if (st.rep[c] === c) { st.setRep(c, -1, dep); this.prune(c, dep); }
    }
  }

  /** Runs the non-generating rules to a fixpoint over the rows added since the last call. Returns false on a clash. */
  saturate(): boolean {
    const st = this.store, prog = this.program;
    while (this.deltaUnary < st.unaryCount || this.deltaBinary < st.binaryCount || this.counting.length > 0) {
      this.guard.check(st);
      const u0 = this.deltaUnary, u1 = st.unaryCount, b0 = this.deltaBinary, b1 = st.binaryCount;
      this.out.length = 0;
      for (let row = u0; row < u1; row++) {
        if (!st.unaryValid(row)) continue;
        const readers = prog.readersOfUnary[st.unaryPred[row]!]!;
        for (let k = 0; k < readers.length; k++) this.fromDelta(prog.rules[readers[k]![0]]!, readers[k]![1], row, u0, b0);
      }
      for (let row = b0; row < b1; row++) {
        if (!st.binaryValid(row)) continue;
        const readers = prog.readersOfBinary[st.binaryPred[row]!]!;
        for (let k = 0; k < readers.length; k++) this.fromDelta(prog.rules[readers[k]![0]]!, readers[k]![1], row, u0, b0);
      }
      this.counting.drain(this, this.out);
      this.deltaUnary = u1; this.deltaBinary = b1;
      if (!this.applyAll()) return false;
    }
    return true;
  }

  /** Matches the rule with body atom `i` bound to the delta row, atoms before i to old rows, atoms after i to any. */
  private fromDelta(rule: CompiledRule, i: number, row: number, oldUnary: number, oldBinary: number): void {
    if (rule.countingBody !== null) { this.counting.fromRow(this.store, rule, i, row); return; }
    const st = this.store, env = this.env, atom = rule.body[i]!;
    if (atom.kind === UNARY) { env[atom.a] = st.unaryElem[row]!; this.stepDep[0] = st.unaryDep[row]!; }
    else {
      this.stepDep[0] = st.binaryDep[row]!;
      const s = st.binarySubj[row]!, o = st.binaryObj[row]!;
      if (atom.a === atom.b && s !== o) return;
      env[atom.a] = s; env[atom.b] = o;
    }
    const plan = rule.plans[i]!;
    const sym = rule.symmetric;
    this.join(plan, 1, i, oldUnary, oldBinary, () => {
      for (let k = 1; k < sym.length; k++) if (env[sym[k - 1]!]! >= env[sym[k]!]!) return false;
      let dep = 0;
      for (let k = 0; k < plan.length; k++) dep = this.deps.union(dep, this.stepDep[k]!);
      this.out.push(rule.id, dep);
      for (let v = 0; v < rule.bodyVars; v++) this.out.push(env[v]!);
      return false;
    });
  }

  /**
   * Enumerates matches of plan[k..] extending env; `onMatch` returns true to stop. Atoms of the body before the delta
   * atom `deltaIndex` only read rows older than the delta (semi-naive: each match is found once).
   */
  join(plan: readonly JoinStep[], k: number, deltaIndex: number, oldUnary: number, oldBinary: number, onMatch: () => boolean, bound = -1): boolean {
    if (k === plan.length) return onMatch();
    if ((++this.joinSteps & 8191) === 0) this.guard.check();
    const st = this.store, env = this.env, step = plan[k]!, a = step.atom;
    const old = step.bodyIndex >= 0 && step.bodyIndex < deltaIndex;
    const limitU = old ? oldUnary : 0x7fffffff, limitB = old ? oldBinary : 0x7fffffff;
    if (a.kind === UNARY) {
      if (this.bound(plan, k, a.a, bound)) {
        const r = st.unaryRow(a.pred, env[a.a]!);
        if (r >= 0) this.stepDep[k] = st.unaryDep[r]!;
        return r >= 0 && r < limitU && this.join(plan, k + 1, deltaIndex, oldUnary, oldBinary, onMatch, bound);
      }
      for (let r = st.firstUnaryOf(a.pred); r >= 0; r = st.nextUnaryByPred(r)) {
        if (r >= limitU || !st.unaryValid(r)) continue;
        env[a.a] = st.unaryElem[r]!; this.stepDep[k] = st.unaryDep[r]!;
        if (this.join(plan, k + 1, deltaIndex, oldUnary, oldBinary, onMatch, bound)) return true;
      }
      return false;
    }
    const ba = this.bound(plan, k, a.a, bound), bb = this.bound(plan, k, a.b, bound);
    if (ba && bb) {
      const r = st.binaryRow(a.pred, env[a.a]!, env[a.b]!);
      if (r >= 0) this.stepDep[k] = st.binaryDep[r]!;
      return r >= 0 && r < limitB && this.join(plan, k + 1, deltaIndex, oldUnary, oldBinary, onMatch, bound);
    }
    if (ba) {
      for (let r = st.firstBinaryFrom(a.pred, env[a.a]!); r >= 0; r = st.nextBinaryFrom(r)) {
        if (r >= limitB || !st.binaryValid(r)) continue;
        const o = st.binaryObj[r]!;
        if (a.a === a.b && o !== env[a.a]) continue;
        env[a.b] = o; this.stepDep[k] = st.binaryDep[r]!;
        if (this.join(plan, k + 1, deltaIndex, oldUnary, oldBinary, onMatch, bound)) return true;
      }
      return false;
    }
    if (bb) {
      for (let r = st.firstBinaryTo(a.pred, env[a.b]!); r >= 0; r = st.nextBinaryTo(r)) {
        if (r >= limitB || !st.binaryValid(r)) continue;
        env[a.a] = st.binarySubj[r]!; this.stepDep[k] = st.binaryDep[r]!;
        if (this.join(plan, k + 1, deltaIndex, oldUnary, oldBinary, onMatch, bound)) return true;
      }
      return false;
    }
    for (let r = st.firstBinaryOf(a.pred); r >= 0; r = st.nextBinaryByPred(r)) {
      if (r >= limitB || !st.binaryValid(r)) continue;
      const s = st.binarySubj[r]!, o = st.binaryObj[r]!;
      if (a.a === a.b && s !== o) continue;
      env[a.a] = s; env[a.b] = o; this.stepDep[k] = st.binaryDep[r]!;
      if (this.join(plan, k + 1, deltaIndex, oldUnary, oldBinary, onMatch, bound)) return true;
    }
    return false;
  }

  /** A variable is bound if it is below `bound` (test plans: the body variables) or occurs in an earlier step. */
  private bound(plan: readonly JoinStep[], k: number, v: number, bound: number): boolean {
    if (v < bound) return true;
    for (let j = 0; j < k; j++) { const a = plan[j]!.atom; if (a.a === v || (a.kind !== UNARY && a.b === v)) return true; }
    return false;
  }

  /** Applies the buffered matches: Datalog heads and equalities now, disjunctions and existentials are recorded. */
  private applyAll(): boolean {
    const st = this.store, prog = this.program, out = this.out, env = this.env;
    let i = 0;
    while (i < out.length) {
      const rule = prog.rules[out[i]!]!;
      let dead = false, dep = out[i + 1]!;
      for (let v = 0; v < rule.bodyVars; v++) {
        const e0 = out[i + 2 + v]!, e = st.find(e0);
        if (e < 0) dead = true; else if (e !== e0) dep = this.deps.union(dep, this.chainDep(e0));
        env[v] = e;
      }
      i += 2 + rule.bodyVars;
      if (dead) continue;
      switch (rule.shape) {
        case 'datalog':
          for (const a of rule.head[0]!.atoms) this.addAtom(a, rule.id, dep);
          break;
        case 'constraint':
          this.clash = { rule: rule.id, env: Array.from(env.subarray(0, rule.bodyVars)), dep };
          return false;
        case 'equality':
          for (const a of rule.head[0]!.atoms) {
            if (!this.merge(env[a.a]!, env[a.b]!, rule.id, env.subarray(0, rule.bodyVars), dep)) return false;
          }
          break;
        case 'disjunctive':
          if (!this.holds(rule)) {
            this.pending.push(rule.id, env, rule.bodyVars, dep);
            if (rule.countingBody !== null) this.counting.recordOpen(rule.id, env[rule.countingBody.centre]!, this.pending.length - 1);
          }
          break;
        case 'existential':
          if (!this.holds(rule)) {
            const c = env[rule.center]!;
            if (c < st.named || st.parent[c]! < st.named) this.shallow.push(this.triggers.length);
            this.triggers.push(rule.id, env, rule.bodyVars, dep);
          }
          break;
      }
    }
    return true;
  }

  /** Adds a head atom under the current env (elements through `find`). */
  addAtom(a: CompiledAtom, rule: number, dep: number): void {
    const st = this.store, env = this.env, deps = this.deps;
    const x = env[a.a]!, s = st.find(x);
    if (s < 0) return;
    if (s !== x) dep = deps.union(dep, this.chainDep(x));
    if (a.kind === UNARY) { st.addUnary(a.pred, s, rule, dep); return; }
    const y = env[a.b]!, o = st.find(y);
    if (o < 0) return;
    if (o !== y) dep = deps.union(dep, this.chainDep(y));
    if (a.pred === DISTINCT_ID) this.addDistinct(s, o, rule, dep); else st.addBinary(a.pred, s, o, rule, dep);
  }

  /** Returns true if some head disjunct of the rule already holds for the body match in env (restricted chase test). */
  holds(rule: CompiledRule): boolean {
    const st = this.store, env = this.env;
    if (rule.pairwiseEq !== null) {
      const seen = this.seen;
      seen.clear();
      for (const v of rule.pairwiseEq) { const e = st.find(env[v]!); if (seen.has(e)) return true; seen.add(e); }
      return false;
    }
    for (const d of rule.head) {
      if (d.counting !== null) {
        const c = st.find(env[d.counting.centre]!), ys = this.counted;
        if (c < 0) continue;
        ys.length = 0;
        countedSuccessors(st, d.counting, c, ys, null, null);
        if (hasDistinctSubset(st, ys, d.counting.ys.length)) return true;
        continue;
      }
      let eqOk = true;
      for (const a of d.atoms) if (a.kind === EQUAL && st.find(env[a.a]!) !== st.find(env[a.b]!)) { eqOk = false; break; }
      if (!eqOk) continue;
      if (d.test.length === 0 || this.join(d.test, 0, -1, 0, 0, () => true, rule.bodyVars)) return true;
    }
    return false;
  }

  /** Loads instance `i` of a list into env (elements through find); returns false if an element was pruned. */
  loadInstance(list: InstanceList, i: number): CompiledRule | null {
    const rule = this.program.rules[list.rules[i]!]!, off = list.offsets[i]!;
    let dep = list.deps[i]!;
    for (let v = 0; v < rule.bodyVars; v++) {
      const e0 = list.pool[off + v]!, e = this.store.find(e0);
      if (e < 0) return null;
      if (e !== e0) dep = this.deps.union(dep, this.chainDep(e0));
      this.env[v] = e;
    }
    this.instanceDep = dep;
    return rule;
  }

  /** Dependency set of the instance last loaded by `loadInstance` (its body match and the merges it went through). */
  instanceDep = 0;

  /** Applies head disjunct `d` of the rule loaded in env. Returns false on a clash. */
  applyDisjunct(rule: CompiledRule, d: number, dep: number): boolean {
    const env = this.env.subarray(0, rule.bodyVars); // copied only into a clash (merge reads, never writes, env)
    for (const a of rule.head[d]!.atoms) {
      if (a.kind === EQUAL) { if (!this.merge(this.env[a.a]!, this.env[a.b]!, rule.id, env, dep)) return false; }
      else this.addAtom(a, rule.id, dep);
    }
    return true;
  }

  /**
   * One round of the restricted chase for existential rules: every recorded trigger whose centre is not blocked and
   * whose head does not hold yet gets new elements. Returns the number of triggers applied. `deferDeep` (blocking
   * on): leave the triggers of elements that can be blocked (an anonymous element with an anonymous parent) for a
   * round with no disjunction open (README, "Deep elements generate last").
   */
  generate(deferDeep = false): number {
    const st = this.store, list = this.triggers;
    if (list.length === 0) return 0;
    if (deferDeep && this.program.blocking) return this.generateShallow();
    // Blocking is computed only when some trigger is still open (it costs a pass over all elements). A trigger whose
    // centre was blocked in the last round is taken as open without testing its head (most of them, in a deep model):
    // the loop below tests it again against this round's status.
    const open: number[] = [], last = this.lastBlocked;
    for (let i = this.triggerCursor; i < list.length; i++) {
      const rule = this.loadInstance(list, i);
      if (rule !== null && last !== null) { const c = this.env[rule.center]!; if (c < last.length && last[c]) { open.push(i); continue; } }
      if (rule !== null && !this.holds(rule)) open.push(i);
      else if (open.length === 0) this.triggerCursor = i + 1;
    }
    if (open.length === 0) return 0;
    // A self-terminating program (blocking off): the plain restricted chase applies one trigger, then the rules run
    // again, so that copies of the new successor can satisfy the other open triggers before they fire.
    const plain = !this.program.blocking;
    const status = plain ? new Uint8Array(0) : blockedElements(this.store, this.blockers, this.singleBlocking);
    this.lastBlocked = plain ? null : status;
    let applied = 0;
    for (const i of open) {
      const rule = this.loadInstance(list, i);
      if (rule === null) continue;
      const centre = this.env[rule.center]!;
      if (centre < status.length && status[centre]) continue;
      if (this.holds(rule)) continue;
      this.fire(rule, centre);
      applied++;
      if (plain) {
        if (this.program.successor >= 0) for (const v of rule.head[0]!.exists) st.addBinary(this.program.successor, centre, this.env[v]!, rule.id, this.instanceDep);
        break;
      }
    }
    return applied;
  }

  /**
   * A round that defers every trigger whose centre can be blocked: only the shallow triggers are read (their centres,
   * named elements and their direct successors, are never blocked, so no blocking pass is needed). Reading all the
   * triggers here cost a pass over every deep element's triggers per branch (80-class random TBoxes: 29 000 a round).
   */
  private generateShallow(): number {
    const list = this.triggers, sh = this.shallow, open: number[] = [];
    for (let k = this.shallowCursor; k < sh.length; k++) {
      const rule = this.loadInstance(list, sh[k]!);
      if (rule !== null && !this.holds(rule)) open.push(sh[k]!);
      else if (open.length === 0) this.shallowCursor = k + 1;
    }
    let applied = 0;
    for (const i of open) {
      const rule = this.loadInstance(list, i);
      if (rule === null || this.holds(rule)) continue;
      this.fire(rule, this.env[rule.center]!);
      applied++;
    }
    return applied;
  }

  /** Applies the existential trigger loaded in env: new elements under the centre, and the head's atoms. */
  private fire(rule: CompiledRule, centre: number): void {
    const st = this.store, d = rule.head[0]!;
    for (const v of d.exists) this.env[v] = st.newElement(centre);
    this.guard.elements(st.elementCount);
    const dep = this.instanceDep;
    for (const a of d.atoms) this.addAtom(a, rule.id, dep);
  }
}
