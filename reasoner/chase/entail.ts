// Entailed facts over named individuals: the ABox split into connected components (independent, as ALCHIQ has no
// nominals), each chased on its own; Horn programs need one branch, disjunctive ones a cautious-consequence search.

import { Chase } from './engine.js';
import { Guard } from './guard.js';
import { compileProgram, type CompiledProgram } from './program.js';
import { search } from './search.js';
import { DISTINCT_ID, TOP_ID } from './store.js';
import type { RuleProgram } from '../rules/types.js';

/** The input facts, over individual ids 0..individuals-1 and predicate names of the program's vocabulary. */
export interface ChaseInput {
  readonly individuals: number;
  /** (class name id in `classNames`, individual) rows */
  readonly classPred: Int32Array;
  readonly classInd: Int32Array;
  readonly propPred: Int32Array;
  readonly propSubj: Int32Array;
  readonly propObj: Int32Array;
  readonly sameA: Int32Array;
  readonly sameB: Int32Array;
  readonly diffA: Int32Array;
  readonly diffB: Int32Array;
  /** Names of the class / property ids used above. */
  readonly classNames: readonly string[];
  readonly propertyNames: readonly string[];
}

/** Receives entailed facts; predicates are names, individuals are input ids. */
export interface EntailedSink {
  unary(cls: string, individual: number): void;
  binary(property: string, subject: number, object: number): void;
  same(a: number, b: number): void;
}

/** A clash: the rule that fired ⊥ and the facts its body matched (elements: input ids, or -1 - k for anonymous k). */
export interface ClashReport {
  readonly rule: number;
  readonly facts: readonly { readonly predicate: string; readonly args: readonly number[]; readonly derivedBy: number }[];
}

export type EntailOutcome =
  | { readonly status: 'ok'; readonly stats: EntailStats }
  | { readonly status: 'inconsistent'; readonly clash: ClashReport | null; readonly stats: EntailStats };

export interface EntailStats {
  components: number;
  branches: number;
  anonymousElements: number;
  models: number;
  cachedComponents: number;
  /** Largest fact store of one component, in bytes (columns, indexes and hash tables). */
  storeBytes: number;
}

export interface EntailOptions {
  readonly guard: Guard;
  /** 'optimised' (components, certain facts, caching of isolated individuals) or 'plain' (one chase over the whole ABox). */
  readonly path?: 'optimised' | 'plain';
  /** Called between components with the fraction done; may await so that cancellation can be seen. */
  readonly onComponent?: (done: number, total: number) => void | Promise<void>;
}

/** Union–find over individuals, linked by property facts, sameAs and differentFrom. */
function components(input: ChaseInput): { of: Int32Array; count: number } {
  const parent = new Int32Array(input.individuals).map((_, i) => i);
  const find = (x: number) => { while (parent[x] !== x) { parent[x] = parent[parent[x]!]!; x = parent[x]!; } return x; };
  const link = (a: number, b: number) => { a = find(a); b = find(b); if (a !== b) parent[Math.max(a, b)] = Math.min(a, b); };
  for (let i = 0; i < input.propSubj.length; i++) link(input.propSubj[i]!, input.propObj[i]!);
  for (let i = 0; i < input.sameA.length; i++) link(input.sameA[i]!, input.sameB[i]!);
  for (let i = 0; i < input.diffA.length; i++) link(input.diffA[i]!, input.diffB[i]!);
  const of = new Int32Array(input.individuals);
  const ids = new Map<number, number>();
  for (let i = 0; i < input.individuals; i++) {
    const r = find(i);
    let c = ids.get(r);
    if (c === undefined) { c = ids.size; ids.set(r, c); }
    of[i] = c;
  }
  return { of, count: ids.size };
}

