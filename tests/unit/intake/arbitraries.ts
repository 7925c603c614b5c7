// fast-check generators of ALCHIQ class expressions over a small vocabulary (shared by the intake tests).

import fc from 'fast-check';
import type { ClassExpression, PropertyRef } from '../../../reasoner/model/axioms.js';

export const EX = 'http://example.org/x#';

const className = fc.constantFrom('A', 'B', 'C', 'D').map((n): ClassExpression => ({ kind: 'class', name: EX + n }));
const special = fc.constantFrom<ClassExpression>(
  { kind: 'class', name: 'http://www.w3.org/2002/07/owl#Thing' },
  { kind: 'class', name: 'http://www.w3.org/2002/07/owl#Nothing' },
);
export const arbitraryProperty: fc.Arbitrary<PropertyRef> = fc.record({ name: fc.constantFrom('r', 's').map((n) => EX + n), inverse: fc.boolean() });

/** Random ALCHIQ class expressions of bounded depth (every constructor of the issue: ¬ ⊓ ⊔ ∃ ∀ ≥ ≤ =, inverses, ⊤, ⊥). */
export function arbitraryClassExpression(depth: number): fc.Arbitrary<ClassExpression> {
  const { expr } = fc.letrec<{ expr: ClassExpression }>((tie) => ({
    expr: fc.oneof(
      { depthSize: 'small', maxDepth: depth },
      { arbitrary: className, weight: 4 },
      { arbitrary: special, weight: 1 },
      { arbitrary: tie('expr').map((operand): ClassExpression => ({ kind: 'not', operand })), weight: 2 },
      { arbitrary: fc.array(tie('expr'), { minLength: 2, maxLength: 3 }).map((operands): ClassExpression => ({ kind: 'and', operands })), weight: 2 },
      { arbitrary: fc.array(tie('expr'), { minLength: 2, maxLength: 3 }).map((operands): ClassExpression => ({ kind: 'or', operands })), weight: 2 },
      { arbitrary: fc.tuple(arbitraryProperty, tie('expr')).map(([property, filler]): ClassExpression => ({ kind: 'some', property, filler })), weight: 2 },
      { arbitrary: fc.tuple(arbitraryProperty, tie('expr')).map(([property, filler]): ClassExpression => ({ kind: 'all', property, filler })), weight: 2 },
      {
        arbitrary: fc.tuple(fc.constantFrom('min', 'max', 'exact') as fc.Arbitrary<'min' | 'max' | 'exact'>, fc.nat(3), arbitraryProperty, fc.option(tie('expr'), { nil: null }))
          .map(([kind, n, property, filler]): ClassExpression => ({ kind, n, property, filler })),
        weight: 2,
      },
    ),
  }));
  return expr;
}

/** Number of constructors and names in an expression (the input size for linearity checks). */
export function expressionSize(c: ClassExpression): number {
  switch (c.kind) {
    case 'class': return 1;
    case 'not': return 1 + expressionSize(c.operand);
    case 'and': case 'or': return 1 + c.operands.reduce((s, o) => s + expressionSize(o), 0);
    case 'some': case 'all': return 2 + expressionSize(c.filler);
    case 'min': case 'max': case 'exact': return 2 + (c.filler ? expressionSize(c.filler) : 1);
    default: return 1;
  }
}

const individual = fc.oneof(fc.constantFrom('a', 'b', 'c').map((n) => EX + n), fc.constantFrom('_:x', '_:y'));
const literal = fc.record({
  lexical: fc.string({ maxLength: 12 }),
  kind: fc.constantFrom('plain', 'lang', 'typed'),
}).map(({ lexical, kind }) => (kind === 'plain' ? { lexical, datatype: 'http://www.w3.org/2001/XMLSchema#string' }
  : kind === 'lang' ? { lexical, datatype: 'http://www.w3.org/1999/02/22-rdf-syntax-ns#langString', lang: 'en-gb' }
  : { lexical, datatype: 'http://www.w3.org/2001/XMLSchema#integer' }));
