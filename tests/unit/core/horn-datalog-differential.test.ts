// The Horn path against the chase: the Datalog rewriting (reasoner/rewrite/horn) run by the engine must give the same
// entailed facts, sameAs and consistency verdict as the one-rule-per-axiom program chased with anonymous elements
// (whose exactness is checked against clingo in reasoner-core-clingo.test.ts), on random Horn-ALCHIQ knowledge bases
// with inverses, role hierarchies, ≤1 / ≤0, ≥n, cyclic existentials and ⊥; and it must create no anonymous element.

import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { describeKb, tinyKb, some, only, atMost, atLeast, incl, role, sub, type KbShape, normalOf, programFacts, sortedFacts } from './kb-tools.js';
import { rewriteOntology } from '../../../reasoner/rewrite/rules-from-normal.js';
import { rewriteHornToDatalog } from '../../../reasoner/rewrite/horn/index.js';
import { ruleShape } from '../../../reasoner/rules/types.js';
import type { TinyKb } from '../../reference/asp-reference.js';

const limits = { maxElements: 50_000, timeoutMs: 20_000 };

/** Both programs on one knowledge base: equal facts (or both inconsistent), no anonymous element on the Datalog side. */
async function agree(kb: TinyKb): Promise<string> {
  const normal = normalOf(kb);
  const datalog = rewriteHornToDatalog(normal);
  for (const r of datalog.rules) expect(['datalog', 'equality', 'constraint']).toContain(ruleShape(r));
  const viaChase = await programFacts(rewriteOntology(normal), kb, limits);
  const viaDatalog = await programFacts(datalog, kb, limits);
  expect(viaDatalog.anonymous).toBe(0);
  expect(sortedFacts(viaDatalog.facts), describeKb(kb)).toBe(sortedFacts(viaChase.facts));
  return sortedFacts(viaDatalog.facts);
}

const horn = (s: Omit<KbShape, 'disjunctive' | 'existential'>): KbShape => ({ ...s, disjunctive: false, existential: true });

