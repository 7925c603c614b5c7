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
