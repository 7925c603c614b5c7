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
  const stack: ChoicePoint[] = [];
  let models = 0, rootSeen = false;
  chase.level = 0;
  let ok = run(chase), closedBy = 0;
  const finish = () => { if (stack.length > 0) chase.undo(stack[0]!.mark); chase.level = 0; return models; };
  const apply = (top: ChoicePoint): boolean => {
    guard.branch();
    const rule = chase.loadInstance(chase.pending, top.instance)!;
    chase.level = stack.length;
    const d = options.reverse ? top.count - 1 - top.next : top.next;
    return chase.applyDisjunct(rule, d, deps.union(top.instanceDep, deps.single(stack.length))) && run(chase);
  };
  for (;;) {
    if (ok && hooks.violated) { const d = hooks.violated(chase); if (d !== -1) { ok = false; closedBy = d >= 0 ? d : -1; } }
    else if (!ok) closedBy = chase.clash?.dep ?? 0;
    if (ok) {
      const choice = nextChoice(chase);
      if (choice < 0 && !chase.program.blocking && chase.generate() > 0) { ok = run(chase); continue; }
      if (choice < 0) {
        models++;
        if (hooks.onModel(chase, stack.length)) return finish();
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