describe('Horn Datalog rewriting against the chase', () => {
  it('agrees on 1200 random Horn-ALCHIQ knowledge bases (4 classes, 2 properties, cyclic existentials)', async () => {
    await fc.assert(fc.asyncProperty(tinyKb(horn({ classes: 4, properties: 2, individuals: 3, axioms: 7, facts: 5 })), async (kb) => { await agree(kb); }),
      { numRuns: 1200, seed: 4711 });
  }, 120_000);

  it('agrees on 800 denser ones (3 classes, 12 axioms: more ≤1, inverses and hierarchy per class)', async () => {
    await fc.assert(fc.asyncProperty(tinyKb(horn({ classes: 3, properties: 2, individuals: 3, axioms: 12, facts: 5 })), async (kb) => { await agree(kb); }),
      { numRuns: 800, seed: 5 });
  }, 120_000);

  it('agrees on 500 with three properties and more individuals', async () => {
    await fc.assert(fc.asyncProperty(tinyKb(horn({ classes: 4, properties: 3, individuals: 5, axioms: 9, facts: 8 })), async (kb) => { await agree(kb); }),
      { numRuns: 500, seed: 31 });
  }, 120_000);

  // Fixed cases, kept from shrinking or written to reach a part of the interface the random cases rarely reach.
  const R = role('R0'), Rinv = role('R0', true), S = role('S'), T = role('T'), Q = role('Q');

  it('fixed (shrunk): ∃R⁻.A with ≤1 R⁻ identifies the successor with the named R⁻-neighbour', async () => {
    // A ⊑ ∃R⁻.A, A ⊑ ≤1 R⁻.⊤, A ⊑ ∃R.A, R(i1, i0), A(i0): i1 is i0's only R⁻-neighbour, so A(i1).
    const kb: TinyKb = { axioms: [some('A0', Rinv, 'A0'), atMost('A0', 1, Rinv, null), some('A0', R, 'A0')], classFacts: [['A0', 'i0']], propertyFacts: [['R0', 'i1', 'i0']] };
    expect(await agree(kb)).toContain('A0(i1)');
  });

  it('fixed (shrunk): ≤0 R⁻.A with an ∃R.A successor makes an element counted by its successor inconsistent', async () => {
    const kb: TinyKb = { axioms: [atMost('A3', 0, role('R1', true), 'A3'), some('A0', role('R1'), 'A3')], classFacts: [['A3', 'i2'], ['A0', 'i2']], propertyFacts: [] };
    expect(await agree(kb)).toBe('inconsistent');
  });

  it('fixed: siblings from different axioms identified by ≤1 at a third class send back what only their union implies', async () => {
    // A ⊑ ∃R.B, C ⊑ ∃R.D, M ⊑ ≤1 R.⊤, B ⊓ D ⊑ E, E ⊑ ∀R⁻.F; A(a), C(a), M(a) ⊨ F(a).
    const kb: TinyKb = {
      axioms: [some('A', R, 'B'), some('C', R, 'D'), atMost('M', 1, R, null), sub(['B', 'D'], ['E']), only('E', Rinv, 'F')],
      classFacts: [['A', 'a'], ['C', 'a'], ['M', 'a']], propertyFacts: [],
    };
    expect(await agree(kb)).toContain('F(a)');
  });

  it('fixed: a grandchild identified with the named element widens the edge to the child (inverse ≤1, hierarchy)', async () => {
    // A ⊑ ∃R.B, R ⊑ S⁻, B ⊑ ∃T.C, T ⊑ S, T ⊑ Q, B ⊑ ≤1 S.⊤, K ⊑ ∀Q⁻.G, G ⊑ ∀R⁻.H; A(a), K(a) ⊨ H(a), C(a):
    // the T-successor of the child is a (its only S-neighbour besides), so a Q⁻ child, which gets G and sends H.
    const kb: TinyKb = {
      axioms: [some('A', R, 'B'), incl(R, role('S', true)), some('B', T, 'C'), incl(T, S), incl(T, Q), atMost('B', 1, S, null), only('K', role('Q', true), 'G'), only('G', Rinv, 'H')],
      classFacts: [['A', 'a'], ['K', 'a']], propertyFacts: [],
    };
    const facts = await agree(kb);
    expect(facts).toContain('H(a)');
    expect(facts).toContain('C(a)');
  });

  it('fixed: ≥2 R.B against ≤1 R.B is inconsistent; against ≤1 R.C with B, C unrelated it is not', async () => {
    expect(await agree({ axioms: [atLeast('A', 2, R, 'B'), atMost('A', 1, R, 'B')], classFacts: [['A', 'a']], propertyFacts: [] })).toBe('inconsistent');
    expect(await agree({ axioms: [atLeast('A', 2, R, 'B'), atMost('A', 1, R, 'C')], classFacts: [['A', 'a']], propertyFacts: [] })).toBe('A(a)');
  });

  it('fixed: ≤1 counts through the role hierarchy: the ∃R successor is the named S-successor when R ⊑ S', async () => {
    const kb: TinyKb = { axioms: [some('A', R, 'B'), incl(R, S), atMost('A', 1, S, null), only('B', Rinv, 'Z')], classFacts: [['A', 'a']], propertyFacts: [['S', 'a', 'b']] };
    const facts = await agree(kb);
    expect(facts).toContain('B(b)');
    expect(facts).toContain('R0(a,b)');
    expect(facts).toContain('Z(a)');
  });

  it('fixed: two named successors under ≤1 are the same individual (sameAs both ways)', async () => {
    const facts = await agree({ axioms: [atMost('A', 1, R, null)], classFacts: [['A', 'a']], propertyFacts: [['R0', 'a', 'b'], ['R0', 'a', 'c']] });
    expect(facts).toContain('b=c');
    expect(facts).toContain('c=b');
  });

  it('fixed: a TBox whose ⊤ is unsatisfiable through a successor makes every knowledge base inconsistent', async () => {
    expect(await agree({ axioms: [sub([], ['A']), some('A', R, 'B'), sub(['B'], [])], classFacts: [['C', 'a']], propertyFacts: [] })).toBe('inconsistent');
  });
});
