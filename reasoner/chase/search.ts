// The disjunctive chase as a depth-first search: branch on a recorded disjunction whose head does not hold yet
// (lazy branching, Motik et al. 2009 §5), undo to the choice point on ⊥, and report every complete open branch.

import type { Chase } from './engine.js';
import type { Guard } from './guard.js';

export interface SearchHooks {
  /** A complete branch that did not close (a model). Return true to stop; otherwise the branch is treated as closed. */
  onModel(chase: Chase, choices: number): boolean;
  /** Called once, before the first choice (the deterministic part is then saturated: its facts are certain). */
  onRoot?(chase: Chase): void;
  /** Called after each saturation; returning true closes the branch (the cautious loop's ground constraint). */
  violated?(chase: Chase): boolean;
  /** Called on each branch closed by ⊥, while the clashing facts are still in the store. */
  onClash?(chase: Chase): void;
}

export interface SearchOptions {
  /** Plain schedule: branch on disjunctions before creating elements (instead of Datalog-first and generation first). */
  readonly eager?: boolean;
}

interface ChoicePoint {
  readonly mark: ReturnType<Chase['mark']>;
  readonly instance: number;
  next: number;
  readonly count: number;
}

/** Runs saturation and generation rounds until nothing changes; false on ⊥. */
function run(chase: Chase, eager: boolean): boolean {
  for (;;) {
    if (!chase.saturate()) return false;
    if (eager && nextChoice(chase, false) >= 0) return true;
    if (chase.generate() === 0) return true;
  }
}

/** Returns the first recorded disjunction that does not hold, or -1; advances the cursor over the held prefix. */
function nextChoice(chase: Chase, advance = true): number {
  const list = chase.pending;
  let prefix = true;
  for (let i = chase.pendingCursor; i < list.length; i++) {
    const rule = chase.loadInstance(list, i);
    if (rule === null || chase.holds(rule)) { if (prefix && advance) chase.pendingCursor = i + 1; continue; }
    prefix = false;
    return i;
  }
  return -1;
}

/** Searches all branches (or until onModel stops it). Returns the number of models seen. */
export function search(chase: Chase, guard: Guard, hooks: SearchHooks, options: SearchOptions = {}): number {
  const eager = options.eager ?? false;
  const stack: ChoicePoint[] = [];
  let models = 0, rootSeen = false;
  let ok = run(chase, eager);
  for (;;) {
    if (ok && hooks.violated?.(chase)) ok = false;
    if (ok) {
      const choice = nextChoice(chase);
      if (choice < 0) {
        models++;
        if (hooks.onModel(chase, stack.length)) return models;
        ok = false;
      } else {
        if (!rootSeen) { rootSeen = true; hooks.onRoot?.(chase); }
        guard.branch();
        const rule = chase.loadInstance(chase.pending, choice)!;
        stack.push({ mark: chase.mark(), instance: choice, next: 0, count: rule.head.length });
        ok = chase.applyDisjunct(rule, 0) && run(chase, eager);
        continue;
      }
    } else if (chase.clash !== null) hooks.onClash?.(chase);
    // Backtrack to the newest choice point with an untried disjunct.
    for (;;) {
      const top = stack[stack.length - 1];
      if (top === undefined) return models;
      chase.undo(top.mark);
      if (++top.next < top.count) {
        guard.branch();
        const rule = chase.loadInstance(chase.pending, top.instance)!;
        ok = chase.applyDisjunct(rule, top.next) && run(chase, eager);
        break;
      }
      stack.pop();
    }
  }
}
