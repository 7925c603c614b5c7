// The disjunctive chase as a depth-first search: branch on a recorded disjunction whose head does not hold yet
// (lazy branching, Motik, Shearer, Horrocks, JAIR 2009, §5), and on ⊥ jump back to the newest choice point the clash
// depends on (backjumping, ibid. §5.1), trying its next disjunct; report every complete open branch.

import type { Chase } from './engine.js';
import { EQUAL } from './program.js';
import type { Guard } from './guard.js';

export interface SearchHooks {
  /** A complete branch that did not close (a model). Return true to stop; otherwise the branch is treated as closed. */
  onModel(chase: Chase, choices: number): boolean;
  /** Called once, before the first choice (the deterministic part is then saturated: its facts are certain). */
  onRoot?(chase: Chase): void;
  /**
   * Called after each saturation: a ground constraint of the caller. Returns -1 if it holds, else the dependency set
   * of the facts that violate it (the branch then closes as on ⊥), or -2 when that is unknown (every choice).
   */
  violated?(chase: Chase): number;
  /** Called on each branch closed by ⊥, while the clashing facts are still in the store. */
  onClash?(chase: Chase): void;
}

export interface SearchOptions {
  /** Jump back over choice points a clash does not depend on (default true); false: chronological backtracking. */
  readonly backjump?: boolean;
  /** Try the disjuncts of each choice last to first (a search then tends to find a model unlike the default one). */
  readonly reverse?: boolean;
  /**
   * Stay in the model when onModel stops the search, and record the choices in this object, so that a later search
   * can start from that model instead of the root (`resume`). The caller ends it with `leave`.
   */
  readonly keep?: KeptSearch;
  /**
   * Start from a state kept by an earlier search (same `reverse`): a model, or the choices below a level that search
   * exhausted. The new hooks' constraint is checked there first and the search backjumps only as far as it depends.
   * Each kept choice point then tries its disjuncts in turn from the one it holds, the ones the earlier search had
   * already left included, so every disjunct is tried under the new constraint and finding no model is as
   * conclusive as from the root.
   */
  readonly resume?: KeptSearch;
  /** Give up after this many branches (returning no model, which then proves nothing). */
  readonly budget?: number;
  /**
   * With `keep`, a search that ends without a model by a proof (the constraint fails whatever the choices) keeps the
   * choices below the last level undone — a consistent state of earlier choices — for a later search to resume
   * from; with `keepPartial` also one that runs out of budget (it keeps the choices below its newest level).
   */
  readonly keepPartial?: boolean;
  /**
   * Recorded disjunctions to branch on first while they are open (instance indices; any order of choices is
   * complete): for a candidate's proof, the choices its fact depended on in an earlier model, so that the proof
   * decides them before re-deciding the unrelated choices a backjump undid above them.
   */
  readonly focus?: readonly number[];
  /**
   * After the root (blocking on): an element that can be blocked (anonymous, with an anonymous parent) gets its
   * successors only once no disjunction is open anywhere, so its label is complete and blocking finds its blocker
   * before it expands, not after a subtree built on a partial label (README, "Deep elements generate last"). Named
   * elements and their direct successors, which are never blocked, still generate at once, as does the root.
   */
  readonly deferDeep?: boolean;
}

/** The choice stack of a model a search stopped in (see `keep`). */
export class KeptSearch {
  stack: ChoicePoint[] = [];
  get active(): boolean { return this.stack.length > 0; }
}

/** Undoes a kept model back to the state before its first choice. */
export function leave(chase: Chase, kept: KeptSearch): void {
  if (kept.stack.length > 0) chase.undo(kept.stack[0]!.mark);
  kept.stack = [];
}

interface ChoicePoint {
  readonly mark: ReturnType<Chase['mark']>;
  readonly instance: number;
  readonly instanceDep: number;
  /** The disjunct tried first in this search, and how many have been tried since (in turn, from `start`). */
  start: number;
  tried: number;
  readonly count: number;
  /** Union of the dependency sets of the clashes of the disjuncts tried so far, without this level. */
  failDep: number;
}

/**
 * Runs saturation and generation rounds until nothing changes; false on ⊥. With `deferDeep`, elements that can be
 * blocked do not generate here: they wait for `search` to find no disjunction open.
 */
function run(chase: Chase, deferDeep: boolean): boolean {
  for (;;) {
    if (!chase.saturate()) return false;
    // Blocking off (a self-terminating program): disjunctions are non-generating and go before existentials;
    // generation happens in `search` once no disjunction is open.
    if (!chase.program.blocking) return true;
    if (chase.generate(deferDeep) === 0) return true;
  }
}

/**
 * Returns the first recorded disjunction that does not hold (focused ones first), or -1; advances the cursor
 * over the held prefix. On a self-terminating program (blocking off) equality disjunctions (the ≤n rules) go first:
 * merges are then decided before the merged elements' completion guesses and the copies those bring (README, "A case
 * found by a sweep").
 */
