// The published rewriting (rewrite/disjunctive, after Carral & Krötzsch, IJCAI 2020) run by the plain restricted
// chase with the engine's dynamic blocking off, against the optimised path (one rule per axiom, dynamic pairwise
// blocking, components, certain facts) on random small ALCHIQ knowledge bases with inverses, number restrictions and
// cyclic existentials, and on worked examples of the literature. Every run must stop by the rules alone: the
// element guard is set low as a backstop and would fail the run if it fired.

import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { atLeast, atMost, describeKb, engineFacts, incl, only, role, some, sub, tinyKb, type KbShape } from './kb-tools.js';
import { rewritingFacts } from './rewriting-plain-tools.js';
import { rewriteToTerminatingRules, signature } from '../../../reasoner/rewrite/disjunctive/index.js';
import { rewriteOntology } from '../../../reasoner/rewrite/rules-from-normal.js';
import { entail } from '../../../reasoner/chase/entail.js';
import { Guard } from '../../../reasoner/chase/guard.js';
import { ruleArity } from '../../../reasoner/rules/types.js';
import { aspProgram, clingoFacts, type TinyKb } from '../../reference/asp-reference.js';
import { reason } from '../../../reasoner/index.js';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { spawnSync } from 'node:child_process';

const sorted = (s: Set<string> | null) => (s === null ? 'inconsistent' : [...s].sort().join(' '));
// Backstop only (common-practice guard values for a test): small knowledge bases need far fewer elements.
const limits = { maxElements: 5_000, maxBranches: 500_000, timeoutMs: 20_000 };
const R = role('R'), Rinv = role('R', true);
const fixture = (name: string) => join(dirname(fileURLToPath(import.meta.url)), 'fixtures', name);

/** Runs the published rewriting, expects the optimised path's facts, and returns the run (facts and counts). */
async function agreeRun(kb: TinyKb): ReturnType<typeof rewritingFacts> {
  const plain = await rewritingFacts(kb, limits);
  expect(sorted(plain.facts), describeKb(kb)).toBe(sorted(await engineFacts(kb, 'optimised')));
  return plain;
}

const agree = async (kb: TinyKb): Promise<Set<string> | null> => (await agreeRun(kb)).facts;

/** Both paths agree on `numRuns` random knowledge bases of one shape (fast-check, so a failure shrinks). */
const agreeOn = (shape: KbShape, numRuns: number, seed: number) =>
  fc.assert(fc.asyncProperty(tinyKb(shape), async (kb) => { await agree(kb); }), { numRuns, seed });