/** Computes Ent over the named individuals of `input` and streams it to `sink`. */
export async function entail(program: RuleProgram, input: ChaseInput, sink: EntailedSink, options: EntailOptions): Promise<EntailOutcome> {
  // Classes and properties that occur only in the data are vocabulary too: their facts are output.
  const compiled = compileProgram({ ...program, classes: [...program.classes, ...input.classNames], properties: [...program.properties, ...input.propertyNames] });
  const stats: EntailStats = { components: 0, branches: 0, anonymousElements: 0, models: 0, cachedComponents: 0, storeBytes: 0 };
  const classIds = input.classNames.map((c) => compiled.unaryIds.get(c) ?? -1);
  const propIds = input.propertyNames.map((p) => compiled.binaryIds.get(p) ?? -1);
  const plain = options.path === 'plain';
  const guard = options.guard;

  // Group the rows by component (counting sort), so each component's facts are contiguous.
  const comp = plain ? { of: new Int32Array(input.individuals), count: input.individuals > 0 ? 1 : 0 } : components(input);
  const members: number[][] = Array.from({ length: comp.count }, () => []);
  for (let i = 0; i < input.individuals; i++) members[comp.of[i]!]!.push(i);
  const byComp = <T>(n: number, owner: (row: number) => number) => {
    const lists: number[][] = Array.from({ length: comp.count }, () => []);
    for (let r = 0; r < n; r++) lists[comp.of[owner(r)]!]!.push(r);
    return lists;
  };
  const classRows = byComp(input.classInd.length, (r) => input.classInd[r]!);
  const propRows = byComp(input.propSubj.length, (r) => input.propSubj[r]!);
  const sameRows = byComp(input.sameA.length, (r) => input.sameA[r]!);
  const diffRows = byComp(input.diffA.length, (r) => input.diffA[r]!);
  stats.components = comp.count;

  // A TBox with no individual can still be inconsistent (the domain is never empty): check one element with ⊤ only.
  if (comp.count === 0) {
    const r = chaseComponent(compiled, 1, () => {}, guard, plain, stats);
    return r.clash === undefined ? { status: 'ok', stats } : { status: 'inconsistent', clash: r.clash, stats };
  }

  // Isolated individuals with the same asserted classes have the same entailed classes: chase one per class set.
  const cache = new Map<string, number[] | ClashReport | null>();
  for (let c = 0; c < comp.count; c++) {
    const local = members[c]!;
    let key: string | null = null;
    if (local.length === 1 && propRows[c]!.length === 0 && !plain) {
      key = classRows[c]!.map((r) => classIds[input.classPred[r]!]!).sort((a, b) => a - b).join(',');
      const hit = cache.get(key);
      if (hit !== undefined) {
        stats.cachedComponents++;
        if (hit === null || !Array.isArray(hit)) return { status: 'inconsistent', clash: remap(hit, local), stats };
        for (const p of hit) sink.unary(compiled.unaryNames[p]!, local[0]!);
        continue;
      }
    }
    const localId = new Map<number, number>();
    local.forEach((g, i) => localId.set(g, i));
    const load = (chase: Chase) => {
      const st = chase.store;
      for (const r of classRows[c]!) { const p = classIds[input.classPred[r]!]!; if (p >= 0) st.addUnary(p, localId.get(input.classInd[r]!)!, -1); }
      for (const r of propRows[c]!) {
        const p = propIds[input.propPred[r]!]!;
        if (p >= 0) st.addBinary(p, localId.get(input.propSubj[r]!)!, localId.get(input.propObj[r]!)!, -1);
      }
      for (const r of diffRows[c]!) chase.addDistinct(localId.get(input.diffA[r]!)!, localId.get(input.diffB[r]!)!, -1);
      for (const r of sameRows[c]!) {
        const a = localId.get(input.sameA[r]!)!, b = localId.get(input.sameB[r]!)!;
        if (!chase.merge(a, b, -1, [a, b])) return;
      }
    };
    const result = chaseComponent(compiled, local.length, load, guard, plain, stats);
    if (result.clash !== undefined) {
      if (key !== null) cache.set(key, result.clash);
      return { status: 'inconsistent', clash: remap(result.clash, local), stats };
    }
    const names = compiled.unaryNames, roles = compiled.binaryNames;
    if (result.live) {
      const classes: number[] = [];
      forEachNamedFact(result.live, (p, e) => { sink.unary(names[p]!, local[e]!); if (key !== null) classes.push(p); },
        (p, x, y) => sink.binary(roles[p]!, local[x]!, local[y]!), (a, b) => sink.same(local[a]!, local[b]!));
      if (key !== null) cache.set(key, classes);
    } else {
      const facts = result.facts!;
      if (key !== null) cache.set(key, facts.unary.filter((_, i) => i % 2 === 0));
      for (let i = 0; i < facts.unary.length; i += 2) sink.unary(names[facts.unary[i]!]!, local[facts.unary[i + 1]!]!);
      for (let i = 0; i < facts.binary.length; i += 3) sink.binary(roles[facts.binary[i]!]!, local[facts.binary[i + 1]!]!, local[facts.binary[i + 2]!]!);
      for (let i = 0; i < facts.same.length; i += 2) sink.same(local[facts.same[i]!]!, local[facts.same[i + 1]!]!);
    }
    if (options.onComponent && (c & 255) === 255) await options.onComponent(c + 1, comp.count);
  }
  stats.branches = guard.branches;
  stats.anonymousElements = guard.anonymousElements;
  return { status: 'ok', stats };
}

