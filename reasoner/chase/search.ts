// The disjunctive chase as a depth-first search: branch on a recorded disjunction whose head does not hold yet
// (lazy branching, Motik, Shearer, Horrocks, JAIR 2009, §5), and on ⊥ jump back to the newest choice point the clash
// depends on (backjumping, ibid. §5.1), trying its next disjunct; report every complete open branch.

import type { Chase } from './engine.js';
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
   * Start from a model kept by an earlier search (same `reverse`): the new hooks' constraint is checked there first
   * and the search backjumps only as far as it depends. The earlier search's constraint is dropped, so the disjuncts
   * it ruled out are not tried again: a model found is a model, but finding none proves nothing (search afresh).
   */
  readonly resume?: KeptSearch;
  /** Give up (as if no model existed, so proving nothing) after this many branches. */
  readonly budget?: number;
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
  chase.level = 0;
}

interface ChoicePoint {
  readonly mark: ReturnType<Chase['mark']>;
  readonly instance: number;
  readonly instanceDep: number;
  next: number;
  readonly count: number;
  /** Union of the dependency sets of the clashes of the disjuncts tried so far, without this level. */
  failDep: number;
}

/** Runs saturation and generation rounds until nothing changes; false on ⊥. */
function run(chase: Chase): boolean {
  for (;;) {
    if (!chase.saturate()) return false;
    // Blocking off (a self-terminating program): disjunctions are non-generating and go before existentials;
    // generation happens in `search` once no disjunction is open.
    if (!chase.program.blocking) return true;
    if (chase.generate() === 0) return true;
  }
}

/** Returns the first recorded disjunction that does not hold, or -1; advances the cursor over the held prefix. */
function nextChoice(chase: Chase): number {
  const list = chase.pending;
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
  const deps = chase.deps;
  const resumed = options.resume?.active === true;
  const stack: ChoicePoint[] = resumed ? options.resume!.stack : [];
  if (options.resume) options.resume.stack = [];
  for (const top of stack) top.failDep = 0;
  let models = 0, rootSeen = resumed;
  chase.level = stack.length;
  let ok = resumed || run(chase), closedBy = 0;
  const finish = () => { if (stack.length > 0) chase.undo(stack[0]!.mark); chase.level = 0; return models; };
  const apply = (top: ChoicePoint): boolean => {
    guard.branch();
    const rule = chase.loadInstance(chase.pending, top.instance)!;
    chase.level = stack.length;
    const d = options.reverse ? top.count - 1 - top.next : top.next;
    return chase.applyDisjunct(rule, d, deps.union(top.instanceDep, deps.single(stack.length))) && run(chase);
  };
  const lastBranch = options.budget === undefined ? Infinity : guard.branches + options.budget;
  for (;;) {
    if (guard.branches > lastBranch) return finish();
    if (ok && hooks.violated) { const d = hooks.violated(chase); if (d !== -1) { ok = false; closedBy = d >= 0 ? d : -1; } }
    else if (!ok) closedBy = chase.clash?.dep ?? 0;
    if (ok) {
      const choice = nextChoice(chase);
      if (choice < 0 && !chase.program.blocking && chase.generate() > 0) { ok = run(chase); continue; }
      if (choice < 0) {
        models++;
        if (hooks.onModel(chase, stack.length)) {
          if (options.keep && stack.length > 0) { options.keep.stack = stack; return models; }
          return finish();
        }
        ok = false;
        closedBy = -1; // a model closed by the caller depends on every choice
      } else {
        if (!rootSeen) { rootSeen = true; hooks.onRoot?.(chase); }
        const rule = chase.loadInstance(chase.pending, choice)!;
        stack.push({ mark: chase.mark(), instance: choice, instanceDep: chase.instanceDep, next: 0, count: rule.head.length, failDep: 0 });
        ok = apply(stack[stack.length - 1]!);
        continue;
      }
    } else if (chase.clash !== null) hooks.onClash?.(chase);
    // Backjump: to the newest choice point the closing facts depend on (chronologically when not backjumping).
    let dep = closedBy;
    for (;;) {
      if (stack.length === 0) return finish();
      const level = !backjump || dep < 0 ? stack.length : deps.newest(dep);
      if (level === 0) { return finish(); }  // the clash follows from the input alone: no branch can avoid it
      stack.length = level;
      const top = stack[level - 1]!;
      top.failDep = dep < 0 || top.failDep < 0 ? -1 : deps.union(top.failDep, deps.below(dep, level));
      chase.undo(top.mark);
      if (++top.next < top.count) { ok = apply(top); break; }
      // Every disjunct failed: the failure depends on what the clashes depended on, and on the instance itself.
      dep = top.failDep < 0 ? -1 : deps.union(top.failDep, top.instanceDep);
      stack.pop();
    }
  }
}
