// The published rewriting of ALCHIQ into disjunctive existential rules whose plain restricted chase terminates
// (D. Carral, M. Krötzsch, "Rewriting the Description Logic ALCHIQ to Disjunctive Existential Rules", IJCAI 2020),
// in our own formulation: the model is built over an internal copy of the vocabulary; every created element is
// completed by present/absent guesses; elements of the same pairwise type are recognised by chained rules of
// bounded size, and the generated successors of one are copied to the other, so that the Datalog-first restricted
// chase finds every existential satisfied and stops. The argument is in reasoner/README.md, "The published rewriting
// (plain path)".

import { FRESH_TOP, type NormalAxiom, type NormalOntology, type PropertyRef } from '../../model/normal.js';
import { DISTINCT, EQUALS, TOP, type Atom, type Rule, type RuleProgram } from '../../rules/types.js';
import { SUCCESSOR } from '../../rules/types.js';
import {
  ANONYMOUS, GENERATING, SAME_TYPE, absentClass, absentDown, absentUp, binary, inClass, objectView, sameUpTo, subjectView, unary,
} from './vocabulary.js';


/** The role fact p(x, y) as the element `who` (x or y) sees it: the subject view or the object view of the role name. */
function seen(p: PropertyRef, x: string, y: string, who: string): Atom {
  const [s, t] = p.inverse ? [y, x] : [x, y];
  return binary(who === s ? subjectView(p.name) : objectView(p.name), s, t);
}

const fact = (atoms: Atom[]) => ({ exists: [] as string[], atoms });
const classBody = (names: readonly string[], v: string): Atom[] => (names.length === 0 ? [unary(TOP, v)] : names.map((n) => unary(inClass(n), v)));

/**
 * The rules of one normal-form axiom over the internal vocabulary. Each reads the role view of the element the axiom
 * is about (x), so a copied successor edge counts for x — where the existential it satisfies lives — and for no other.
 */
export function rulesOfAxiom(axiom: NormalAxiom): Rule[] {
  const source = axiom.source;
  switch (axiom.kind) {
    case 'subsumption':
      return [{ body: classBody(axiom.body, 'x'), head: axiom.head.map((c) => fact([unary(inClass(c), 'x')])), source }];
    case 'exists': {
      const atoms = [seen(axiom.property, 'x', 'y', 'x')];
      if (axiom.filler !== null) atoms.push(unary(inClass(axiom.filler), 'y'));
      return [{ body: classBody([axiom.sub], 'x'), head: [{ exists: ['y'], atoms }], source }];
    }
    case 'forall':
      return [{
        body: [...classBody([axiom.sub], 'x'), seen(axiom.property, 'x', 'y', 'x')],
        head: axiom.filler === null ? [] : [fact([unary(inClass(axiom.filler), 'y')])],
        source,
      }];
    case 'atLeast': {
      const ys = Array.from({ length: axiom.n }, (_, i) => `y${i + 1}`);
      const atoms: Atom[] = [];
      for (const y of ys) {
        atoms.push(seen(axiom.property, 'x', y, 'x'));
        if (axiom.filler !== null) atoms.push(unary(inClass(axiom.filler), y));
      }
      for (let i = 0; i < ys.length; i++) for (let j = i + 1; j < ys.length; j++) atoms.push(binary(DISTINCT, ys[i]!, ys[j]!));
      return [{ body: classBody([axiom.sub], 'x'), head: [{ exists: ys, atoms }], source }];
    }
    case 'atMost': {
      const ys = Array.from({ length: axiom.n + 1 }, (_, i) => `y${i + 1}`);
      const body = classBody([axiom.sub], 'x');
      for (const y of ys) {
        body.push(seen(axiom.property, 'x', y, 'x'));
        if (axiom.filler !== null) body.push(unary(inClass(axiom.filler), y));
      }
      const head = [];
      for (let i = 0; i < ys.length; i++) for (let j = i + 1; j < ys.length; j++) head.push(fact([binary(EQUALS, ys[i]!, ys[j]!)]));
      return [axiom.n === 0 ? { body, head, source } : { body, head, source, symmetric: ys }];
    }
    case 'propertyInclusion':
      // Both views follow the inclusion, each for its own element.
      return ['x', 'y'].map((who) => ({ body: [seen(axiom.sub, 'x', 'y', who)], head: [fact([seen(axiom.sup, 'x', 'y', who)])], source }));
    case 'propertyDisjointness':
      return ['x', 'y'].map((who) => ({ body: [seen(axiom.properties[0], 'x', 'y', who), seen(axiom.properties[1], 'x', 'y', who)], head: [], source }));
  }
}

