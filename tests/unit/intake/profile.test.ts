// ALCHIQ profile check: every axiom classified with reason and position; strict refuses, approximate drops and warns.

import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { checkProfile, profileDiagnostics } from '../../../reasoner/profile/profile.js';
import { parseOfn } from '../../../reasoner/syntax/ofn-parser.js';

const fixture = (name: string) => new URL(`../../fixtures/ontologies/${name}`, import.meta.url).pathname;
const spec = parseOfn(readFileSync(fixture('structural-spec-examples.ofn'), 'utf8'), 'spec.ofn');
const byLine = (report: ReturnType<typeof checkProfile>) => new Map(report.entries.map((e) => [Number(e.position.split(':')[1]), e]));

describe('profile of the Structural Specification examples (fixture from memory of §8–§11)', () => {
  const report = checkProfile(spec, 'strict');
  const line = byLine(report);

  it('classifies constructs outside ALCHIQ with the reason', () => {
    // Expected classes from the definition of ALCHIQ (Carral & Krötzsch, IJCAI 2020, §2) — no nominals, self,
    // transitivity, chains, keys, datatypes, property negation.
    const outside: Record<number, RegExp> = {
      17: /property chains/, 19: /disjoint properties/, 25: /reflexivity/, 26: /irreflexivity/, 28: /asymmetry/, 29: /transitivity/,
      30: /data properties/, 31: /data properties/, 32: /data properties/, 33: /data properties/, 34: /keys/,
      35: /nominals/, 36: /nominals/, 37: /self restrictions/, 38: /datatype/, 50: /data properties/,
    };
    for (const [l, reason] of Object.entries(outside)) {
      const e = line.get(Number(l));
      expect(e?.classification, `line ${l}: ${e?.text}`).toBe('outside');
      expect(e?.reasons.join(' ')).toMatch(reason);
    }
  });

  it('classifies Horn and non-Horn axioms on their normal form', () => {
    const horn = [12, 13, 14, 16, 18, 20, 21, 22, 23, 24, 27, 39, 41, 44, 45, 46, 47, 48, 49];
    for (const l of horn) expect(line.get(l)?.classification, `line ${l}: ${line.get(l)?.text}`).toBe('horn');
    // DisjointUnion(Child Boy Girl) needs Child ⊑ Boy ⊔ Girl; ≤2 with n > 1; ∀hasPet.(Dog ⊔ Cat) needs a disjunction.
    expect(line.get(15)).toMatchObject({ classification: 'alchiq', reasons: ['disjunction'] });
    expect(line.get(40)).toMatchObject({ classification: 'alchiq', reasons: ['at-most restriction with n > 1'] });
    expect(line.get(42)).toMatchObject({ classification: 'alchiq', reasons: ['disjunction'] });
  });

  it('strict mode refuses and lists every offending axiom with file:line:column', () => {
    expect(report.verdict).toBe('outside');
    expect(report.kept).toHaveLength(0);
    const errors = profileDiagnostics(report).filter((d) => d.severity === 'error');
    expect(errors).toHaveLength(report.counts.outside);
    expect(errors[0]).toMatchObject({ position: 'spec.ofn:17:1', axiom: 'SubObjectPropertyOf(ObjectPropertyChain(a:hasMother a:hasSister) a:hasAunt)' });
  });

  it('counts declarations and annotation assertions apart from logical axioms', () => {
    expect(report.counts.annotations).toBe(5);
    expect(report.counts.horn + report.counts.alchiq + report.counts.outside).toBe(spec.axioms.length - 5);
  });
});

describe('approximate mode', () => {
  const report = checkProfile(spec, 'approximate');
  it('drops what is outside, records it, warns that answers may be incomplete', () => {
    expect(report.verdict).toBe('alchiq');
    expect(report.dropped).toHaveLength(report.counts.outside);
    expect(report.kept).toHaveLength(report.counts.horn + report.counts.alchiq);
    expect(report.warnings.join(' ')).toMatch(/sound but may be incomplete/);
  });
  it('says that data-property assertions are kept without datatype reasoning', () => {
    expect(report.warnings.join(' ')).toMatch(/1 data-property assertion kept as facts without datatype reasoning/);
  });
});

describe('Horn verdict', () => {
  it('an ontology of Horn axioms only is Horn-ALCHIQ', () => {
    const o = parseOfn(`Prefix(:=<http://e/>)\nOntology(\nSubClassOf(:A ObjectSomeValuesFrom(:r :B))\nSubClassOf(ObjectIntersectionOf(:A :B) ObjectAllValuesFrom(ObjectInverseOf(:r) :C))\nFunctionalObjectProperty(:r)\nSubClassOf(:A ObjectMinCardinality(3 :r :B))\nNegativeObjectPropertyAssertion(:r :a :b)\n)`, 'h.ofn');
    const r = checkProfile(o);
    expect(r.verdict).toBe('horn');
    expect(r.counts).toEqual({ horn: 5, alchiq: 0, outside: 0, annotations: 0 });
  });
  it('negation on the left needs a disjunction: ¬A ⊑ B is ALCHIQ', () => {
    const o = parseOfn(`Prefix(:=<http://e/>)\nOntology(\nSubClassOf(ObjectComplementOf(:A) :B)\n)`, 'n.ofn');
    expect(checkProfile(o).entries[0]).toMatchObject({ classification: 'alchiq', reasons: ['disjunction'] });
  });
});

