import { it, expect } from 'vitest';
import fc from 'fast-check';
import { tinyKb, describeKb } from '/work/main/tests/unit/core/kb-tools.js';
import { normalOf, programFacts, sortedFacts } from '/work/main/tests/unit/core/horn-datalog-tools.js';
import { rewriteOntology } from '/work/main/reasoner/rewrite/rules-from-normal.js';
import { rewriteHornToDatalog } from '/work/main/reasoner/rewrite/horn/index.js';
it('try', async () => {
  await fc.assert(fc.asyncProperty(tinyKb({ classes: 4, properties: 2, individuals: 3, axioms: 7, facts: 5, disjunctive: false, existential: true }), async (kb) => {
    const normal = normalOf(kb);
    const chase = await programFacts(rewriteOntology(normal), kb);
    const datalog = await programFacts(rewriteHornToDatalog(normal), kb);
    expect(datalog.anonymous).toBe(0);
    expect(sortedFacts(datalog.facts), describeKb(kb)).toBe(sortedFacts(chase.facts));
  }), { numRuns: Number(process.env.RUNS ?? 300), seed: Number(process.env.SEED ?? 1) });
}, 300000);