/**
 * Every class and role name the axioms mention, with the user vocabulary; and the names to guess at created elements.
 * Classes: those with a positive occurrence (a head: they can arrive at an element later) and a negative one (a body:
 * they change what happens there). A class with no positive occurrence is never true at a created element (absent, no
 * guess needed); one with no negative occurrence changes nothing where it holds (a model stays a model when it is
 * added), so neither needs a guess nor a place in the type comparison. Roles: all of them — leaving out a role with no
 * negative occurrence lost models in a differential sweep (README, "The published rewriting"), so roles are not pruned.
 */
export function signature(normal: NormalOntology): { classes: string[]; roles: string[]; guessedClasses: string[]; guessedRoles: string[] } {
  const classes = new Set<string>(normal.classes), roles = new Set<string>(normal.properties);
  const pos = new Set<string>(), neg = new Set<string>();
  const c = (name: string, into: Set<string>) => { classes.add(name); into.add(name); };
  const r = (p: PropertyRef) => { roles.add(p.name); };
  for (const a of normal.axioms) {
    switch (a.kind) {
      case 'subsumption': a.body.forEach((x) => c(x, neg)); a.head.forEach((x) => c(x, pos)); break;
      case 'exists': case 'atLeast': case 'forall': c(a.sub, neg); r(a.property); if (a.filler !== null) c(a.filler, pos); break;
      case 'atMost': c(a.sub, neg); r(a.property); if (a.filler !== null) c(a.filler, neg); break;
      case 'propertyInclusion': r(a.sub); r(a.sup); break;
      case 'propertyDisjointness': r(a.properties[0]); r(a.properties[1]); break;
    }
  }
  return {
    classes: [...classes],
    roles: [...roles],
    guessedClasses: [...classes].filter((x) => x !== FRESH_TOP && pos.has(x) && neg.has(x)),
    guessedRoles: [...roles],
  };
}

