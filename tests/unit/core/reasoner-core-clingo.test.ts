// The chase against clingo (Debian package gringo) on random knowledge bases: the reference is the separately written
// ASP encoding of tests/reference/asp-reference.ts, answered by clingo's single model (Horn) or its cautious
// consequences (disjunctive; clingo --enum-mode=cautious prints the intersection of all answer sets last).

import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { aspProgram, clingoFacts, requireClingo } from '../../reference/asp-reference.js';
import { atMost, describeKb, engineFacts, only, role, sub, tinyKb, type KbShape } from './kb-tools.js';

const sorted = (s: Set<string> | null) => (s === null ? 'inconsistent' : [...s].sort().join(' '));

/** Exact agreement: the ASP encoding is exact when existentials are absent or acyclic (Skolem depth ≥ chain length). */
async function agreesExactly(shape: KbShape, runs: number, seed: number): Promise<void> {
  await fc.assert(fc.asyncProperty(tinyKb(shape), async (kb) => {
    const reference = clingoFacts(aspProgram(kb, shape.classes + 1));
    const ours = await engineFacts(kb);
    expect(sorted(ours), describeKb(kb)).toBe(sorted(reference));
  }), { numRuns: runs, seed });
}

const small = { classes: 4, properties: 2, individuals: 3, axioms: 6, facts: 4 };

describe('chase against clingo', () => {
  it('finds clingo on this machine (fails loudly when gringo is not installed)', () => {
    expect(() => requireClingo()).not.toThrow();
  });

  it('Horn, existential-free: same facts as clingo\'s unique answer set', async () => {
    await agreesExactly({ ...small, disjunctive: false, existential: false }, 250, 101);
  }, 60_000);

  it('disjunctive, existential-free: same facts as clingo\'s cautious consequences', async () => {
    await agreesExactly({ ...small, disjunctive: true, existential: false }, 250, 202);
  }, 60_000);

  it('Horn with acyclic existentials and number restrictions: same facts as clingo on the Skolemised program', async () => {
    await agreesExactly({ ...small, disjunctive: false, existential: true, acyclic: true }, 150, 303);
  }, 60_000);

  it('disjunctive with acyclic existentials and number restrictions: same as clingo\'s cautious consequences', async () => {
    await agreesExactly({ ...small, disjunctive: true, existential: true, acyclic: true }, 150, 404);
  }, 60_000);

  it('cyclic existentials: clingo on the depth-bounded Skolem program gives a lower bound the chase must contain', async () => {
    // Truncating the Skolem chase keeps only sound consequences (a subset of the rules' ground instances).
    await fc.assert(fc.asyncProperty(tinyKb({ ...small, disjunctive: true, existential: true }), async (kb) => {
      const lower = clingoFacts(aspProgram(kb, 3));
      const ours = await engineFacts(kb);
      if (lower === null) expect(ours, describeKb(kb)).toBeNull();
      else if (ours !== null) for (const f of lower) expect(ours.has(f), `${f} in ${describeKb(kb)}`).toBe(true);
    }), { numRuns: 150, seed: 505 });
  }, 60_000);

  it('larger knowledge bases (40 individuals, 60 facts): same as clingo', async () => {
    const large = { classes: 6, properties: 3, individuals: 40, axioms: 12, facts: 60 };
    await agreesExactly({ ...large, disjunctive: false, existential: false }, 8, 606);
    await agreesExactly({ ...large, disjunctive: true, existential: false }, 8, 707);
    await agreesExactly({ ...large, disjunctive: false, existential: true, acyclic: true }, 8, 808);
  }, 120_000);
});

