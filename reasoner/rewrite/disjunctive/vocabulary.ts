// Internal vocabulary of the published rewriting (Carral & Krötzsch, IJCAI 2020, in our reading): the copy of every
// class and role the model is built over, the "absent" predicates of the completion guesses, and the helper
// relations of type recognition. Every name is fresh (FRESH_PREFIX), so none is ever output as a fact.

import { FRESH_PREFIX } from '../../model/normal.js';
import type { Atom } from '../../rules/types.js';

/**
 * The successor relation: the engine records `SUCCESSOR(x, y)` for every element y it creates for x when it runs a
 * program with `blocking: false` (rules/types.ts). Rules read it; no rule derives it.
 */
export { SUCCESSOR } from '../../rules/types.js';

const internal = (kind: string, name: string) => `${FRESH_PREFIX}${kind}:${name}`;

/** Internal copy of class C (the model is built over these; C itself is read off at the end). */
export const inClass = (c: string) => internal('in', c);
/** Completion guess: C is absent at this element. */
export const absentClass = (c: string) => internal('absent', c);
/**
 * Views of a role fact R(s, t): `subjectView` is the fact as the subject s sees it, `objectView` as the object t sees
 * it. A genuine edge has both; a copied successor edge only the view of the element it was copied to (see README,
 * "The published rewriting"). Each axiom reads the view of the element it is about.
 */
export const subjectView = (r: string) => internal('sees-as-subject', r);
export const objectView = (r: string) => internal('sees-as-object', r);
/** Completion guesses on a successor pair (x, y): R(x, y) absent, resp. R(y, x) absent. */
export const absentDown = (r: string) => internal('absent-down', r);
export const absentUp = (r: string) => internal('absent-up', r);
/** y was created by the chase (it has a predecessor). */
export const ANONYMOUS = FRESH_PREFIX + 'anonymous';
/** The element has generated a successor (only such elements are compared as the source of copies). */
export const GENERATING = FRESH_PREFIX + 'generating';
/** Step k of the chained comparison of two elements' types (bounded-size rules over the signature). */
export const sameUpTo = (k: number) => internal('same-type-step', String(k));
/** Two anonymous elements with anonymous predecessors and the same pairwise type. */
export const SAME_TYPE = FRESH_PREFIX + 'same-type';

export const unary = (predicate: string, x: string): Atom => ({ predicate, args: [x] });
export const binary = (predicate: string, x: string, y: string): Atom => ({ predicate, args: [x, y] });
