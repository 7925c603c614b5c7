// Number restrictions read by counting (reasoner/chase/counting.ts) against clingo from Debian as the outside
// reference: random knowledge bases with ≤n up to n = 4 (the other suites draw n ≤ 2), qualified or not, over up to
// eight named individuals with many property facts, with disjunction and differentFrom. No existential rule, so the
// direct ASP encoding (tests/reference/asp-reference.ts) is exact, and its cautious consequences are Ent(O, D).
import { expect, it } from 'vitest';
import fc from 'fast-check';
import { atMost, describeKb, engineFacts, incl, only, sortedFacts, sub } from './kb-tools.js';
import { aspProgram, clingoFacts, type TinyKb } from '../../reference/asp-reference.js';

const individual = fc.integer({ min: 0, max: 7 }).map((i) => `i${i}`);
const cls = fc.integer({ min: 0, max: 3 }).map((i) => `A${i}`);
const propName = fc.integer({ min: 0, max: 1 }).map((i) => `R${i}`);
const prop = fc.record({ name: propName, inverse: fc.boolean() });
const kb: fc.Arbitrary<TinyKb> = fc.record({
  axioms: fc.array(fc.oneof(
    fc.tuple(fc.array(cls, { maxLength: 2 }), fc.array(cls, { maxLength: 2 })).map(([b, h]) => sub([...new Set(b)], [...new Set(h)])),
    fc.tuple(cls, fc.integer({ min: 1, max: 4 }), prop, fc.option(cls, { freq: 2 })).map(([a, n, r, b]) => atMost(a, n, r, b)),
    fc.tuple(cls, prop, cls).map(([a, r, b]) => only(a, r, b)),
    fc.tuple(prop, prop).map(([r, s]) => incl(r, s)),
  ), { minLength: 1, maxLength: 6 }),
  classFacts: fc.array(fc.tuple(cls, individual), { minLength: 1, maxLength: 10 }),
  // Subjects i0 and i1 only, so that a few centres get many successors.
  propertyFacts: fc.array(fc.tuple(propName, fc.integer({ min: 0, max: 1 }).map((i) => `i${i}`), individual), { maxLength: 14 }),
  different: fc.array(fc.tuple(individual, individual).filter(([a, b]) => a !== b), { maxLength: 3 }),
});

it('≤n up to 4 over many named successors: both paths give clingo\'s cautious consequences (600 random)', async () => {
  await fc.assert(fc.asyncProperty(kb, async (k) => {
    const reference = sortedFacts(clingoFacts(aspProgram(k)));
    expect(sortedFacts(await engineFacts(k)), describeKb(k)).toBe(reference);
    expect(sortedFacts(await engineFacts(k, 'plain')), describeKb(k)).toBe(reference);
  }), { numRuns: 600, seed: 20261202 });
}, 300_000);
