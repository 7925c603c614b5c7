// Entailed facts over named individuals: the ABox split into connected components (independent, as ALCHIQ has no
// nominals), each chased on its own; Horn programs need one branch, disjunctive ones a cautious-consequence search.

import type { Guard } from './guard.js';
import { compileProgram } from './program.js';
import { remap, runComponent, type ComponentTask, type LocalSink } from './component.js';
import { runInWorkers } from './pool.js';
import type { ResourceLimits } from '../api.js';
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
  /** Published rewriting only: merges outside its exactness argument (Chase.offTree). */
  copiedMerges: number;
  models: number;
  cachedComponents: number;
  /** Largest fact store of one component, in bytes (columns, indexes and hash tables). */
  storeBytes: number;
  /** Worker threads used (1: all on the calling thread). */
  threads: number;
}

export interface EntailOptions {
  readonly guard: Guard;
  /** 'optimised' (components, certain facts, caching of isolated individuals) or 'plain' (one chase over the whole ABox). */
  readonly path?: 'optimised' | 'plain';
  /** Called between components with the fraction done; may await so that cancellation can be seen. */
  readonly onComponent?: (done: number, total: number) => void | Promise<void>;
  /** Worker threads for components (default 1: none). */
  readonly threads?: number;
  /** Below this many input facts outside isolated individuals, no worker is started (startup costs more). */
  readonly minFactsForThreads?: number;
  /** Passed to the workers, which run their own guards; cancelling terminates them at once. */
  readonly limits?: ResourceLimits;
  readonly signal?: AbortSignal;
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
  const full: RuleProgram = { ...program, classes: [...program.classes, ...input.classNames], properties: [...program.properties, ...input.propertyNames] };
  const compiled = compileProgram(full);
  const stats: EntailStats = { components: 0, branches: 0, anonymousElements: 0, copiedMerges: 0, models: 0, cachedComponents: 0, storeBytes: 0, threads: 1 };
  const classIds = input.classNames.map((c) => compiled.unaryIds.get(c) ?? -1);
  const propIds = input.propertyNames.map((p) => compiled.binaryIds.get(p) ?? -1);
  const plain = options.path === 'plain';
  const guard = options.guard;
  const names = compiled.unaryNames, roles = compiled.binaryNames;

  // Group the rows by component (counting sort), so each component's facts are contiguous.
  const comp = plain ? { of: new Int32Array(input.individuals), count: input.individuals > 0 ? 1 : 0 } : components(input);
  const members: number[][] = Array.from({ length: comp.count }, () => []);
  for (let i = 0; i < input.individuals; i++) members[comp.of[i]!]!.push(i);
  const byComp = (n: number, owner: (row: number) => number) => {
    const lists: number[][] = Array.from({ length: comp.count }, () => []);
    for (let r = 0; r < n; r++) lists[comp.of[owner(r)]!]!.push(r);
    return lists;
  };
  const classRows = byComp(input.classInd.length, (r) => input.classInd[r]!);
  const propRows = byComp(input.propSubj.length, (r) => input.propSubj[r]!);
  const sameRows = byComp(input.sameA.length, (r) => input.sameA[r]!);
  const diffRows = byComp(input.diffA.length, (r) => input.diffA[r]!);
  stats.components = comp.count;
  const none = new Int32Array(0);

  // A TBox with no individual can still be inconsistent (the domain is never empty): check one element with ⊤ only.
  if (comp.count === 0) {
    const clash = runComponent(compiled, { named: 1, unary: none, binary: none, same: none, different: none }, guard, plain, stats, { unary() {}, binary() {}, same() {} });
    return clash === undefined ? { status: 'ok', stats } : { status: 'inconsistent', clash, stats };
  }

