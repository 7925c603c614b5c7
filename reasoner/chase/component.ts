// One connected component of the ABox, chased on its own: its facts over local ids in, its entailed facts out
// (or the clash that closes every branch). Used on the main thread and in worker threads alike.

import { Chase } from './engine.js';
import type { Guard } from './guard.js';
import type { CompiledProgram } from './program.js';
import { KeptSearch, leave, search } from './search.js';
import { GroupConstraint, holdsKey, keyParser, parseKey, type ParsedKey } from './candidates.js';
import { DISTINCT_ID, TOP_ID } from './store.js';
import type { ClashReport, EntailStats } from './entail.js';

/** A component's input over local individual ids 0..named-1 and compiled predicate ids (flat tuples). */
export interface ComponentTask {
  readonly named: number;
  /** (pred, e) pairs */
  readonly unary: Int32Array;
  /** (pred, s, o) triples */
  readonly binary: Int32Array;
  /** (a, b) pairs */
  readonly same: Int32Array;
  readonly different: Int32Array;
}

/** Receives a component's entailed facts over local ids and compiled predicate ids. */
export interface LocalSink {
  unary(p: number, e: number): void;
  binary(p: number, s: number, o: number): void;
  same(a: number, b: number): void;
}

/** Chases one component and emits its entailed facts; returns undefined if consistent, else the clash (or null). */
export function runComponent(program: CompiledProgram, task: ComponentTask, guard: Guard, plain: boolean, stats: EntailStats, sink: LocalSink): ClashReport | null | undefined {
  const load = (chase: Chase) => {
    const st = chase.store, u = task.unary, b = task.binary, d = task.different, q = task.same;
    for (let i = 0; i < u.length; i += 2) st.addUnary(u[i]!, u[i + 1]!, -1);
    for (let i = 0; i < b.length; i += 3) st.addBinary(b[i]!, b[i + 1]!, b[i + 2]!, -1);
    for (let i = 0; i < d.length; i += 2) {
      // a ≠ a has no model (OWL 2 Direct Semantics, DifferentIndividuals): no merge would ever find it, so it closes here.
      if (d[i] === d[i + 1]) { chase.clash = { rule: -1, env: [d[i]!, d[i]!], distinct: [d[i]!, d[i]!], dep: 0 }; return; }
      chase.addDistinct(d[i]!, d[i + 1]!, -1);
    }
    for (let i = 0; i < q.length; i += 2) if (!chase.merge(q[i]!, q[i + 1]!, -1, [q[i]!, q[i + 1]!])) return;
  };
  const result = chaseComponent(program, Math.max(1, task.named), load, guard, plain, stats);
  if (result.clash !== undefined) return result.clash;
  if (result.live) forEachNamedFact(result.live, (p, e) => sink.unary(p, e), (p, x, y) => sink.binary(p, x, y), (a, b) => sink.same(a, b));
  else {
    const f = result.facts!;
    for (let i = 0; i < f.unary.length; i += 2) sink.unary(f.unary[i]!, f.unary[i + 1]!);
    for (let i = 0; i < f.binary.length; i += 3) sink.binary(f.binary[i]!, f.binary[i + 1]!, f.binary[i + 2]!);
    for (let i = 0; i < f.same.length; i += 2) sink.same(f.same[i]!, f.same[i + 1]!);
  }
  return undefined;
}

/** Maps a clash over local ids to input ids (anonymous elements keep their negative ids). */
export function remap(clash: ClashReport | null, local: readonly number[]): ClashReport | null {
  if (clash === null) return null;
  return { rule: clash.rule, facts: clash.facts.map((f) => ({ ...f, args: f.args.map((a) => (a >= 0 ? local[a]! : a)) })) };
}

/** Named facts of one model: flat (pred, e) / (pred, s, o) / (a, b) arrays over local ids; ⊤ and ≉ left out. */
interface NamedFacts { unary: number[]; binary: number[]; same: number[] }

