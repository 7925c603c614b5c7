// Rewriting of the ALCHIQ normal form into rules (DL-clauses in the sense of Motik, Shearer, Horrocks, JAIR 2009, §3):
// one rule per normal-form axiom, of size linear in the axiom (so the program is linear in the ontology).

import type { NormalAxiom, NormalOntology, PropertyRef } from '../model/normal.js';
import type { RewritingStats } from '../api.js';
import { DISTINCT, EQUALS, TOP, ruleArity, ruleShape, type Atom, type Rule, type RuleProgram } from '../rules/types.js';

/** R(s, t), or R(t, s) for an inverse property R⁻ (inverses are never a predicate of their own). */
function role(p: PropertyRef, s: string, t: string): Atom {
  return p.inverse ? { predicate: p.name, args: [t, s] } : { predicate: p.name, args: [s, t] };
}

const cls = (name: string, v: string): Atom => ({ predicate: name, args: [v] });

/** The body atom of a class name, ⊤(x) for the empty body so that x stays bound. */
function classBody(names: readonly string[], v: string): Atom[] {
  return names.length === 0 ? [cls(TOP, v)] : names.map((n) => cls(n, v));
}

/**
 * Returns the rule of one normal-form axiom:
 * - B₁ ⊓ … ⊓ Bₙ ⊑ C₁ ⊔ … ⊔ Cₘ   becomes  B₁(x) ∧ … ∧ Bₙ(x) → C₁(x) ∨ … ∨ Cₘ(x)   (⊥ when m = 0);
 * - A ⊑ ∃R.B                   becomes  A(x) → ∃y. R(x, y) ∧ B(y);
 * - A ⊑ ∀R.B                   becomes  A(x) ∧ R(x, y) → B(y)   (⊥ for ∀R.⊥);
 * - A ⊑ ≥n R.B                 becomes  A(x) → ∃y₁…yₙ. ⋀ R(x, yᵢ) ∧ B(yᵢ) ∧ ⋀_{i<j} yᵢ ≉ yⱼ;
 * - A ⊑ ≤n R.B                 becomes  A(x) ∧ ⋀_{i≤n+1} R(x, yᵢ) ∧ B(yᵢ) → ⋁_{i<j} yᵢ ≈ yⱼ   (⊥ for n = 0);
 * - R ⊑ S                      becomes  R(x, y) → S(x, y)  (inverses swap the arguments);
 * - R, S disjoint              becomes  R(x, y) ∧ S(x, y) → ⊥.
 */
export function ruleOfAxiom(axiom: NormalAxiom): Rule {
  const source = axiom.source;
  switch (axiom.kind) {
    case 'subsumption':
      return { body: classBody(axiom.body, 'x'), head: axiom.head.map((c) => ({ exists: [], atoms: [cls(c, 'x')] })), source };
    case 'exists': {
      const atoms = [role(axiom.property, 'x', 'y')];
      if (axiom.filler !== null) atoms.push(cls(axiom.filler, 'y'));
      return { body: classBody([axiom.sub], 'x'), head: [{ exists: ['y'], atoms }], source };
    }
    case 'forall':
      return {
        body: [...classBody([axiom.sub], 'x'), role(axiom.property, 'x', 'y')],
        head: axiom.filler === null ? [] : [{ exists: [], atoms: [cls(axiom.filler, 'y')] }],
        source,
      };
    case 'atLeast': {
      const ys = Array.from({ length: axiom.n }, (_, i) => `y${i + 1}`);
      const atoms: Atom[] = [];
      for (const y of ys) {
        atoms.push(role(axiom.property, 'x', y));
        if (axiom.filler !== null) atoms.push(cls(axiom.filler, y));
      }
      for (let i = 0; i < ys.length; i++) for (let j = i + 1; j < ys.length; j++) atoms.push({ predicate: DISTINCT, args: [ys[i]!, ys[j]!] });
      return { body: classBody([axiom.sub], 'x'), head: [{ exists: ys, atoms }], source };
    }
    case 'atMost': {
      const ys = Array.from({ length: axiom.n + 1 }, (_, i) => (axiom.n === 0 ? 'y' : `y${i + 1}`));
      const body: Atom[] = classBody([axiom.sub], 'x');
      for (const y of ys) {
        body.push(role(axiom.property, 'x', y));
        if (axiom.filler !== null) body.push(cls(axiom.filler, y));
      }
      const head = [];
      for (let i = 0; i < ys.length; i++) for (let j = i + 1; j < ys.length; j++) head.push({ exists: [], atoms: [{ predicate: EQUALS, args: [ys[i]!, ys[j]!] }] });
      return axiom.n === 0 ? { body, head, source } : { body, head, source, symmetric: ys };
    }
    case 'propertyInclusion':
      return { body: [role(axiom.sub, 'x', 'y')], head: [{ exists: [], atoms: [role(axiom.sup, 'x', 'y')] }], source };
    case 'propertyDisjointness':
      return { body: [role(axiom.properties[0], 'x', 'y'), role(axiom.properties[1], 'x', 'y')], head: [], source };
  }
}

/** Rewrites a normal-form ontology into a rule program (one rule per axiom; see `ruleOfAxiom`). */
export function rewriteOntology(normal: NormalOntology): RuleProgram {
  const rules = normal.axioms.map(ruleOfAxiom);
  const horn = rules.every((r) => r.head.length <= 1);
  return { rules, classes: normal.classes, properties: normal.properties, horn };
}

/** Statistics of a rule program against the normal form it came from. */
export function rewritingStats(program: RuleProgram, normalAxioms: number): RewritingStats {
  const byShape: Record<string, number> = { datalog: 0, existential: 0, disjunctive: 0, equality: 0, constraint: 0 };
  let largestBody = 0, largestArity = 0;
  for (const r of program.rules) {
    const shape = ruleShape(r);
    byShape[shape] = (byShape[shape] ?? 0) + 1;
    largestBody = Math.max(largestBody, r.body.length);
    largestArity = Math.max(largestArity, ruleArity(r));
  }
  return { normalAxioms, rules: program.rules.length, byShape, largestBody, largestArity };
}
