// The rule language: atoms over unary (class) and binary (property) predicates, rules whose head is a disjunction of
// conjunctions with existential variables, equality ≈ and inequality ≉, and ⊥ as the empty head.

import { FRESH_PREFIX, type SourceRef } from '../model/normal.js';

/** Built-in predicates. `⊤` holds for every element (so an empty class body still binds its variable). */
export const TOP = '⊤';
export const EQUALS = '≈';
export const DISTINCT = '≉';

/** Returns true for the built-in predicates, which are never user vocabulary. */
export function isBuiltin(predicate: string): boolean {
  return predicate === TOP || predicate === EQUALS || predicate === DISTINCT;
}

/** An atom: a predicate applied to variables (the rewriting of a TBox needs no constants). */
export interface Atom {
  readonly predicate: string;
  readonly args: readonly string[];
}

/** One disjunct of a head: ∃ exists . atoms₁ ∧ … ∧ atomsₖ. */
export interface HeadDisjunct {
  readonly exists: readonly string[];
  readonly atoms: readonly Atom[];
}

/**
 * The shape of a rule, for statistics and for the engine's schedule (Datalog-first):
 * datalog (one disjunct, no ∃, no ≈), equality (one disjunct of ≈ only), disjunctive (two or more disjuncts),
 * existential (one disjunct with ∃), constraint (empty head, ⊥).
 */
export type RuleShape = 'datalog' | 'equality' | 'disjunctive' | 'existential' | 'constraint';

/** body₁ ∧ … ∧ bodyₙ → head₁ ∨ … ∨ headₘ; an empty head is ⊥. */
export interface Rule {
  readonly body: readonly Atom[];
  readonly head: readonly HeadDisjunct[];
  /** The normal-form axiom this rule comes from (null for built-in rules). */
  readonly source: SourceRef | null;
  /**
   * Variables the rule is symmetric in (renaming them among themselves gives the same rule, as for the successors
   * y₁…yₙ₊₁ of ≤n R.B): the chase matches them in one order only, which drops (n+1)! − 1 equivalent instances.
   */
  readonly symmetric?: readonly string[];
}

/** A rule program: rules plus the user vocabulary it is about (what may be read off as entailed facts). */
export interface RuleProgram {
  readonly rules: readonly Rule[];
  /** Unary predicates of the user vocabulary (class IRIs). */
  readonly classes: readonly string[];
  /** Binary predicates of the user vocabulary (object property IRIs). */
  readonly properties: readonly string[];
  /** True when no rule has a disjunctive head or an equality disjunction (the program is Horn). */
  readonly horn: boolean;
  /**
   * false: the program stops by its own rules (rewrite/disjunctive), so the engine runs the plain Datalog-first
   * restricted chase — no dynamic blocking, disjunctions before existentials, one trigger at a time — and records each
   * element it creates for x in `SUCCESSOR(x, y)`. Default true: the engine blocks dynamically.
   */
  readonly blocking?: boolean;
}

/** The successor relation the engine records for programs with `blocking: false` (a fresh name: never output). */
export const SUCCESSOR = FRESH_PREFIX + 'successor';

/** Returns the shape of a rule. */
export function ruleShape(rule: Rule): RuleShape {
  if (rule.head.length === 0) return 'constraint';
  if (rule.head.length > 1) return 'disjunctive';
  const only = rule.head[0]!;
  if (only.exists.length > 0) return 'existential';
  if (only.atoms.length > 0 && only.atoms.every((a) => a.predicate === EQUALS)) return 'equality';
  return 'datalog';
}

/** Returns the largest arity of any atom in the rule. */
export function ruleArity(rule: Rule): number {
  let arity = 0;
  for (const a of rule.body) arity = Math.max(arity, a.args.length);
  for (const d of rule.head) for (const a of d.atoms) arity = Math.max(arity, a.args.length);
  return arity;
}