function remap(clash: ClashReport | null, local: readonly number[]): ClashReport | null {
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
    const nums = k.slice(1).split(' ').map(Number);
    (k[0] === 'u' ? out.unary : k[0] === 'b' ? out.binary : out.same).push(...nums);
  }
  return out;
}

/** If the fact with this key holds in the chase's current branch, its dependency set; else -1. */
function holdsKey(chase: Chase, key: string): number {
  const st = chase.store, deps = chase.deps, nums = key.slice(1).split(' ').map(Number);
  const a = st.find(nums[0]!);
  if (key[0] === 's') return a === st.find(nums[1]!) ? deps.union(chase.chainDep(nums[0]!), chase.chainDep(nums[1]!)) : -1;
  const e = st.find(nums[1]!);
  if (key[0] === 'u') { const r = st.unaryRow(nums[0]!, e); return r < 0 ? -1 : deps.union(st.unaryDep[r]!, chase.chainDep(nums[1]!)); }
  const o = st.find(nums[2]!);
  const r = st.binaryRow(nums[0]!, e, o);
  return r < 0 ? -1 : deps.union(deps.union(st.binaryDep[r]!, chase.chainDep(nums[1]!)), chase.chainDep(nums[2]!));
}

/**
 * Chases one component. A model reached without any choice is the only one (always so for Horn programs).
 * Otherwise the facts true before the first choice are certain, and the candidates are the other facts of the first
 * model. Optimised: for each candidate f still open, search for a model with the ground constraint f → ⊥; if one
 * exists, f and every candidate it lacks are not entailed, else f is; each search backjumps to the choices f depends
 * on. Plain: one chronological search with the constraint "all remaining candidates → ⊥", shrinking the candidates
 * to what each new model shares with the earlier ones (at most |candidates| + 1 models).
 */
function chaseComponent(program: CompiledProgram, named: number, load: (c: Chase) => void, guard: Guard, plain: boolean, stats: EntailStats): { facts?: NamedFacts; live?: Chase; clash?: ClashReport | null } {
  const chase = new Chase(program, named, guard);
  load(chase);
  if (chase.clash !== null) return { clash: clashReport(chase) };
  let firstClash: ClashReport | null | undefined;
  let certain = new Set<string>();
  let candidates: string[] | null = null;
  let only = false;
  const onClash = (c: Chase) => { if (firstClash === undefined) firstClash = clashReport(c); };
  let models = search(chase, guard, {
    onRoot: (c) => { certain = keyOf(namedFacts(c)); },
    onClash,
    violated: plain ? (c) => allHold(c, candidates) : undefined,
    onModel: (c, choices) => {
      if (choices === 0 && candidates === null) { only = true; return true; }
      const model = keyOf(namedFacts(c));
      candidates = candidates === null ? [...model].filter((k) => !certain.has(k)) : candidates.filter((k) => model.has(k));
      return !plain || candidates.length === 0;
    },
  }, { backjump: !plain });
  if (models === 0) {
    stats.models += models;
    if (firstClash === undefined && chase.clash !== null) firstClash = clashReport(chase);
    return { clash: firstClash ?? null };
  }
  // The only model is still the chase's state (no choice to undo): its facts are read off the store directly.
  if (only) { stats.models += models; stats.storeBytes = Math.max(stats.storeBytes, chase.store.byteLength); return { live: chase }; }
  const entailed: string[] = [];
  if (!plain) {
    let open = candidates ?? [];
    while (open.length > 0) {
      const f = open.pop()!;
      let model: Set<string> | null = null;
      models += search(chase, guard, {
        violated: (c) => holdsKey(c, f),
        onModel: (c) => { model = keyOf(namedFacts(c)); return true; },
      });
      if (model === null) entailed.push(f);
      else { const m: Set<string> = model; open = open.filter((k) => m.has(k)); }
    }
  } else entailed.push(...(candidates ?? []));
  stats.models += models;
  stats.storeBytes = Math.max(stats.storeBytes, chase.store.byteLength);
  return { facts: factsOfKeys([...certain, ...entailed]) };
}

/** The plain path's constraint: -1 unless every remaining candidate holds (then -2: taken to depend on every choice). */
function allHold(chase: Chase, candidates: readonly string[] | null): number {
  if (candidates === null) return -1;
  for (const k of candidates) if (holdsKey(chase, k) < 0) return -1;
  return -2;
}
