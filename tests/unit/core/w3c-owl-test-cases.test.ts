// reason() against test cases of the W3C OWL Web Ontology Language Test Cases (W3C Recommendation 10 February 2004,
// http://www.w3.org/TR/owl-test/, and its working drafts) that lie in ALCHIQ and whose question is a fact about
// named individuals, a consistency verdict, or a class-level entailment checked on an individual. Each case runs on
// the default path, on the one-rule-per-axiom chase (path 'chase') and on the published rewriting (path
// 'rewriting'), and every path must give the W3C verdict.
//
// Where each fixture comes from, what was read from which page and what was added for the check:
// tests/fixtures/w3c-owl-tests/README.md. Cases marked "from memory" were not read from a page.

import { describe, expect, it } from 'vitest';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import { reason } from '../../../reasoner/index.js';
import type { FactSink, ReasonOptions } from '../../../reasoner/api.js';

const here = dirname(fileURLToPath(import.meta.url));
const fixture = (name: string) => join(here, '..', '..', 'fixtures', 'w3c-owl-tests', name);

const TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const SAME = 'http://www.w3.org/2002/07/owl#sameAs';
/** Names added for the checks (an individual of a left-hand class, a class equal to a right-hand side). */
const CHECK = 'http://thence.example/check#';

const PATHS: readonly { readonly name: string; readonly path: ReasonOptions['path'] }[] = [
  { name: 'default path', path: undefined },
  { name: "path 'chase'", path: 'chase' },
  { name: "path 'rewriting'", path: 'rewriting' },
];
// Backstop only: every case here but 903 finishes in well under a second.
const limits = { timeoutMs: 20_000 };

class Collect implements FactSink {
  readonly facts = new Set<string>();
  write(s: string, p: string, o: string): void { this.facts.add(`${s} ${p} ${o}`); }
}

async function run(ontology: string, datasets: readonly string[], path: ReasonOptions['path'], caseLimits = limits) {
  const sink = new Collect();
  const result = await reason({
    ontology: { path: fixture(ontology) }, datasets: datasets.map((d) => ({ path: fixture(d) })), path, threads: 1, limits: caseLimits,
  }, sink);
  return { status: result.status, facts: sink.facts };
}

