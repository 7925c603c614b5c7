// Differential tests of the chase: the plain execution (one chase over the whole ABox, every fact of the first model a
// candidate of the cautious search) against the optimised path (connected components chased apart, facts before the
// first choice taken as certain, isolated individuals with equal classes chased once), on random ALCHIQ knowledge
// bases with inverses, number restrictions and cyclic existentials. Both must terminate and agree.

import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { describeKb, engineFacts, tinyKb, some, only, atMost, role, sub } from './kb-tools.js';

const sorted = (s: Set<string> | null) => (s === null ? 'inconsistent' : [...s].sort().join(' '));
const limits = { maxBranches: 200_000, maxElements: 50_000, timeoutMs: 20_000 };

describe('plain against optimised chase', () => {
  it('agrees on 2500 random small ALCHIQ knowledge bases with cyclic existentials', async () => {
    await fc.assert(fc.asyncProperty(tinyKb({ classes: 4, properties: 2, individuals: 3, axioms: 6, facts: 4, disjunctive: true, existential: true }), async (kb) => {
      const plain = await engineFacts(kb, 'plain', limits);
      const optimised = await engineFacts(kb, 'optimised', limits);
      expect(sorted(optimised), describeKb(kb)).toBe(sorted(plain));
    }), { numRuns: 2500, seed: 4242 });
  }, 120_000);

  // Larger components (24 individuals, up to 50 facts) with a case split at every individual (⊤ ⊑ A₀ ⊔ A₁), so
  // that components hold dozens of candidate facts: the optimised path's grouped, budgeted and resumed searches
  // (chase/component.ts) against the plain path's single chronological search.
  it('agrees on 250 random knowledge bases with large components and a case split everywhere', async () => {
    for (const [existential, numRuns] of [[false, 150], [true, 100]] as const) {
      const kbs = tinyKb({ classes: 4, properties: 2, individuals: 24, axioms: 6, facts: 50, disjunctive: true, existential })
        .map((kb) => ({ ...kb, axioms: [...kb.axioms, sub([], ['A0', 'A1'])] }));
      await fc.assert(fc.asyncProperty(kbs, async (kb) => {
        const plain = await engineFacts(kb, 'plain', limits);
        const optimised = await engineFacts(kb, 'optimised', limits);
        expect(sorted(optimised), describeKb(kb)).toBe(sorted(plain));
      }), { numRuns, seed: 76 });
    }
  }, 120_000);

  // Without ≤n the optimised path blocks on the element's label alone (single blocking, chase/blocking.ts), while the
  // plain path keeps pairwise blocking.
  it('agrees on 1500 random knowledge bases without ≤n: single blocking against pairwise', async () => {
    await fc.assert(fc.asyncProperty(tinyKb({ classes: 4, properties: 3, individuals: 4, axioms: 12, facts: 5, disjunctive: true, existential: true, atMost: false }), async (kb) => {
      expect(sorted(await engineFacts(kb, 'optimised', limits)), describeKb(kb)).toBe(sorted(await engineFacts(kb, 'plain', limits)));
    }), { numRuns: 1500, seed: 11 });
  }, 120_000);

  it('agrees on 1500 random Horn knowledge bases with cyclic existentials', async () => {
    await fc.assert(fc.asyncProperty(tinyKb({ classes: 5, properties: 2, individuals: 4, axioms: 8, facts: 5, disjunctive: false, existential: true }), async (kb) => {
      expect(sorted(await engineFacts(kb, 'optimised', limits)), describeKb(kb)).toBe(sorted(await engineFacts(kb, 'plain', limits)));
    }), { numRuns: 1500, seed: 777 });
  }, 120_000);

  // Kept from shrinking: a cycle through an inverse with ≤1, where the anonymous chain must be blocked pairwise.
  it('fixed case: A ⊑ ∃R.A, A ⊑ ∀R⁻.B, B ⊑ ∃R⁻.A, A ⊑ ≤1 R⁻.⊤ terminates and both paths agree', async () => {
    const kb = { axioms: [some('A', role('R'), 'A'), only('A', role('R', true), 'B'), some('B', role('R', true), 'A'), atMost('A', 1, role('R', true), null), sub(['B'], ['C', 'D'])], classFacts: [['A', 'a']] as [string, string][], propertyFacts: [] };
    const plain = await engineFacts(kb, 'plain', limits);
    expect(sorted(await engineFacts(kb, 'optimised', limits))).toBe(sorted(plain));
    expect(plain?.has('B(a)')).toBe(true);
  });
});

describe('worker threads', () => {
  it('components chased in two workers give the same facts as on one thread', async () => {
    const { rewriteOntology } = await import('../../../reasoner/rewrite/rules-from-normal.js');
    const { entail } = await import('../../../reasoner/chase/entail.js');
    const { Guard } = await import('../../../reasoner/chase/guard.js');
    const { disjunctiveCatalogue, randomAbox } = await import('../../bench/core-generators.js');
    const onto = disjunctiveCatalogue();
    const program = rewriteOntology({ axioms: onto.axioms, classes: onto.classes, properties: onto.properties, assertions: [] });
    // Our own catalogue scenario (tests/bench/core-generators.ts): edges stay in blocks of 4, so many components.
    const input = randomAbox(200, 1, 1, 10, 2, 9, 4);
    const run = async (threads: number) => {
      const facts: string[] = [];
      const outcome = await entail(program, input, { unary: (c, i) => facts.push(`${c} ${i}`), binary: (p, s, o) => facts.push(`${p} ${s} ${o}`), same: (a, b) => facts.push(`= ${a} ${b}`) },
        { guard: new Guard(), threads, minFactsForThreads: 0 });
      return { status: outcome.status, threads: outcome.stats.threads, facts: facts.sort() };
    };
    const one = await run(1), two = await run(2);
    expect(two.threads).toBe(2);
    expect(two.status).toBe(one.status);
    expect(two.facts).toEqual(one.facts);
    expect(one.facts.length).toBeGreaterThan(200);
  }, 60_000);
});

describe('cancellation', () => {
  it('an abort during one large component stops the chase (its worker is terminated)', async () => {
    const { rewriteOntology } = await import('../../../reasoner/rewrite/rules-from-normal.js');
    const { entail } = await import('../../../reasoner/chase/entail.js');
    const { Guard, CancelledError } = await import('../../../reasoner/chase/guard.js');
    const { hornDatalogOntology, randomAbox } = await import('../../bench/core-generators.js');
    const onto = hornDatalogOntology(60, 10);
    const program = rewriteOntology({ axioms: onto.axioms, classes: onto.classes, properties: onto.properties, assertions: [] });
    const input = randomAbox(60_000, 1, 3, 60, 10); // one connected component; chasing it takes seconds
    const controller = new AbortController();
    setTimeout(() => controller.abort(), 300);
    let facts = 0;
    await expect(entail(program, input, { unary: () => facts++, binary: () => facts++, same: () => facts++ },
      { guard: new Guard({}, controller.signal), threads: 1, signal: controller.signal })).rejects.toBeInstanceOf(CancelledError);
    expect(facts).toBe(0);
  }, 60_000);
});
