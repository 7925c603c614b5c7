// OWL 2 Functional-Style Syntax parser and writer: W3C examples, positions, round trips, hostile inputs.

import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { parseOfn, OfnSyntaxError } from '../../../reasoner/syntax/ofn-parser.js';
import { IriShortener, OfnWriter } from '../../../reasoner/syntax/ofn-writer.js';
import { loadOntology, InputError } from '../../../reasoner/intake.js';
import type { Axiom } from '../../../reasoner/model/axioms.js';
import { arbitraryAxiomBody, arbitraryClassExpression, EX } from './arbitraries.js';

const fixture = (name: string) => new URL(`../../fixtures/ontologies/${name}`, import.meta.url).pathname;
const writer = new OfnWriter(new IriShortener({}));
const doc = (body: string) => `Prefix(:=<${EX}>)\nOntology(<http://example.org/o>\n${body}\n)\n`;

/** Parses and returns the error's line and column, or fails. */
function errorAt(text: string): { line: number; column: number; message: string } {
  try {
    parseOfn(text, 'test.ofn');
  } catch (e) {
    if (e instanceof OfnSyntaxError) return { line: e.line, column: e.column, message: e.message };
    throw e;
  }
  throw new Error('expected a syntax error');
}

describe('functional-style syntax: W3C examples', () => {
  it('reads every axiom of the Structural Specification examples with its line', () => {
    // Source: W3C OWL 2 Structural Specification §8–§11 examples (from memory), fixture structural-spec-examples.ofn.
    const o = parseOfn(readFileSync(fixture('structural-spec-examples.ofn'), 'utf8'), 'spec.ofn');
    expect(o.iri).toBe('http://example.org/family');
    expect(o.axioms).toHaveLength(44);   // 48 keyword lines minus 3 Prefix and 1 Ontology
    const chain = o.axioms.find((a) => a.kind === 'SubObjectPropertyChainOf') as Extract<Axiom, { kind: 'SubObjectPropertyChainOf' }>;
    expect(chain.chain.map((p) => p.name)).toEqual(['http://example.org/family#hasMother', 'http://example.org/family#hasSister']);
    expect(chain.position.line).toBe(17);
    const key = o.axioms.find((a) => a.kind === 'HasKey') as Extract<Axiom, { kind: 'HasKey' }>;
    expect(key.dataProperties).toEqual(['http://example.org/family#hasSSN']);
    const age = o.axioms.find((a) => a.kind === 'DataPropertyAssertion') as Extract<Axiom, { kind: 'DataPropertyAssertion' | 'NegativeDataPropertyAssertion' }>;
    expect(age.value).toEqual({ lexical: '17', datatype: 'http://www.w3.org/2001/XMLSchema#integer' });
  });

  it('reads the Primer family example with prefixes, annotations and comments', () => {
    // Source: W3C OWL 2 Primer running example (from memory), fixture family-core.ofn.
    const o = parseOfn(readFileSync(fixture('family-core.ofn'), 'utf8'), 'family.ofn');
    const sub = o.axioms.find((a) => a.kind === 'SubClassOf' && a.annotations.length > 0)!;
    expect(sub.annotations[0]!.property).toBe('http://www.w3.org/2000/01/rdf-schema#comment');
    expect(sub.position).toMatchObject({ line: 28, column: 3 });
  });

  it('expands the standard prefixes without declaring them (Structural Specification §3.7)', () => {
    const o = parseOfn('Ontology(SubClassOf(owl:Nothing owl:Thing))', 'x');
    expect(writer.axiom(o.axioms[0]!)).toBe('SubClassOf(owl:Nothing owl:Thing)');
  });
});

describe('functional-style syntax: errors name line and column and what was expected', () => {
  it('points at an unknown axiom keyword', () => {
    const e = errorAt(doc('SubClassOf(:A :B)\n  SubClassOff(:A :B)'));
    expect(e).toMatchObject({ line: 4, column: 3 });
    expect(e.message).toMatch(/unknown axiom "SubClassOff"/);
  });
  it('points at a missing parenthesis', () => {
    // The ")" on line 4 closes SubClassOf, so the Ontology is left open at the end of input (line 5).
    const e = errorAt(doc('SubClassOf(:A :B'));
    expect(e.line).toBe(5);
    expect(e.message).toMatch(/expected "\)" closing the Ontology opened at line 2, found end of input/);
  });
  it('points at an undeclared prefix', () => {
    const e = errorAt(doc('SubClassOf(:A foo:B)'));
    expect(e).toMatchObject({ line: 3, column: 15 });
    expect(e.message).toMatch(/undeclared prefix "foo:"/);
  });
  it('reports an unterminated string at its opening quote', () => {
    const e = errorAt(doc('AnnotationAssertion(rdfs:label :A "abc'));
    expect(e).toMatchObject({ line: 3, column: 35 });
  });
  it('turns file errors into InputError with file:line:column', async () => {
    const err = await loadOntology({ path: 'bad.ofn' }, { text: doc('ObjectSomeValuesFrom(:r :A)') }).catch((e) => e);
    expect(err).toBeInstanceOf(InputError);
    expect(err.diagnostics[0].position).toBe('bad.ofn:3:1');
  });
});