  /** The component's rows over local ids. */
  const task = (c: number): ComponentTask => {
    const local = members[c]!, localId = new Map<number, number>();
    local.forEach((g, i) => localId.set(g, i));
    const unary: number[] = [], binary: number[] = [], same: number[] = [], different: number[] = [];
    for (const r of classRows[c]!) { const p = classIds[input.classPred[r]!]!; if (p >= 0) unary.push(p, localId.get(input.classInd[r]!)!); }
    for (const r of propRows[c]!) { const p = propIds[input.propPred[r]!]!; if (p >= 0) binary.push(p, localId.get(input.propSubj[r]!)!, localId.get(input.propObj[r]!)!); }
    for (const r of sameRows[c]!) same.push(localId.get(input.sameA[r]!)!, localId.get(input.sameB[r]!)!);
    for (const r of diffRows[c]!) different.push(localId.get(input.diffA[r]!)!, localId.get(input.diffB[r]!)!);
    return { named: local.length, unary: Int32Array.from(unary), binary: Int32Array.from(binary), same: Int32Array.from(same), different: Int32Array.from(different) };
  };
  const emitter = (local: readonly number[], classes?: number[]): LocalSink => ({
    unary: (p, e) => { sink.unary(names[p]!, local[e]!); classes?.push(p); },
    binary: (p, x, y) => sink.binary(roles[p]!, local[x]!, local[y]!),
    same: (a, b) => sink.same(local[a]!, local[b]!),
  });

  // Isolated individuals with the same asserted classes have the same entailed classes: chase one per class set.
  // The other components go to worker threads when there are enough of them, else they run here.
  const cache = new Map<string, number[] | ClashReport | null>();
  const rest: number[] = [];
  let restSize = 0;
  for (let c = 0; c < comp.count; c++) {
    const local = members[c]!;
    if (plain || local.length !== 1 || propRows[c]!.length !== 0 || sameRows[c]!.length !== 0 || diffRows[c]!.length !== 0) {
      rest.push(c); restSize += classRows[c]!.length + propRows[c]!.length; continue;
    }
    const key = classRows[c]!.map((r) => classIds[input.classPred[r]!]!).sort((a, b) => a - b).join(',');
    let hit = cache.get(key);
    if (hit === undefined) {
      const classes: number[] = [];
      const clash = runComponent(compiled, task(c), guard, plain, stats, emitter(local, classes));
      hit = clash === undefined ? classes : clash;
      cache.set(key, hit);
      if (clash !== undefined) return { status: 'inconsistent', clash: remap(clash, local), stats };
      continue;
    }
    stats.cachedComponents++;
    if (!Array.isArray(hit)) return { status: 'inconsistent', clash: remap(hit, local), stats };
    for (const p of hit) sink.unary(names[p]!, local[0]!);
  }

  // Workers also when there is one thread but a signal: a worker can be terminated mid-component, this thread cannot.
  const threads = Math.max(1, Math.min(options.threads ?? 1, rest.length));
  if ((threads > 1 || options.signal !== undefined) && restSize >= (options.minFactsForThreads ?? 200_000)) {
    stats.threads = threads;
    const outcome = await runInWorkers(full, rest.map(task), threads, { limits: options.limits, path: options.path, signal: options.signal }, (i, result) => {
      const local = members[rest[i]!]!;
      if ('clash' in result) return remap(result.clash, local);
      const out = emitter(local);
      for (let k = 0; k < result.unary.length; k += 2) out.unary(result.unary[k]!, result.unary[k + 1]!);
      for (let k = 0; k < result.binary.length; k += 3) out.binary(result.binary[k]!, result.binary[k + 1]!, result.binary[k + 2]!);
      for (let k = 0; k < result.same.length; k += 2) out.same(result.same[k]!, result.same[k + 1]!);
      return undefined;
    }, options.onComponent);
    stats.branches += outcome.stats.branches; stats.anonymousElements += outcome.stats.anonymousElements; stats.copiedMerges += outcome.stats.copiedMerges; stats.models += outcome.stats.models;
    stats.storeBytes = Math.max(stats.storeBytes, outcome.stats.storeBytes);
    if (outcome.clash !== undefined) return { status: 'inconsistent', clash: outcome.clash, stats };
  } else {
    for (let k = 0; k < rest.length; k++) {
      const c = rest[k]!, local = members[c]!;
      const clash = runComponent(compiled, task(c), guard, plain, stats, emitter(local));
      if (clash !== undefined) return { status: 'inconsistent', clash: remap(clash, local), stats };
      if (options.onComponent && (k & 255) === 255) await options.onComponent(k + 1, rest.length);
    }
  }
  stats.branches += guard.branches;
  stats.anonymousElements += guard.anonymousElements;
  stats.copiedMerges += guard.copiedMerges;
  return { status: 'ok', stats };
}