for (const { name, path } of PATHS) {
  describe(`W3C OWL Test Cases on the ${name}`, () => {
    // Positive Entailment Test description-logic 901, §7.3.4 Extended Cardinality Testing,
    // https://www.w3.org/TR/2003/CR-owl-test-20030818/dl-900-arith : with p, q ⊑ r, range(p) = A, range(q) = B and
    // A, B disjoint, (≥2 p ⊓ ≥3 q) ⊑ ≥5 r. The subsumption is checked on an individual of the left-hand class,
    // check:x, with check:Goal ≡ ≥5 r.
    it('description-logic 901: two p- and three q-successors in disjoint ranges make five r-successors', async () => {
      const r = await run('description-logic-901.rdf', [], path);
      expect(r.status).toBe('ok');
      expect(r.facts.has(`${CHECK}x ${TYPE} ${CHECK}Goal`)).toBe(true);
    });

    // Negative Entailment Test description-logic 902, same page (premises as 901; non-conclusion
    // (≥2 p ⊓ ≥3 q) ⊑ ≥6 r from the test's description, "i+j < k ... 2, 3 and 6", and
    // http://lists.w3.org/Archives/Public/www-webont-wg/2003May/0291.html). Checked on an individual as for 901.
    it('description-logic 902: two p- and three q-successors do not make six r-successors', async () => {
      const r = await run('description-logic-902.rdf', [], path);
      expect(r.status).toBe('ok');
      expect(r.facts.has(`${CHECK}x ${TYPE} ${CHECK}Goal`)).toBe(false);
    });

    // Positive Entailment Test description-logic 903, same section, conclusion (≥200 p ⊓ ≥300 q) ⊑ ≥500 r from
    // https://w3.org/2007/OWL/wiki/TestCase:WebOnt-description-logic-903 ; premises as 901 (from memory: that page
    // does not show them). The ≥500 and ≤499 rules are read by counting (reasoner/chase/counting.ts): joined atom by
    // atom they overflowed the stack. Several seconds per path, hence its own backstop.
    it('description-logic 903: two hundred p- and three hundred q-successors make five hundred r-successors', async () => {
      const r = await run('description-logic-903.rdf', [], path, { timeoutMs: 240_000 });
      expect(r.status).toBe('ok');
      expect(r.facts.has(`${CHECK}x ${TYPE} ${CHECK}Goal`)).toBe(true);
    }, 300_000);

    // Not a W3C test: 903's premises with ≥501 r, the negative counterpart by 902's rule (i + j < k).
    it('903 with 501: two hundred p- and three hundred q-successors do not make 501 r-successors', async () => {
      const r = await run('description-logic-903-501.rdf', [], path, { timeoutMs: 240_000 });
      expect(r.status).toBe('ok');
      expect(r.facts.has(`${CHECK}x ${TYPE} ${CHECK}Goal`)).toBe(false);
    }, 300_000);

    // Positive Entailment Test AllDifferent 001, §7.1.1 owl:AllDifferent,
    // https://www.w3.org/TR/2003/CR-owl-test-20030818/byFunction : conclusion Barney owl:differentFrom Fred. A
    // differentFrom is not an output fact, so it is checked by its negation: Barney owl:sameAs Fred must clash.
    it('AllDifferent 001: the members of owl:AllDifferent are different (Barney = Fred clashes)', async () => {
      const AD = 'http://www.w3.org/2002/03owlt/AllDifferent/premises001#';
      const premises = await run('AllDifferent-001.rdf', [], path);
      expect(premises.status).toBe('ok');
      expect(premises.facts.has(`${AD}Barney ${SAME} ${AD}Fred`)).toBe(false);
      const negated = await run('AllDifferent-001.rdf', ['AllDifferent-001-conclusion-negated.nt'], path);
      expect(negated.status).toBe('inconsistent');
    });

    // Inconsistent document description-logic 001 ("DL Test: fact1.1"), §7.3.1 Extended Satisfiability Tests,
    // https://www.w3.org/TR/2003/WD-owl-test-20030528/dl-000-satisfiability : with a, b, c pairwise disjoint,
    // Unsatisfiable ≡ (a ⊓ b) ⊔ (a ⊓ c) ⊔ (b ⊓ c) is empty; checked with one individual of Unsatisfiable.
    it('description-logic 001: a union of intersections of pairwise disjoint classes has no instance', async () => {
      const r = await run('description-logic-001.rdf', ['description-logic-001-individual.nt'], path);
      expect(r.status).toBe('inconsistent');
    });

    // Inconsistent document description-logic 101 ("DL Test: heinsohn1.1"), §7.3.2 Heinsohn's Tests,
    // https://w3.org/TR/2003/WD-owl-test-20030528/dl-100-heinsohn : Unsatisfiable ≡ c ⊓ d with c ⊑ ¬d is empty;
    // checked with one individual of Unsatisfiable.
    it('description-logic 101: the intersection of a class and a class disjoint from it has no instance', async () => {
      const r = await run('description-logic-101.rdf', ['description-logic-101-individual.nt'], path);
      expect(r.status).toBe('inconsistent');
    });

    // Positive Entailment Test I5.2 002, "A class like owl:Nothing can be defined using OWL Lite restrictions",
    // read from its first-order translation TPTP KRS130+1 (https://huggingface.co/datasets/nvidia/Nemotron-CC-Math-v1):
    // Nothing ⊑ ≤0 p ⊓ ≥1 p entails Nothing ≡ owl:Nothing, checked with one individual of Nothing.
    it('I5.2 002: a class with at most 0 and at least 1 p-successors is empty', async () => {
      const r = await run('I5.2-002.ttl', ['I5.2-002-individual.nt'], path);
      expect(r.status).toBe('inconsistent');
    });

    // Positive Entailment Test equivalentProperty 001, "hasLeader may be stated as the owl:equivalentProperty of
    // hasHead", premises read from its first-order translation TPTP KRS169+1 (same page as above); the conclusion
    // X hasHead Y is from memory (cut off on that page).
    it('equivalentProperty 001: a hasLeader fact is a hasHead fact', async () => {
      const EP = 'http://www.w3.org/2002/03owlt/equivalentProperty/premises001#';
      const r = await run('equivalentProperty-001.ttl', [], path);
      expect(r.status).toBe('ok');
      expect(r.facts.has(`${EP}X ${EP}hasHead ${EP}Y`)).toBe(true);
    });

    // W3C OWL test web site, https://www.w3.org/2002/03owlt/mapInvP.n3 ("mapInv: map inverses"): joe hasBrother
    // bob with hasBrother owl:inverseOf isBrotherOf gives bob isBrotherOf joe.
    it('mapInv: an owl:inverseOf maps a fact to its inverse', async () => {
      const r = await run('mapInvP.ttl', [], path);
      expect(r.status).toBe('ok');
      expect(r.facts.has('http://example/vocab#bob http://example/yourVocab#isBrotherOf http://example/vocab#joe')).toBe(true);
    });

    // Positive Entailment Test FunctionalProperty 001, §7.1 owl:FunctionalProperty (from memory): two values of a
    // functional property for one subject are the same individual.
    it('FunctionalProperty 001 (from memory): two values of a functional property are owl:sameAs', async () => {
      const FP = 'http://www.w3.org/2002/03owlt/FunctionalProperty/premises001#';
      const r = await run('FunctionalProperty-001.ttl', [], path);
      expect(r.status).toBe('ok');
      expect(r.facts.has(`${FP}object1 ${SAME} ${FP}object2`)).toBe(true);
    });

    // Positive Entailment Test InverseFunctionalProperty 001, §7.1 owl:InverseFunctionalProperty (from memory): two
    // subjects with one value of an inverse functional property are the same individual.
    it('InverseFunctionalProperty 001 (from memory): two subjects of one value are owl:sameAs', async () => {
      const IFP = 'http://www.w3.org/2002/03owlt/InverseFunctionalProperty/premises001#';
      const r = await run('InverseFunctionalProperty-001.ttl', [], path);
      expect(r.status).toBe('ok');
      expect(r.facts.has(`${IFP}subject1 ${SAME} ${IFP}subject2`)).toBe(true);
    });

    // Inconsistent document Nothing 001, §7.1 owl:Nothing (from memory): an instance of owl:Nothing.
    it('Nothing 001 (from memory): an instance of owl:Nothing is inconsistent', async () => {
      const r = await run('Nothing-001.ttl', [], path);
      expect(r.status).toBe('inconsistent');
    });

    // Positive Entailment Test disjointWith 001, §7.1 owl:disjointWith (from memory): members of disjoint classes are
    // different, checked by the negation of the conclusion (a owl:sameAs b) clashing.
    it('disjointWith 001 (from memory): members of disjoint classes are different (a = b clashes)', async () => {
      const premises = await run('disjointWith-001.ttl', [], path);
      expect(premises.status).toBe('ok');
      const negated = await run('disjointWith-001.ttl', ['disjointWith-001-conclusion-negated.nt'], path);
      expect(negated.status).toBe('inconsistent');
    });
  });
}