describe('Horn classification agrees with the Horn-DL syntax in the literature', () => {
  // Horn-SHIQ / Horn-ALCHIQ: ≤1 and ∀ only on the right, ∃ on both sides, no disjunction on the right, no
  // negation on the left (Kazakov, IJCAI 2009 §2; Krötzsch, Rudolph & Hitzler, ACM TOCL 2013, Def. 1 — from memory).
  const cases: [string, 'horn' | 'alchiq'][] = [
    ['SubClassOf(:A ObjectMaxCardinality(1 :r :B))', 'horn'],
    ['SubClassOf(ObjectMaxCardinality(1 :r :B) :A)', 'alchiq'],
    ['SubClassOf(:A ObjectAllValuesFrom(:r :B))', 'horn'],
    ['SubClassOf(ObjectAllValuesFrom(:r :B) :A)', 'alchiq'],
    ['SubClassOf(ObjectIntersectionOf(:A :B) :C)', 'horn'],
    ['SubClassOf(ObjectUnionOf(:A :B) :C)', 'horn'],
    ['SubClassOf(:C ObjectUnionOf(:A :B))', 'alchiq'],
    ['SubClassOf(ObjectComplementOf(:A) :B)', 'alchiq'],
    ['SubClassOf(:A ObjectComplementOf(:B))', 'horn'],
    ['SubClassOf(ObjectSomeValuesFrom(:r ObjectIntersectionOf(:A ObjectSomeValuesFrom(:s :B))) :C)', 'horn'],
    ['SubClassOf(:A ObjectSomeValuesFrom(:r ObjectIntersectionOf(:B ObjectAllValuesFrom(:s :C))))', 'horn'],
    // ≤1 R.C needs C of the left-hand kind: with C = ¬B the clause ¬A(x) ∨ ¬r(x,y1) ∨ ¬r(x,y2) ∨ B(y1) ∨ B(y2) ∨ y1≈y2
    // has three positive literals (Hustadt, Motik & Sattler's clause form), so it is not Horn.
    ['SubClassOf(:A ObjectMaxCardinality(1 :r ObjectComplementOf(:B)))', 'alchiq'],
    ['SubClassOf(:A ObjectMaxCardinality(1 :r ObjectUnionOf(:B :C)))', 'horn'],
    ['SubClassOf(:A ObjectMaxCardinality(1 :r ObjectIntersectionOf(:B :C)))', 'horn'],
    ['SubClassOf(:A ObjectMinCardinality(2 :r :B))', 'horn'],
    ['SubClassOf(ObjectMinCardinality(2 :r :B) :A)', 'alchiq'],
    ['SubClassOf(:A ObjectAllValuesFrom(:r ObjectUnionOf(:B :C)))', 'alchiq'],
  ];
  for (const [text, expected] of cases) {
    it(`${text} is ${expected === 'horn' ? 'Horn' : 'not Horn'}`, () => {
      const o = parseOfn(`Prefix(:=<http://e/>)\nOntology(\n${text}\n)`, 'h.ofn');
      expect(checkProfile(o).entries[0]!.classification).toBe(expected);
    });
  }
});

describe('number restrictions past the limit of ours', () => {
  // Not a rule of ALCHIQ but a limit of ours (profile.ts, MAX_CARDINALITY): the rules of ≥n and ≤n grow with n².
  it('refuses number restrictions above 999 with the axiom and its position, and keeps 999', () => {
    const onto = parseOfn([
      'Prefix(:=<http://thence.example/check#>)',
      'Ontology(',
      'SubClassOf(:A ObjectMinCardinality(5000 :r))',
      'SubClassOf(:B ObjectMaxCardinality(1000 :r :C))',
      'SubClassOf(:D ObjectExactCardinality(999 :r))',
      ')',
    ].join('\n'), 'large.ofn');
    const large = checkProfile(onto, 'strict');
    expect(large.verdict).toBe('outside');
    const lines = byLine(large);
    for (const l of [3, 4]) {
      expect(lines.get(l)?.classification).toBe('outside');
      expect(lines.get(l)?.reasons.join(' ')).toMatch(/number restriction above 999/);
    }
    expect(lines.get(5)?.classification).not.toBe('outside');
    expect(profileDiagnostics(large).filter((d) => d.severity === 'error').map((d) => d.position)).toEqual(['large.ofn:3:1', 'large.ofn:4:1']);
  });
});