/** Calls back every named fact of the chase's current branch (local ids; ⊤ and ≉ left out, merged individuals expanded). */
function forEachNamedFact(chase: Chase, unary: (p: number, e: number) => void, binary: (p: number, s: number, o: number) => void, same: (a: number, b: number) => void): void {
  const st = chase.store, n = st.named;
  // Members of each representative: a linked list through `nextMember` (rep → first member).
  const first = new Int32Array(n).fill(-1), nextMember = new Int32Array(n).fill(-1);
  for (let e = n - 1; e >= 0; e--) { const r = st.find(e); nextMember[e] = first[r]!; first[r] = e; }
  for (let r = 0; r < n; r++) {
    if (first[r]! < 0) continue;
    const single = nextMember[first[r]!]! < 0;
    for (let row = st.firstUnaryAbout(r); row >= 0; row = st.nextUnaryByElem(row)) {
      const p = st.unaryPred[row]!;
      if (p === TOP_ID) continue;
      if (single) unary(p, r); else for (let e = first[r]!; e >= 0; e = nextMember[e]!) unary(p, e);
    }
    for (let row = st.firstBinaryWithSubject(r); row >= 0; row = st.nextBinaryWithSubject(row)) {
      const p = st.binaryPred[row]!, o = st.binaryObj[row]!;
      if (p === DISTINCT_ID || o >= n || !st.binaryValid(row)) continue;
      if (single && nextMember[first[o]!]! < 0) binary(p, r, o);
      else for (let x = first[r]!; x >= 0; x = nextMember[x]!) for (let y = first[o]!; y >= 0; y = nextMember[y]!) binary(p, x, y);
    }
    if (!single) for (let a = first[r]!; a >= 0; a = nextMember[a]!) for (let b = first[r]!; b >= 0; b = nextMember[b]!) if (a !== b) same(a, b);
  }
}

function namedFacts(chase: Chase): NamedFacts {
  const out: NamedFacts = { unary: [], binary: [], same: [] };
  forEachNamedFact(chase, (p, e) => out.unary.push(p, e), (p, s, o) => out.binary.push(p, s, o), (a, b) => out.same.push(a, b));
  return out;
}

function clashReport(chase: Chase): ClashReport | null {
  const clash = chase.clash;
  if (clash === null) return null;
  const rule = chase.program.rules[clash.rule];
  const st = chase.store, facts: ClashReport['facts'][number][] = [];
  const named = (e: number) => (e < st.named ? e : -1 - (e - st.named));
  if (rule) for (const a of rule.body) {
    const args = a.kind === 0 ? [clash.env[a.a]!] : [clash.env[a.a]!, clash.env[a.b]!];
    const row = a.kind === 0 ? st.unaryRow(a.pred, st.find(args[0]!)) : st.binaryRow(a.pred, st.find(args[0]!), st.find(args[1]!));
    const derivedBy = row < 0 ? -1 : a.kind === 0 ? st.unaryRule[row]! : st.binaryRule[row]!;
    const predicate = a.kind === 0 ? chase.program.unaryNames[a.pred]! : chase.program.binaryNames[a.pred]!;
    facts.push({ predicate, args: args.map(named), derivedBy });
  }
  if (clash.distinct) facts.push({ predicate: '≉', args: clash.distinct.map(named), derivedBy: -1 });
  return { rule: clash.rule, facts };
}

const keyOf = (f: NamedFacts) => {
  const s = new Set<string>();
  for (let i = 0; i < f.unary.length; i += 2) s.add(`u${f.unary[i]} ${f.unary[i + 1]}`);
  for (let i = 0; i < f.binary.length; i += 3) s.add(`b${f.binary[i]} ${f.binary[i + 1]} ${f.binary[i + 2]}`);
  for (let i = 0; i < f.same.length; i += 2) s.add(`s${f.same[i]} ${f.same[i + 1]}`);
  return s;
};