describe('larger knowledge bases against clingo', () => {
  // Our own generated catalogue scenario (tests/bench/core-generators.ts), turned into named facts for both sides.
  const named = async (classes: number, properties: number, individuals: number, cluster: number, seed: number, kind: 'horn' | 'catalogue') => {
    const g = await import('../../bench/core-generators.js');
    const onto = kind === 'horn' ? g.hornDatalogOntology(classes, properties, seed) : g.disjunctiveCatalogue();
    const abox = kind === 'horn' ? g.randomAbox(individuals, 1, 2, onto.classes.length, onto.properties.length, seed + 1, cluster) : g.catalogueAbox(individuals, 3, cluster, seed);
    return {
      axioms: onto.axioms,
      classFacts: Array.from(abox.classPred, (p, i) => [abox.classNames[p]!, `i${abox.classInd[i]}`] as const),
      propertyFacts: Array.from(abox.propPred, (p, i) => [abox.propertyNames[p]!, `i${abox.propSubj[i]}`, `i${abox.propObj[i]}`] as const),
    };
  };

  it('a Horn Datalog program over 1500 individuals and 4500 facts: same facts as clingo', async () => {
    const kb = await named(24, 6, 1500, 0, 11, 'horn');
    const reference = clingoFacts(aspProgram(kb, 1));
    expect(reference).not.toBeNull();
    expect(sorted(await engineFacts(kb))).toBe(sorted(reference));
  }, 120_000);

  it('the disjunctive catalogue (≤3, ≥2, ⊔, inverses, acyclic ∃) over 30 assemblies (150 individuals): same as clingo\'s cautious consequences', async () => {
    const kb = await named(10, 3, 30, 3, 21, 'catalogue');
    const reference = clingoFacts(aspProgram(kb, 3));
    expect(sorted(await engineFacts(kb))).toBe(sorted(reference));
  }, 120_000);

  // Reasoning by cases at every individual of one component (the pattern of the DL Handbook's Oedipus example, from
  // memory, repeated): each T is S or W and both imply N; each H is St or Se and both imply Sh; what ends at a
  // shelter is Safe; e functional on T. Most candidates are entailed, each proved by exhausting its choices — the
  // search keeps the earlier choices between proofs (chase/search.ts, KeptSearch) instead of replaying them.
  it('reasoning by cases at 60 trails and 10 huts in one component: same as clingo\'s cautious consequences', async () => {
    const e = role('e');
    const kb = {
      axioms: [sub(['T'], ['S', 'W']), sub(['S'], ['N']), sub(['W'], ['N']), sub(['S', 'W'], []), sub(['H'], ['St', 'Se']), sub(['St'], ['Sh']), sub(['Se'], ['Sh']),
        only('Sh', role('e', true), 'Safe'), atMost('T', 1, e, null)],
      classFacts: [...Array.from({ length: 60 }, (_, i) => [i % 3 === 0 ? 'W' : 'T', `t${i}`] as [string, string]), ...Array.from({ length: 10 }, (_, j) => ['H', `h${j}`] as [string, string])],
      propertyFacts: [...Array.from({ length: 60 }, (_, i) => ['e', `t${i}`, `h${i % 10}`] as [string, string, string]), ...Array.from({ length: 9 }, (_, j) => ['c', `h${j}`, `h${j + 1}`] as [string, string, string])],
    };
    const reference = clingoFacts(aspProgram(kb, 0));
    expect(reference).not.toBeNull();
    const ours = await engineFacts(kb);
    expect(ours?.has('Safe(t7)')).toBe(true);
    expect(sorted(ours)).toBe(sorted(reference));
  }, 120_000);

  // One supplier for all 30 assemblies: a single component of 121 individuals, whose hundreds of candidate facts
  // the cautious search settles in groups (chase/candidates.ts) rather than one by one.
  it('the same catalogue as one component of 121 individuals: same as clingo\'s cautious consequences', async () => {
    const kb = await named(10, 3, 30, 30, 21, 'catalogue');
    const reference = clingoFacts(aspProgram(kb, 3));
    expect(sorted(await engineFacts(kb))).toBe(sorted(reference));
  }, 120_000);
});