const dataProperty = fc.constantFrom('age', 'name').map((n) => EX + n);
const annotation = fc.record({ property: fc.constant('http://www.w3.org/2000/01/rdf-schema#comment'), value: literal.map((l) => ({ kind: 'literal' as const, literal: l })), annotations: fc.constant([]) });

/** Random axioms of most kinds (class, property, assertion, data, annotation), as the parser would build them. */
export function arbitraryAxiomBody(): fc.Arbitrary<Record<string, unknown>> {
  const ce = arbitraryClassExpression(2);
  const p = arbitraryProperty;
  return fc.oneof(
    fc.record({ kind: fc.constant('SubClassOf'), sub: ce, sup: ce }),
    fc.record({ kind: fc.constantFrom('EquivalentClasses', 'DisjointClasses'), classes: fc.array(ce, { minLength: 2, maxLength: 3 }) }),
    fc.record({ kind: fc.constant('DisjointUnion'), cls: fc.constant(EX + 'U'), classes: fc.array(ce, { minLength: 2, maxLength: 3 }) }),
    fc.record({ kind: fc.constant('SubObjectPropertyOf'), sub: p, sup: p }),
    fc.record({ kind: fc.constant('SubObjectPropertyChainOf'), chain: fc.array(p, { minLength: 2, maxLength: 3 }), sup: p }),
    fc.record({ kind: fc.constantFrom('EquivalentObjectProperties', 'DisjointObjectProperties'), properties: fc.array(p, { minLength: 2, maxLength: 3 }) }),
    fc.record({ kind: fc.constant('InverseObjectProperties'), first: p, second: p }),
    fc.record({ kind: fc.constantFrom('ObjectPropertyDomain', 'ObjectPropertyRange'), property: p, cls: ce }),
    fc.record({ kind: fc.constantFrom('FunctionalObjectProperty', 'InverseFunctionalObjectProperty', 'ReflexiveObjectProperty', 'IrreflexiveObjectProperty', 'SymmetricObjectProperty', 'AsymmetricObjectProperty', 'TransitiveObjectProperty'), property: p }),
    fc.record({ kind: fc.constant('HasKey'), cls: ce, objectProperties: fc.array(p, { maxLength: 2 }), dataProperties: fc.array(dataProperty, { maxLength: 2 }) }),
    fc.record({ kind: fc.constantFrom('SameIndividual', 'DifferentIndividuals'), individuals: fc.array(individual, { minLength: 2, maxLength: 3 }) }),
    fc.record({ kind: fc.constant('ClassAssertion'), cls: ce, individual }),
    fc.record({ kind: fc.constantFrom('ObjectPropertyAssertion', 'NegativeObjectPropertyAssertion'), property: p, subject: individual, object: individual }),
    fc.record({ kind: fc.constantFrom('DataPropertyAssertion', 'NegativeDataPropertyAssertion'), property: dataProperty, subject: individual, value: literal }),
    fc.record({ kind: fc.constant('DataPropertyRange'), property: dataProperty, range: fc.constant({ kind: 'datatypeRestriction', datatype: 'http://www.w3.org/2001/XMLSchema#integer', facets: [{ facet: 'http://www.w3.org/2001/XMLSchema#minInclusive', value: { lexical: '18', datatype: 'http://www.w3.org/2001/XMLSchema#integer' } }] }) }),
    fc.record({ kind: fc.constant('SubClassOf'), sub: ce, sup: fc.record({ kind: fc.constant('dataSome'), properties: fc.constant([EX + 'age']), range: fc.constant({ kind: 'datatype', name: 'http://www.w3.org/2001/XMLSchema#integer' }) }) }),
  ).chain((body) => fc.array(annotation, { maxLength: 1 }).map((annotations) => ({ ...body, annotations })));
}