function factsOfKeys(keys: Iterable<string>): NamedFacts {
  const out: NamedFacts = { unary: [], binary: [], same: [] };
  for (const k of keys) {
    const [kind, x, y, z] = parseKey(k);
    if (kind === 0) out.unary.push(x, y); else if (kind === 1) out.binary.push(x, y, z); else out.same.push(x, y);
  }
  return out;
}

/** Candidates per group of the first pass (a group that fails is halved; below 8 they go one by one). */
const GROUP = 512;

/**
 * Chases one component. A model reached without any choice is the only one (always so for Horn programs).
 * Otherwise the facts true before the first choice are certain, and the candidates are the other facts of the first
 * model. Optimised: for each candidate f still open, search for a model with the ground constraint f → ⊥; if one
 * exists, f and every candidate it lacks are not entailed, else f is; each search backjumps to the choices f depends
 * on. Plain: one chronological search with the constraint "all remaining candidates → ⊥", shrinking the candidates
 * to what each new model shares with the earlier ones (at most |candidates| + 1 models).
 */
function chaseComponent(program: CompiledProgram, named: number, load: (c: Chase) => void, guard: Guard, plain: boolean, stats: EntailStats): { facts?: NamedFacts; live?: Chase; clash?: ClashReport | null } {
  const chase = new Chase(program, named, guard, !plain && !program.equalities);
  load(chase);
  if (chase.clash !== null) return { clash: clashReport(chase) };
  let firstClash: ClashReport | null | undefined;
  let certain = new Set<string>();
  let candidates: string[] | null = null;
  let only = false;
  const onClash = (c: Chase) => { if (firstClash === undefined) firstClash = clashReport(c); };
  const parse = keyParser();
  let models = search(chase, guard, {
    onRoot: (c) => { certain = keyOf(namedFacts(c)); },
    onClash,
    violated: plain ? (c) => allHold(c, candidates, parse) : undefined,
    onModel: (c, choices) => {
      if (choices === 0 && candidates === null) { only = true; return true; }
      const model = keyOf(namedFacts(c));
      candidates = candidates === null ? [...model].filter((k) => !certain.has(k)) : candidates.filter((k) => model.has(k));
      return !plain || candidates.length === 0;
    },
  }, { backjump: !plain, deferDeep: !plain });
  if (models === 0) {
    stats.models += models;
    if (firstClash === undefined && chase.clash !== null) firstClash = clashReport(chase);
    return { clash: firstClash ?? null };
  }
  // The only model is still the chase's state (no choice to undo): its facts are read off the store directly.
  if (only) { stats.models += models; stats.storeBytes = Math.max(stats.storeBytes, chase.store.byteLength); return { live: chase }; }
  const entailed: string[] = [];
  if (!plain) {
    const open = new Set<string>(candidates ?? []);
    let reverse = true, keptReverse = false;
    // The state a search ends in stays in the store (a model, or the choices below the level a proof exhausted): the
    // next search starts there, changing only the choices its constraint depends on (in a large component most
    // candidates are decided by a few local choices, and a search from the root would replay all the others).
    const kept = new KeptSearch();
    // `partial`: a search out of budget keeps its earlier choices (one by one); else it goes back to the root (groups:
    // the state a group ran out of budget in is deep in choices made for that group's constraint, a poor start).
    const find = (bad: (c: Chase) => number, budget: number | undefined, partial: boolean, focus?: readonly number[]): Set<string> | null => {
      let model: Set<string> | null = null;
      const hooks = { violated: bad, onModel: (c: Chase) => { model = keyOf(namedFacts(c)); return true; } };
      const resume = kept.active ? kept : undefined;
      if (!resume) {
        // Alternating the disjunct order makes consecutive models differ more, so each removes more candidates. Not
        // on a self-terminating program: its completion guesses try "absent" first, which keeps types small and few.
        keptReverse = reverse && program.blocking;
        reverse = !reverse;
      }
      models += search(chase, guard, hooks, { reverse: keptReverse, resume, keep: kept, budget, keepPartial: partial, focus, deferDeep: true });
      return model;
    };
    const keepOnly = (m: Set<string>) => { for (const k of open) if (!m.has(k)) open.delete(k); };
    // Groups: one search for a model where no candidate of the group holds (checked after every choice, so each is
    // mended where it arises): when the candidates are decided by independent local choices, this settles them all at
    // once. A group that fails (or outgrows its budget) is halved; below 8 candidates they are left to the passes.
    const settleGroups = (keys: readonly string[]) => {
      const groups: string[][] = [];
      for (let i = 0; i < keys.length; i += GROUP) groups.unshift(keys.slice(i, i + GROUP));
      while (groups.length > 0) {
        const group = groups.pop()!.filter((k) => open.has(k));
        if (group.length < 8) continue;
        const constraint = new GroupConstraint(group.map(parse), named);
        const model = find((c) => constraint.check(c), 4 * (chase.pending.length + 100) + 20 * group.length, false);
        if (model !== null) keepOnly(model);
        else groups.push(group.slice(0, group.length >> 1), group.slice(group.length >> 1));
      }
    };
    // One by one, newest dependency first: a proof backjumps only to the choices its fact depends on and keeps the
    // choices below, so taking the candidates that depend on late choices first keeps each proof short. Each search
    // branches first on the disjunctions the fact depended on (`focus`): after a proof has undone the choices above
    // a shared early one (a hut all its trails end at), the next fact that depends on it is proven by flipping it
    // again, not after re-deciding every unrelated choice in between. With a budget, a candidate whose search
    // outgrows it is returned for later (usually one that a model lacks, which costs redoing the choices above its
    // own).
    const oneByOne = (budget?: number): string[] => {
      // Stand in a model first (any, if the last search left none), so that each candidate's dependencies are known.
      if (open.size > 0) { const m = find(() => -1, undefined, true); if (m !== null) keepOnly(m); }
      const order = [...open].map((k) => {
        const dep = kept.active ? holdsKey(chase, parse(k)) : -1;
        return { k, level: newestLevel(chase, dep), focus: focusOf(chase, kept, dep) };
      });
      order.sort((x, y) => x.level - y.level);
      const left: string[] = [];
      while (order.length > 0) {
        const next = order.pop()!, f = next.k;
        if (!open.has(f)) continue;
        const key = parse(f);
        const now = kept.active ? holdsKey(chase, key) : -1;
        const focus = now > 0 ? focusOf(chase, kept, now) : next.focus;
        const before = guard.branches;
        const model = find((c) => holdsKey(c, key), budget, true, focus);
        if (model !== null) { keepOnly(model); continue; }
        if (budget !== undefined && guard.branches - before > budget) { left.push(f); continue; }
        open.delete(f);
        entailed.push(f);
      }
      return left;
    };
    settleGroups([...open]);
    settleGroups(oneByOne(32));
    oneByOne();
    leave(chase, kept);
  } else entailed.push(...(candidates ?? []));
  stats.models += models;
  stats.storeBytes = Math.max(stats.storeBytes, chase.store.byteLength);
  return { facts: factsOfKeys([...certain, ...entailed]) };
}

/** The disjunctions chosen at the levels of a dependency set in the kept search, oldest first. */
function focusOf(chase: Chase, kept: KeptSearch, dep: number): number[] | undefined {
  if (dep <= 0) return undefined;
  const out: number[] = [];
  for (const level of chase.deps.levels(dep)) { const top = kept.stack[level - 1]; if (top) out.push(top.instance); }
  return out;
}

/** The newest choice level in a dependency set (0 for none; -1 sets, unknown, count as 0). */
function newestLevel(chase: Chase, dep: number): number {
  return dep > 0 ? chase.deps.newest(dep) : 0;
}

/** The plain path's constraint: -1 unless every remaining candidate holds (then -2: taken to depend on every choice). */
function allHold(chase: Chase, candidates: readonly string[] | null, parse: (key: string) => ParsedKey): number {
  if (candidates === null) return -1;
  for (const k of candidates) if (holdsKey(chase, parse(k)) < 0) return -1;
  return -2;
}