describe('published rewriting against the optimised path', () => {
  it('agrees (facts and consistency) on 2000 random disjunctive knowledge bases with inverses, ≤n, ≥n and cyclic ∃', async () => {
    await agreeOn({ classes: 4, properties: 2, individuals: 3, axioms: 6, facts: 4, disjunctive: true, existential: true }, 2000, 2020);
  }, 120_000);

  // Seed 12 of this shape reached, at run 982, the case kept below that once ran out of time.
  it('agrees on 1000 random ones with three properties and four individuals', async () => {
    await agreeOn({ classes: 4, properties: 3, individuals: 4, axioms: 8, facts: 5, disjunctive: true, existential: true }, 1000, 12);
  }, 120_000);

  // Dense: few names, many axioms, so existentials, inverses and number restrictions interact at every element.
  it('agrees on 800 dense random ones (3 classes, 2 properties, up to 10 axioms)', async () => {
    await agreeOn({ classes: 3, properties: 2, individuals: 3, axioms: 10, facts: 5, disjunctive: true, existential: true }, 800, 1);
  }, 120_000);

  // Without ≤n the rewriting makes no merge, so its exactness argument covers every run; the optimised path then
  // blocks on single labels (chase/blocking.ts): two different ways of stopping the chase, compared.
  it('agrees on 1000 random ones without ≤n, none of them with a merge outside the argument', async () => {
    await fc.assert(fc.asyncProperty(tinyKb({ classes: 4, properties: 2, individuals: 3, axioms: 7, facts: 4, disjunctive: true, existential: true, atMost: false }), async (kb) => {
      expect((await agreeRun(kb)).copiedMerges).toBe(0);
    }), { numRuns: 1000, seed: 3 });
  }, 120_000);

  it('agrees on 250 random Horn knowledge bases with cyclic existentials', async () => {
    await agreeOn({ classes: 4, properties: 2, individuals: 3, axioms: 7, facts: 4, disjunctive: false, existential: true }, 250, 1309);
  }, 120_000);

  // Kept from the optimised path's own differential tests: a cycle through an inverse with ≤1 R⁻.
  it('fixed case: A ⊑ ∃R.A, A ⊑ ∀R⁻.B, B ⊑ ∃R⁻.A, A ⊑ ≤1 R⁻.⊤, B ⊑ C ⊔ D', async () => {
    const facts = await agree({ axioms: [some('A', R, 'A'), only('A', Rinv, 'B'), some('B', Rinv, 'A'), atMost('A', 1, Rinv, null), sub(['B'], ['C', 'D'])], classFacts: [['A', 'a']], propertyFacts: [] });
    expect(facts?.has('B(a)')).toBe(true);
  });

  // Kept from shrinking (3 properties, 4 individuals, seed 12): a successor merged into its predecessor's predecessor
  // (≤2 R⁻ against ≥2 R⁻.A) must not stay a successor, or its copies count three R-predecessors and force merges
  // no model needs; every element can have two R-predecessors and an R-successor without R(a, a) (hand-derived).
  it('fixed case: A ⊑ ≤2 R⁻.⊤, A ⊑ ≥2 R⁻.A, A ⊑ ∃R.A, A(a) entails no R(a, a)', async () => {
    const facts = await agree({ axioms: [atMost('A', 2, Rinv, null), atLeast('A', 2, Rinv, 'A'), some('A', R, 'A')], classFacts: [['A', 'a']], propertyFacts: [] });
    expect(sorted(facts)).toBe('A(a)');
  });

  // Kept from shrinking (seed 12, run 982): ≥2 R₀.A₂ at every A₂ element against ≤1 R₀.A₀, and A₀ ⊑ ≥2 R₁.A₀.
  // Guessing "present" first made every created element A₀ and clash, and the chase ran past 60 s; no successor
  // is forced into A₀, so only A₂(a) is entailed (hand-derived: the tree of A₂ elements alone is a model).
  it('fixed case: A₂ ⊑ ≥2 R₀.A₂, A₂ ⊑ ≤1 R₀.A₀, A₀ ⊑ ≥2 R₁.A₀, A₂(a) entails only A₂(a)', async () => {
    const R0 = role('R0'), R1 = role('R1');
    const facts = await agree({ axioms: [atLeast('A2', 2, R0, 'A2'), atMost('A2', 1, R0, 'A0'), atLeast('A0', 2, R1, 'A0')], classFacts: [['A2', 'a']], propertyFacts: [] });
    expect(sorted(facts)).toBe('A2(a)');
  });
});

// Kept from a sweep (dense shape, seed 11): with R₁ left unguessed (it has no negative occurrence) the rewriting lost
// every model without R₁(i₀, i₀); every role is guessed since. Not entailed (hand-derived): i₀'s two R₁-successors
// can be fresh A₀ elements, each an R₀-loop with one R₀-neighbour, which meets ≥2 R₀.A₀ and ≤2 R₀ with R₀ symmetric.
describe('a role without negative occurrence is still guessed', () => {
  it('fixed case: A₀ ⊑ ≥2 R₀.A₀, R₀⁻ ⊑ R₀, A₀ ⊑ ≤2 R₀.⊤, A₀ ⊑ ≥2 R₁.A₀, A₀(i₀), R₀(i₀, i₀) entails no R₁(i₀, i₀)', async () => {
    const R0 = role('R0'), R1 = role('R1');
    const facts = await agree({ axioms: [atLeast('A0', 2, R0, 'A0'), incl(role('R0', true), R0), atMost('A0', 2, R0, null), atLeast('A0', 2, R1, 'A0')], classFacts: [['A0', 'i0']], propertyFacts: [['R0', 'i0', 'i0']] });
    expect(sorted(facts)).toBe('A0(i0) R0(i0,i0)');
  });
});