function nextChoice(chase: Chase, focus: readonly number[] | undefined): number {
  const list = chase.pending;
  if (!chase.program.blocking) {
    const rules = chase.program.rules;
    for (let i = chase.pendingCursor; i < list.length; i++) {
      if (rules[list.rules[i]!]!.head[0]?.atoms[0]?.kind !== EQUAL) continue; // before loading: most are guesses
      const rule = chase.loadInstance(list, i);
      if (rule !== null && !chase.holds(rule)) return i;
    }
  }
  // Focused disjunctions after the equality ones: the order the self-terminating program's argument needs stays.
  if (focus !== undefined) for (const i of focus) {
    if (i < chase.pendingCursor || i >= list.length) continue;
    const rule = chase.loadInstance(list, i);
    if (rule !== null && !chase.holds(rule)) return i;
  }
  let prefix = true;
  for (let i = chase.pendingCursor; i < list.length; i++) {
    const rule = chase.loadInstance(list, i);
    if (rule === null || chase.holds(rule)) { if (prefix) chase.pendingCursor = i + 1; continue; }
    prefix = false;
    return i;
  }
  return -1;
}

/**
 * Searches the branches from the chase's current state (until onModel stops it). On return the chase is back in its
 * state before the first choice (saturated). Returns the number of models seen.
 */
export function search(chase: Chase, guard: Guard, hooks: SearchHooks, options: SearchOptions = {}): number {
  const backjump = options.backjump ?? true;
  const deferDeep = options.deferDeep === true && chase.program.blocking;
  const deps = chase.deps;
  const resumed = options.resume?.active === true;
  const stack: ChoicePoint[] = resumed ? options.resume!.stack : [];
  if (options.resume) options.resume.stack = [];
  for (const top of stack) { top.start = (top.start + top.tried) % top.count; top.tried = 0; top.failDep = 0; }
  let models = 0, rootSeen = resumed;
  let ok = resumed || run(chase, false), closedBy = 0;
  const finish = () => { if (stack.length > 0) chase.undo(stack[0]!.mark); return models; };
  /** Ends the search keeping the choices on the stack (the store holds the state they make) in `keep`. */
  const keepStack = (keep: KeptSearch) => { keep.stack = stack; return models; };
  const apply = (top: ChoicePoint): boolean => {
    guard.branch();
    const rule = chase.loadInstance(chase.pending, top.instance)!;
    const next = (top.start + top.tried) % top.count;
    // Reversed, each group of the head is reversed on its own: the quiet disjuncts still go first (CompiledRule.quiet).
    const d = !options.reverse ? next : next < rule.quiet ? rule.quiet - 1 - next : top.count - 1 - (next - rule.quiet);
    return chase.applyDisjunct(rule, d, deps.union(top.instanceDep, deps.single(stack.length))) && run(chase, deferDeep);
  };
  const lastBranch = options.budget === undefined ? Infinity : guard.branches + options.budget;
  for (;;) {
    if (guard.branches > lastBranch) {
      // Out of budget: with `keep`, the choices below the newest level stay (a consistent state) for a later search.
      if (!options.keep || !options.keepPartial || stack.length === 0) return finish();
      chase.undo(stack.pop()!.mark);
      return keepStack(options.keep);
    }
    if (ok && hooks.violated) { const d = hooks.violated(chase); if (d !== -1) { ok = false; closedBy = d >= 0 ? d : -1; } }
    else if (!ok) closedBy = chase.clash?.dep ?? 0;
    if (ok) {
      const choice = nextChoice(chase, options.focus);
      if (choice < 0 && (deferDeep || !chase.program.blocking) && chase.generate() > 0) { ok = run(chase, deferDeep); continue; }
      if (choice < 0) {
        models++;
        if (hooks.onModel(chase, stack.length)) {
          if (options.keep && stack.length > 0) return keepStack(options.keep);
          return finish();
        }
        ok = false;
        closedBy = -1; // a model closed by the caller depends on every choice
      } else {
        if (!rootSeen) { rootSeen = true; hooks.onRoot?.(chase); }
        const rule = chase.loadInstance(chase.pending, choice)!;
        stack.push({ mark: chase.mark(), instance: choice, instanceDep: chase.instanceDep, start: 0, tried: 0, count: rule.head.length, failDep: 0 });
        ok = apply(stack[stack.length - 1]!);
        continue;
      }
    } else if (chase.clash !== null) hooks.onClash?.(chase);
    // Backjump: to the newest choice point the closing facts depend on (chronologically when not backjumping).
    let dep = closedBy, undone = false;
    for (;;) {
      if (stack.length === 0) return finish();
      const level = !backjump || dep < 0 ? stack.length : deps.newest(dep);
      if (level === 0) {
        // The clash follows from the input alone: no branch can avoid it. With `keep`, the choices below the last
        // level undone stay (a consistent state of the earlier choices) for a later search to resume from.
        if (!options.keep) return finish();
        if (!undone) chase.undo(stack.pop()!.mark);
        return keepStack(options.keep);
      }
      stack.length = level;
      const top = stack[level - 1]!;
      top.failDep = dep < 0 || top.failDep < 0 ? -1 : deps.union(top.failDep, deps.below(dep, level));
      chase.undo(top.mark);
      undone = true;
      if (++top.tried < top.count) { ok = apply(top); break; }
      // Every disjunct failed: the failure depends on what the clashes depended on, and on the instance itself.
      dep = top.failDep < 0 ? -1 : deps.union(top.failDep, top.instanceDep);
      stack.pop();
    }
  }
}
