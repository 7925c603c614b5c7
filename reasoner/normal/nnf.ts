// Negation normal form of class expressions (Description Logic Handbook ch. 2), with the ⊤/⊥ simplifications the normaliser relies on.

import type { ClassExpression } from '../model/axioms.js';
import { OWL_NOTHING, OWL_THING } from '../model/vocabulary.js';

export const TOP: ClassExpression = { kind: 'class', name: OWL_THING };
export const BOTTOM: ClassExpression = { kind: 'class', name: OWL_NOTHING };

export const isTop = (c: ClassExpression): boolean => c.kind === 'class' && c.name === OWL_THING;
export const isBottom = (c: ClassExpression): boolean => c.kind === 'class' && c.name === OWL_NOTHING;

/**
 * Returns the NNF of `c` (of ¬c when `negate`). Guarantees on the result:
 * negation only in front of class names or of constructs outside ALCHIQ (nominals, self, data);
 * no `exact` (=n R.C becomes ≥n R.C ⊓ ≤n R.C); `min` only with n ≥ 2 (≥1 is ∃, ≥0 is ⊤);
 * `max` only with n ≥ 1 (≤0 R.C is ∀R.¬C); unqualified fillers become ⊤; conjunctions and disjunctions
 * are flattened, with ⊤/⊥ absorbed (so ⊤ and ⊥ only appear as a whole expression or as a filler).
 * Iterative depth is bounded by the input's (the parsers cap nesting).
 */
export function nnf(c: ClassExpression, negate = false): ClassExpression {
  switch (c.kind) {
    case 'class':
      if (!negate) return c;
      if (c.name === OWL_THING) return BOTTOM;
      if (c.name === OWL_NOTHING) return TOP;
      return { kind: 'not', operand: c };
    case 'not':
      return nnf(c.operand, !negate);
    case 'and': case 'or': {
      const conjunction = (c.kind === 'and') !== negate;
      return junction(conjunction, c.operands.map((o) => nnf(o, negate)));
    }
    case 'some': case 'all': {
      const existential = (c.kind === 'some') !== negate;
      return restriction(existential ? 'some' : 'all', c.property, nnf(c.filler, negate));
    }
    case 'min': {
      const filler = c.filler ? nnf(c.filler) : TOP;
      if (!negate) return atLeast(c.n, c.property, filler);
      return c.n === 0 ? BOTTOM : atMost(c.n - 1, c.property, filler);   // ¬≥n R.C = ≤(n−1) R.C
    }
    case 'max': {
      const filler = c.filler ? nnf(c.filler) : TOP;
      return negate ? atLeast(c.n + 1, c.property, filler) : atMost(c.n, c.property, filler);   // ¬≤n R.C = ≥(n+1) R.C
    }
    case 'exact': {
      const filler = c.filler ? nnf(c.filler) : TOP;
      if (!negate) return junction(true, [atLeast(c.n, c.property, filler), atMost(c.n, c.property, filler)]);
      const below = c.n === 0 ? BOTTOM : atMost(c.n - 1, c.property, filler);
      return junction(false, [below, atLeast(c.n + 1, c.property, filler)]);
    }
    default:
      // Outside ALCHIQ (nominals, self restrictions, data restrictions): kept as an opaque literal.
      return negate ? { kind: 'not', operand: c } : c;
  }
}

/** Flattens and simplifies ⊓ (conjunction = true) or ⊔. */
function junction(conjunction: boolean, operands: ClassExpression[]): ClassExpression {
  const flat: ClassExpression[] = [];
  const kind = conjunction ? 'and' : 'or';
  for (const o of operands) {
    if (conjunction ? isTop(o) : isBottom(o)) continue;
    if (conjunction ? isBottom(o) : isTop(o)) return o;
    if (o.kind === kind) flat.push(...o.operands);
    else flat.push(o);
  }
  if (flat.length === 0) return conjunction ? TOP : BOTTOM;
  if (flat.length === 1) return flat[0]!;
  return { kind, operands: flat };
}

function restriction(kind: 'some' | 'all', property: Property, filler: ClassExpression): ClassExpression {
  if (kind === 'some' && isBottom(filler)) return BOTTOM;   // ∃R.⊥ = ⊥
  if (kind === 'all' && isTop(filler)) return TOP;          // ∀R.⊤ = ⊤
  return { kind, property, filler };
}

type Property = Extract<ClassExpression, { kind: 'some' }>['property'];

function atLeast(n: number, property: Property, filler: ClassExpression): ClassExpression {
  if (n === 0) return TOP;
  if (isBottom(filler)) return BOTTOM;
  if (n === 1) return restriction('some', property, filler);
  return { kind: 'min', n, property, filler };
}

function atMost(n: number, property: Property, filler: ClassExpression): ClassExpression {
  if (isBottom(filler)) return TOP;                          // ≤n R.⊥ = ⊤
  if (n === 0) return restriction('all', property, nnf(filler, true));   // ≤0 R.C = ∀R.¬C
  return { kind: 'max', n, property, filler };
}