// Kept from a sweep (dense shape, seed 11, shrunk): with the ≤ rules' merges decided after the completion guesses, a
// created element merged into i₁ brought copied successors along and every branch without R₀(i₁, i₀) closed; equality
// disjunctions now go first. Not entailed — a countermodel by hand: elements 0…4 (i₀ = 0, i₁ = 1), all A₀,
// R₀ = {(x, x+1), (x, x+2) mod 5}, R₁ its inverse.
describe('merges are decided before the guesses', () => {
  it('fixed case: A₀ ⊑ ≥2 R₀⁻.A₀, R₁⁻ ⊑ R₀, A₀ ⊑ ≤2 R₀.⊤, A₀ ⊑ ≥2 R₁⁻.A₀, A₀(i₀), R₁(i₁, i₀) entails no R₀(i₁, i₀)', async () => {
    const R0 = role('R0');
    const kb: TinyKb = { axioms: [atLeast('A0', 2, role('R0', true), 'A0'), incl(role('R1', true), R0), atMost('A0', 2, R0, null), atLeast('A0', 2, role('R1', true), 'A0')], classFacts: [['A0', 'i0']], propertyFacts: [['R1', 'i1', 'i0']] };
    const run = await agreeRun(kb);
    expect(sorted(run.facts)).toBe('A0(i0) A0(i1) R0(i0,i1) R1(i1,i0)');
    // The answer is right, but the run merged elements that hold copied successor edges: outside what the exactness
    // argument covers, and counted so (reason() then warns; README, "The published rewriting").
    expect(run.copiedMerges).toBeGreaterThan(0);
  });

  it('runs without such merges count none: A ⊑ ∃R.A, and ≥3 R.A with ∀R⁻.B', async () => {
    expect((await rewritingFacts({ axioms: [some('A', R, 'A')], classFacts: [['A', 'a']], propertyFacts: [] }, limits)).copiedMerges).toBe(0);
    expect((await rewritingFacts({ axioms: [atLeast('A', 3, R, 'A'), only('A', Rinv, 'B')], classFacts: [['A', 'a']], propertyFacts: [] }, limits)).copiedMerges).toBe(0);
  });
});

describe('termination comes from the rules', () => {
  // Every model of A ⊑ ∃R.A with A(a) is infinite (DL Handbook, Baader et al. 2003, ch. 2 on cyclic TBoxes, from
  // memory): the one-rule-per-axiom program without blocking runs into the element guard; the rewriting stops.
  it('A ⊑ ∃R.A: the per-axiom program needs blocking, the rewriting does not', async () => {
    const axioms = [some('A', R, 'A')];
    const input = { individuals: 1, classPred: Int32Array.of(0), classInd: Int32Array.of(0), propPred: new Int32Array(0), propSubj: new Int32Array(0), propObj: new Int32Array(0),
      sameA: new Int32Array(0), sameB: new Int32Array(0), diffA: new Int32Array(0), diffB: new Int32Array(0), classNames: ['A'], propertyNames: [] };
    const none = { unary() {}, binary() {}, same() {} };
    const unblocked = { ...rewriteOntology({ axioms, classes: ['A'], properties: ['R'], assertions: [] }), blocking: false };
    await expect(entail(unblocked, input, none, { guard: new Guard({ maxElements: 200 }) })).rejects.toThrow(/element limit/);
    const rewriting = rewriteToTerminatingRules({ axioms, classes: ['A'], properties: ['R'], assertions: [] });
    expect((await entail(rewriting, input, none, { guard: new Guard({ maxElements: 200 }) })).status).toBe('ok');
    expect([...(await rewritingFacts({ axioms, classFacts: [['A', 'a']], propertyFacts: [] }, limits)).facts!]).toEqual(['A(a)']);
  });

  it('A ⊑ ≥3 R.A with A ⊑ ∀R⁻.B stops and sends B back to a', async () => {
    const facts = await agree({ axioms: [atLeast('A', 3, R, 'A'), only('A', Rinv, 'B')], classFacts: [['A', 'a']], propertyFacts: [] });
    expect(sorted(facts)).toBe('A(a) B(a)');
  });

  it('rules have bounded size: arity 2, bodies of at most 6 atoms apart from the ≤n rules', () => {
    const axioms = [some('A', R, 'B'), only('B', Rinv, 'C'), atMost('C', 1, R, null), sub(['A'], ['B', 'C']), incl(R, role('S', true))];
    const program = rewriteToTerminatingRules({ axioms, classes: ['A', 'B', 'C'], properties: ['R', 'S'], assertions: [] });
    expect(Math.max(...program.rules.map(ruleArity))).toBe(2);
    expect(Math.max(...program.rules.filter((r) => r.symmetric === undefined).map((r) => r.body.length))).toBeLessThanOrEqual(6);
    expect(program.blocking).toBe(false);
  });

  // Only classes that can arrive at an element later (a positive occurrence) and change what happens there (a
  // negative one) are guessed: here A occurs only in a body; B and C in both. Every role is guessed (see below).
  it('guesses only the classes with a positive and a negative occurrence, and every role', () => {
    const axioms = [some('A', R, 'B'), only('B', Rinv, 'C'), atMost('C', 1, R, null), sub(['A'], ['B', 'C']), incl(R, role('S', true))];
    const sig = signature({ axioms, classes: ['A', 'B', 'C'], properties: ['R', 'S'], assertions: [] });
    expect([...sig.guessedClasses].sort()).toEqual(['B', 'C']);
    expect([...sig.guessedRoles].sort()).toEqual(['R', 'S']);
  });
});

