// Finite interpretations for checking the normal form against the DL semantics (Description Logic Handbook ch. 2, Table 2.2).

import fc from 'fast-check';
import type { ClassExpression, PropertyRef } from '../../../reasoner/model/axioms.js';
import { FRESH_TOP, type NormalAxiom } from '../../../reasoner/model/normal.js';
import { EX } from './arbitraries.js';

const THING = 'http://www.w3.org/2002/07/owl#Thing', NOTHING = 'http://www.w3.org/2002/07/owl#Nothing';

/** An interpretation over domain {0, …, n−1}: classes as bit masks, properties as n×n boolean matrices. */
export interface Interpretation {
  readonly n: number;
  readonly classes: Map<string, number>;
  readonly properties: Map<string, boolean[][]>;
}

export const arbitraryInterpretation = (n: number): fc.Arbitrary<Interpretation> =>
  fc.record({
    classes: fc.tuple(...['A', 'B', 'C', 'D'].map(() => fc.nat((1 << n) - 1))),
    properties: fc.tuple(...['r', 's'].map(() => fc.array(fc.array(fc.boolean(), { minLength: n, maxLength: n }), { minLength: n, maxLength: n }))),
  }).map(({ classes, properties }) => ({
    n,
    classes: new Map(['A', 'B', 'C', 'D'].map((c, i) => [EX + c, classes[i]!])),
    properties: new Map(['r', 's'].map((p, i) => [EX + p, properties[i]!])),
  }));

const all = (I: Interpretation) => (1 << I.n) - 1;

function edge(I: Interpretation, p: PropertyRef, x: number, y: number): boolean {
  const m = I.properties.get(p.name);
  if (!m) return false;
  return p.inverse ? m[y]![x]! : m[x]![y]!;
}

/** Extension of a class name (⊤, ⊥ and FRESH_TOP included); unknown names are empty. */
export function nameExtension(I: Interpretation, name: string): number {
  if (name === THING || name === FRESH_TOP) return all(I);
  if (name === NOTHING) return 0;
  return I.classes.get(name) ?? 0;
}

/** Extension of a class expression as a bit mask. */
export function evaluate(I: Interpretation, c: ClassExpression): number {
  switch (c.kind) {
    case 'class': return nameExtension(I, c.name);
    case 'not': return all(I) & ~evaluate(I, c.operand);
    case 'and': return c.operands.reduce((m, o) => m & evaluate(I, o), all(I));
    case 'or': return c.operands.reduce((m, o) => m | evaluate(I, o), 0);
    case 'some': case 'all': case 'min': case 'max': case 'exact': {
      const f = c.kind === 'some' || c.kind === 'all' ? evaluate(I, c.filler) : c.filler ? evaluate(I, c.filler) : all(I);
      let out = 0;
      for (let x = 0; x < I.n; x++) {
        let k = 0, total = 0;
        for (let y = 0; y < I.n; y++) if (edge(I, c.property, x, y)) { total++; if (f & (1 << y)) k++; }
        const ok = c.kind === 'some' ? k >= 1 : c.kind === 'all' ? k === total : c.kind === 'min' ? k >= c.n : c.kind === 'max' ? k <= c.n : k === c.n;
        if (ok) out |= 1 << x;
      }
      return out;
    }
    default: throw new Error(`not evaluated: ${c.kind}`);
  }
}

/** Does the interpretation satisfy one normal-form axiom? */
export function satisfies(I: Interpretation, a: NormalAxiom): boolean {
  const ext = (n: string | null, none: number) => (n === null ? none : nameExtension(I, n));
  switch (a.kind) {
    case 'subsumption': {
      const body = a.body.reduce((m, b) => m & nameExtension(I, b), all(I));
      const head = a.head.reduce((m, h) => m | nameExtension(I, h), 0);
      return (body & ~head) === 0;
    }
    case 'propertyInclusion': {
      for (let x = 0; x < I.n; x++) for (let y = 0; y < I.n; y++) if (edge(I, a.sub, x, y) && !edge(I, a.sup, x, y)) return false;
      return true;
    }
    case 'propertyDisjointness': return true;
    default: {
      const sub = nameExtension(I, a.sub);
      const filler = a.kind === 'forall' ? ext(a.filler, 0) : ext(a.filler, all(I));
      const expr: ClassExpression = a.kind === 'exists' ? { kind: 'some', property: a.property, filler: mask(filler) }
        : a.kind === 'forall' ? { kind: 'all', property: a.property, filler: mask(filler) }
        : { kind: a.kind === 'atLeast' ? 'min' : 'max', n: a.n, property: a.property, filler: mask(filler) };
      return (sub & ~evaluate(withMask(I, filler), expr)) === 0;
    }
  }
}

// A filler given as a bit mask is evaluated through a reserved class name.
const MASK = '\u0002mask';
const mask = (_m: number): ClassExpression => ({ kind: 'class', name: MASK });
function withMask(I: Interpretation, m: number): Interpretation {
  const classes = new Map(I.classes);
  classes.set(MASK, m);
  return { ...I, classes };
}

/** Copy of I with extra class extensions. */
export function extend(I: Interpretation, extra: Map<string, number>): Interpretation {
  const classes = new Map(I.classes);
  for (const [k, v] of extra) classes.set(k, v);
  return { ...I, classes };
}