/** Rules that are not about one axiom: input copy, read-off, successor views, completion, type recognition, copying. */
function frameworkRules(sig: ReturnType<typeof signature>, userClasses: readonly string[], userRoles: readonly string[]): Rule[] {
  const { classes, roles, guessedClasses: guessed, guessedRoles } = sig;
  const rules: Rule[] = [];
  const add = (body: Atom[], head: Atom[][]) => rules.push({ body, head: head.map(fact), source: null });
  const succ = (x: string, y: string) => binary(SUCCESSOR, x, y);

  // Input facts keep the original names and are copied into the internal vocabulary; facts over the original names
  // are read back off at the end (only those of named individuals are output). A genuine edge has both views.
  // Input facts may use fresh names too (complex class assertions become X(a) with a fresh X), so every name of
  // the signature is copied in; only user names are read off.
  for (const c of classes) add([unary(c, 'x')], [[unary(inClass(c), 'x')]]);
  for (const r of roles) add([binary(r, 'x', 'y')], [[binary(subjectView(r), 'x', 'y'), binary(objectView(r), 'x', 'y')]]);
  for (const c of userClasses) add([unary(inClass(c), 'x')], [[unary(c, 'x')]]);
  for (const r of userRoles) add([binary(subjectView(r), 'x', 'y'), binary(objectView(r), 'x', 'y')], [[binary(r, 'x', 'y')]]);
  // A created element and its predecessor see every edge between them: the views agree on successor pairs.
  add([succ('x', 'y')], [[unary(ANONYMOUS, 'y')]]);
  for (const r of roles) {
    for (const [s, t] of [['x', 'y'], ['y', 'x']] as const) {
      add([succ('x', 'y'), binary(subjectView(r), s, t)], [[binary(objectView(r), s, t)]]);
      add([succ('x', 'y'), binary(objectView(r), s, t)], [[binary(subjectView(r), s, t)]]);
    }
  }
  // Completion: every relevant class (see `signature`) at every created element, and every role in both directions
  // towards its predecessor, is guessed absent or present — absent first, so that the first branch
  // holds only what is forced and types stay few; constraints reject a guess that the axioms contradict later.
  for (const c of guessed) {
    add([unary(ANONYMOUS, 'y')], [[unary(absentClass(c), 'y')], [unary(inClass(c), 'y')]]);
    add([unary(inClass(c), 'y'), unary(absentClass(c), 'y')], []);
  }
  for (const r of guessedRoles) {
    add([succ('x', 'y')], [[binary(absentDown(r), 'x', 'y')], [binary(subjectView(r), 'x', 'y')]]);
    add([binary(subjectView(r), 'x', 'y'), binary(absentDown(r), 'x', 'y')], []);
    add([succ('x', 'y')], [[binary(absentUp(r), 'x', 'y')], [binary(subjectView(r), 'y', 'x')]]);
    add([binary(subjectView(r), 'y', 'x'), binary(absentUp(r), 'x', 'y')], []);
  }
  // Type recognition, chained over the signature (each rule of bounded size): y and z, both with created
  // predecessors p and q, agree on every relevant class, p and q agree on every relevant class, and the edges p–y
  // equal q–z. Only elements z that have generated successors are compared: copying (below) reads nothing else, and
  // so the comparison holds |elements| × |generating elements| pairs rather than |elements|².
  let k = 0;
  add([succ('x', 'y')], [[unary(GENERATING, 'x')]]);
  add([succ('p', 'y'), unary(ANONYMOUS, 'p'), succ('q', 'z'), unary(ANONYMOUS, 'q'), unary(GENERATING, 'z')], [[binary(sameUpTo(0), 'y', 'z')]]);
  const step = (extra: (present: boolean) => Atom[]) => {
    for (const present of [true, false]) add([binary(sameUpTo(k), 'y', 'z'), ...extra(present)], [[binary(sameUpTo(k + 1), 'y', 'z')]]);
    k++;
  };
  const parents = [succ('p', 'y'), succ('q', 'z')];
  for (const c of guessed) step((present) => [unary(present ? inClass(c) : absentClass(c), 'y'), unary(present ? inClass(c) : absentClass(c), 'z')]);
  for (const c of guessed) step((present) => [...parents, unary(present ? inClass(c) : absentClass(c), 'p'), unary(present ? inClass(c) : absentClass(c), 'q')]);
  for (const r of guessedRoles) {
    step((present) => present ? [...parents, binary(subjectView(r), 'p', 'y'), binary(subjectView(r), 'q', 'z')] : [...parents, binary(absentDown(r), 'p', 'y'), binary(absentDown(r), 'q', 'z')]);
    step((present) => present ? [...parents, binary(subjectView(r), 'y', 'p'), binary(subjectView(r), 'z', 'q')] : [...parents, binary(absentUp(r), 'p', 'y'), binary(absentUp(r), 'q', 'z')]);
  }
  add([binary(sameUpTo(k), 'y', 'z')], [[binary(SAME_TYPE, 'y', 'z')]]);
  // Monotone blocking: the generated successors of an element are copied to every element of the same type, as
  // edges only that element sees (they satisfy its existentials and its universals and at-most restrictions read
  // them, but the copied successor never sees the copy, so nothing is sent back and nothing counts twice there).
  for (const r of roles) {
    add([binary(SAME_TYPE, 'x', 'w'), succ('w', 'z'), binary(subjectView(r), 'w', 'z')], [[binary(subjectView(r), 'x', 'z')]]);
    add([binary(SAME_TYPE, 'x', 'w'), succ('w', 'z'), binary(objectView(r), 'z', 'w')], [[binary(objectView(r), 'z', 'x')]]);
  }
  return rules;
}

/**
 * Rewrites a normal-form ontology into the rule program of the published rewriting. Run it with the engine's dynamic
 * blocking off (`blocking: false`): its chase stops by these rules alone. The program is polynomial in the ontology
 * (quadratic only through ≥n/≤n pairs, as in the per-axiom rewriting) and every rule has bounded size except those.
 */
export function rewriteToTerminatingRules(normal: NormalOntology): RuleProgram {
  const rules = [...normal.axioms.flatMap(rulesOfAxiom), ...frameworkRules(signature(normal), normal.classes, normal.properties)];
  return { rules, classes: normal.classes, properties: normal.properties, horn: false, blocking: false };
}