describe('worked examples on the published rewriting', () => {
  // The Description Logic Handbook (Baader et al., 2003), ch. 2, Oedipus reasoning by cases (from memory); clingo's
  // cautious consequences on the direct ASP encoding as the outside reference.
  const oedipus: TinyKb = {
    axioms: [
      sub([], ['Patricide', 'NotPatricide']), sub(['Patricide', 'NotPatricide'], []),
      only('NotPatricide', role('hasChild', true), 'X1'),
      sub(['Patricide', 'X1'], ['X2']),
      only('X2', role('hasChild', true), 'Q'),
    ],
    classFacts: [['Patricide', 'OEDIPUS'], ['NotPatricide', 'THERSANDROS']],
    propertyFacts: [['hasChild', 'IOKASTE', 'OEDIPUS'], ['hasChild', 'IOKASTE', 'POLYNEIKES'], ['hasChild', 'OEDIPUS', 'POLYNEIKES'], ['hasChild', 'POLYNEIKES', 'THERSANDROS']],
  };

  it('Oedipus: Q(IOKASTE) only by cases; equal to clingo', async () => {
    const facts = (await rewritingFacts(oedipus, limits)).facts!;
    expect(facts.has('Q(IOKASTE)')).toBe(true);
    expect(facts.has('Patricide(POLYNEIKES)') || facts.has('NotPatricide(POLYNEIKES)')).toBe(false);
    expect(sorted(facts)).toBe(sorted(clingoFacts(aspProgram(oedipus))));
  });

  // Motik, Shearer, Horrocks (JAIR 2009), facts sent back through an inverse (from memory); OWL 2 Direct Semantics
  // §2.3 Table 4 for ≤1 (hand-derived): the successor ∃R.B asks for is the named b.
  it('back-propagation and merges with named and anonymous elements', async () => {
    expect(sorted(await agree({ axioms: [some('A', R, 'B'), only('B', Rinv, 'C')], classFacts: [['A', 'a']], propertyFacts: [] }))).toBe('A(a) C(a)');
    expect(sorted(await agree({ axioms: [some('A', R, 'B'), atMost('A', 1, R, null)], classFacts: [['A', 'a']], propertyFacts: [['R', 'a', 'b']] }))).toBe('A(a) B(b) R(a,b)');
    expect(sorted(await agree({ axioms: [some('A', R, 'B'), some('B', Rinv, 'C'), atMost('B', 1, Rinv, null)], classFacts: [['A', 'a']], propertyFacts: [] }))).toBe('A(a) C(a)');
  });

  // Direct Semantics: ≥2 R.B against ≤1 R.⊤ has no model; a disjunction whose every case is ⊥ neither.
  it('inconsistency', async () => {
    expect((await rewritingFacts({ axioms: [atLeast('A', 2, R, 'B'), atMost('A', 1, R, null)], classFacts: [['A', 'a']], propertyFacts: [] }, limits)).facts).toBeNull();
    expect((await rewritingFacts({ axioms: [sub(['A'], ['B', 'C']), sub(['B'], []), sub(['C'], [])], classFacts: [['A', 'a']], propertyFacts: [] }, limits)).facts).toBeNull();
    // An anonymous element two steps down is unsatisfiable only through its inverse edge (hand-derived).
    expect(await agree({ axioms: [some('A', R, 'B'), some('B', R, 'C'), only('C', Rinv, 'D'), sub(['B', 'D'], [])], classFacts: [['A', 'a']], propertyFacts: [] })).toBeNull();
  });
});