describe('functional-style syntax: printing and re-parsing round-trips', () => {
  it('random class expressions survive write → parse (fast-check)', () => {
    fc.assert(fc.property(arbitraryClassExpression(4), arbitraryClassExpression(3), (sub, sup) => {
      const axiom = { kind: 'SubClassOf', sub, sup, id: 0, position: { source: 'x', line: 3, column: 1 }, annotations: [] } as Axiom;
      const text = writer.axiom(axiom);
      const back = parseOfn(`Ontology(\n${text}\n)`, 'x').axioms[0]!;
      expect(writer.axiom(back)).toBe(text);
      expect(back).toMatchObject({ kind: 'SubClassOf', sub, sup });
    }), { numRuns: 300 });
  });

  it('random axioms of every kind survive write → parse, with literals and annotations (fast-check)', () => {
    fc.assert(fc.property(fc.array(arbitraryAxiomBody(), { minLength: 1, maxLength: 6 }), (bodies) => {
      const axioms = bodies.map((b, id) => ({ ...b, id, position: { source: 'x', line: id + 2, column: 1 } }) as unknown as Axiom);
      const text = `Ontology(\n${axioms.map((a) => writer.axiom(a)).join('\n')}\n)`;
      const back = parseOfn(text, 'x').axioms;
      expect(back.map((a) => writer.axiom(a))).toEqual(axioms.map((a) => writer.axiom(a)));
      expect(back.map(({ id: _id, position: _p, ...rest }) => rest)).toEqual(bodies);
    }), { numRuns: 300 });
  });

  it('every fixture round-trips through the writer as a whole document', () => {
    for (const f of ['structural-spec-examples.ofn', 'family-core.ofn']) {
      const o = parseOfn(readFileSync(fixture(f), 'utf8'), f);
      const again = parseOfn(new OfnWriter(new IriShortener(o.prefixes)).ontology(o), f);
      expect(again.axioms.map((a) => writer.axiom(a))).toEqual(o.axioms.map((a) => writer.axiom(a)));
    }
  });
});

describe('functional-style syntax: hostile inputs get a clear error in bounded time', () => {
  it('refuses expressions nested deeper than the limit instead of exhausting the stack', () => {
    const depth = 200_000;
    const text = doc(`SubClassOf(:A ${'ObjectComplementOf('.repeat(depth)}:B${')'.repeat(depth)})`);
    const t0 = Date.now();
    const e = errorAt(text);
    expect(e.message).toMatch(/nested deeper than 1000 levels/);
    expect(Date.now() - t0).toBeLessThan(2000);
  });
  it('refuses a literal longer than the token limit', () => {
    const huge = 'x'.repeat(5 * 1024 * 1024);
    const e = errorAt(doc(`AnnotationAssertion(rdfs:label :A "${huge}")`));
    expect(e.message).toMatch(/string longer than/);
    expect(e.line).toBe(3);
  });
  it('refuses non-UTF-8 bytes with the position of the first bad byte', async () => {
    const bytes = Buffer.concat([Buffer.from(doc('SubClassOf(:A :B)').slice(0, 60)), Buffer.from([0xc3, 0x28]), Buffer.from(' ')]);
    const err = await loadOntology({ path: 'latin.ofn' }, { text: bytes }).catch((e) => e);
    expect(err).toBeInstanceOf(InputError);
    expect(err.diagnostics[0].message).toMatch(/UTF-8/);
    // 60 characters: line 1 has 34 with its newline, so the bad byte is the 27th character of line 2.
    expect(err.diagnostics[0].position).toBe('latin.ofn:2:27');
  });
  it('refuses absurd cardinalities', () => {
    expect(errorAt(doc('SubClassOf(:A ObjectMinCardinality(99999999999999999999 :r))')).message).toMatch(/too large/);
  });
});