describe('reason() with path: rewriting', () => {
  const collect = () => { const facts = new Set<string>(); return { facts, write: (s: string, p: string, o: string) => { facts.add(`${s} ${p} ${o}`); } }; };

  // The same files the optimised path is checked on (Oedipus of the DL Handbook, the OWL 2 Primer's family
  // vocabulary, a functional property): the published rewriting gives the same N-Triples.
  for (const [ontology, data] of [['oedipus.ofn', 'oedipus.nt'], ['horn-family.ofn', null], ['functional.ofn', null], ['disjoint.ofn', null]] as const) {
    it(`${ontology}: the same facts and status as the default path`, async () => {
      const datasets = data ? [{ path: fixture(data) }] : [];
      const viaRewriting = collect(), viaDefault = collect();
      const r = await reason({ ontology: { path: fixture(ontology) }, datasets, path: 'rewriting', limits }, viaRewriting);
      const d = await reason({ ontology: { path: fixture(ontology) }, datasets }, viaDefault);
      expect(r.status).toBe(d.status);
      expect([...viaRewriting.facts].sort()).toEqual([...viaDefault.facts].sort());
      if (r.status === 'ok') expect(r.rewriting.largestArity).toBe(2);
      // None of these runs merges an element that holds a copied successor edge: the argument covers them.
      if (r.status === 'ok') expect(r.diagnostics.filter((x) => /copied successor/.test(x.message))).toEqual([]);
    }, 30_000);
  }

  // The shrunk sweep case above as a file: the answer agrees, and reason() says the run lies outside the argument.
  it('warns when the run merged elements holding copied successor edges', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'thence-rewriting-'));
    try {
      const file = join(dir, 'merges.ofn');
      writeFileSync(file, `Prefix(:=<http://example.org/m#>)
Ontology(<http://example.org/m>
SubClassOf(:A0 ObjectMinCardinality(2 ObjectInverseOf(:R0) :A0))
SubObjectPropertyOf(ObjectInverseOf(:R1) :R0)
SubClassOf(:A0 ObjectMaxCardinality(2 :R0 owl:Thing))
SubClassOf(:A0 ObjectMinCardinality(2 ObjectInverseOf(:R1) :A0))
ClassAssertion(:A0 :i0)
ObjectPropertyAssertion(:R1 :i1 :i0)
)
`);
      const viaRewriting = collect(), viaDefault = collect();
      const r = await reason({ ontology: { path: file }, datasets: [], path: 'rewriting', limits }, viaRewriting);
      await reason({ ontology: { path: file }, datasets: [] }, viaDefault);
      expect(r.status).toBe('ok');
      expect([...viaRewriting.facts].sort()).toEqual([...viaDefault.facts].sort());
      if (r.status !== 'ok') return;
      expect(r.timings.copiedMerges).toBeGreaterThan(0);
      expect(r.diagnostics.map((x) => `${x.severity}: ${x.message}`).join('\n')).toMatch(/^warning: the published rewriting's chase merged elements holding copied successor edges \(\d+ merges/);
    } finally { rmSync(dir, { recursive: true, force: true }); }
  }, 30_000);
});

describe('commands with --path rewriting', () => {
  const cli = (...args: string[]) => spawnSync('npx', ['tsx', 'reasoner/cli.ts', ...args], { cwd: join(dirname(fileURLToPath(import.meta.url)), '../../..'), encoding: 'utf8' });

  it('rewrite prints the program in logical notation with its statistics; entail gives the default path\'s triples', () => {
    const printed = cli('rewrite', '--ontology', fixture('oedipus.ofn'), '--path', 'rewriting');
    expect(printed.status).toBe(0);
    expect(printed.stdout).toMatch(/→ .* ∨ /);
    expect(printed.stdout).toMatch(/% largest body: \d+ atoms; largest arity: 2/);
    expect(printed.stdout).toMatch(/published rewriting: chased with dynamic blocking off/);
    const viaRewriting = cli('entail', '--ontology', fixture('oedipus.ofn'), '--data', fixture('oedipus.nt'), '--path', 'rewriting');
    const viaDefault = cli('entail', '--ontology', fixture('oedipus.ofn'), '--data', fixture('oedipus.nt'));
    expect(viaRewriting.status).toBe(0);
    expect(viaRewriting.stdout.split('\n').sort()).toEqual(viaDefault.stdout.split('\n').sort());
    expect(viaRewriting.stderr).toMatch(/reference path; a run that merges elements holding copied successor edges lies outside its exactness argument/);
    expect(viaDefault.stderr).not.toMatch(/reference path/);
    expect(cli('entail', '--ontology', fixture('oedipus.ofn'), '--path', 'sideways').stderr).toMatch(/--path is datalog, chase or rewriting, not sideways/);
  }, 60_000);
});
