// RDF-based ontologies: the reverse of the W3C OWL 2 Mapping to RDF Graphs, across Turtle, N-Triples and RDF/XML.

import { describe, expect, it } from 'vitest';
import { loadOntology, InputError } from '../../../reasoner/intake.js';
import { IriShortener, OfnWriter } from '../../../reasoner/syntax/ofn-writer.js';
import { expandXmlEntities } from '../../../reasoner/syntax/rdf-graph.js';
import type { Ontology } from '../../../reasoner/model/axioms.js';

const fixture = (name: string) => new URL(`../../fixtures/ontologies/${name}`, import.meta.url).pathname;
const writer = new OfnWriter(new IriShortener({}));
const axiomSet = (o: Ontology) => o.axioms.map((a) => writer.axiom(a)).sort();
const ttl = (body: string) => `@prefix : <http://e/> .\n@prefix owl: <http://www.w3.org/2002/07/owl#> .\n@prefix rdfs: <http://www.w3.org/2000/01/rdf-schema#> .\n@prefix xsd: <http://www.w3.org/2001/XMLSchema#> .\n${body}\n`;
const fromTurtle = async (body: string) => (await loadOntology({ path: 'm.ttl' }, { text: ttl(body) })).ontology;
const texts = async (body: string) => (await fromTurtle(body)).axioms.map((a) => new OfnWriter(new IriShortener({ ':': 'http://e/' })).axiom(a));

describe('the same ontology in three syntaxes yields the same axiom set', () => {
  it('Functional-Style Syntax, Turtle and RDF/XML agree on the family fixture', async () => {
    // Source: fixtures family-core.* (W3C OWL 2 Primer running example, from memory; RDF by the Mapping to RDF Graphs).
    const [ofn, turtle, xml] = await Promise.all(['family-core.ofn', 'family-core.ttl', 'family-core.rdf'].map((f) => loadOntology({ path: fixture(f) })));
    expect(ofn!.ontology.axioms).toHaveLength(47);
    expect(axiomSet(turtle!.ontology)).toEqual(axiomSet(ofn!.ontology));
    expect(axiomSet(xml!.ontology)).toEqual(axiomSet(ofn!.ontology));
    expect(turtle!.diagnostics).toEqual([]);
    expect(xml!.diagnostics).toEqual([]);
  });
});

describe('reverse mapping (W3C OWL 2 Mapping to RDF Graphs §3, Tables 8–18)', () => {
  it('maps restrictions, inverses and lists inside blank nodes (Tables 11, 13)', async () => {
    expect(await texts(':A rdfs:subClassOf [ a owl:Restriction ; owl:onProperty [ owl:inverseOf :r ] ; owl:allValuesFrom [ owl:unionOf ( :B :C ) ] ] .'))
      .toEqual(['SubClassOf(:A ObjectAllValuesFrom(ObjectInverseOf(:r) ObjectUnionOf(:B :C)))']);
  });
  it('maps unqualified cardinalities and owl:hasSelf / owl:hasValue (Table 13)', async () => {
    expect(await texts(':A rdfs:subClassOf [ a owl:Restriction ; owl:onProperty :r ; owl:maxCardinality "1"^^xsd:nonNegativeInteger ] .\n:B owl:equivalentClass [ a owl:Restriction ; owl:onProperty :r ; owl:hasSelf true ] .\n:C owl:equivalentClass [ a owl:Restriction ; owl:onProperty :r ; owl:hasValue :x ] .'))
      .toEqual(['SubClassOf(:A ObjectMaxCardinality(1 :r))', 'EquivalentClasses(:B ObjectHasSelf(:r))', 'EquivalentClasses(:C ObjectHasValue(:r :x))']);
  });
  it('maps data restrictions when the property is a declared data property', async () => {
    expect(await texts(':age a owl:DatatypeProperty .\n:Adult owl:equivalentClass [ a owl:Restriction ; owl:onProperty :age ; owl:someValuesFrom [ a rdfs:Datatype ; owl:onDatatype xsd:integer ; owl:withRestrictions ( [ xsd:minInclusive 18 ] ) ] ] .'))
      .toEqual(['Declaration(DataProperty(:age))', 'EquivalentClasses(:Adult DataSomeValuesFrom(:age DatatypeRestriction(xsd:integer xsd:minInclusive "18"^^xsd:integer)))']);
  });
  it('maps owl:AllDisjointProperties, property chains, keys and characteristics (Tables 16–17)', async () => {
    expect(await texts(':r a owl:ObjectProperty .\n:s a owl:ObjectProperty .\n[] a owl:AllDisjointProperties ; owl:members ( :r :s ) .\n:t owl:propertyChainAxiom ( :r :s ) .\n:A owl:hasKey ( :r ) .\n:r a owl:TransitiveProperty , owl:InverseFunctionalProperty .'))
      .toEqual(['Declaration(ObjectProperty(:r))', 'Declaration(ObjectProperty(:s))', 'SubObjectPropertyOf(ObjectPropertyChain(:r :s) :t)', 'HasKey(:A (:r) ())',
        'TransitiveObjectProperty(:r)', 'InverseFunctionalObjectProperty(:r)', 'DisjointObjectProperties(:r :s)']);
  });
  it('maps a GCI whose left side is a blank node, and a class assertion of a complex class', async () => {
    expect(await texts('[ owl:intersectionOf ( :A :B ) ] rdfs:subClassOf :C .\n:x a [ owl:complementOf :A ] .'))
      .toEqual(['SubClassOf(ObjectIntersectionOf(:A :B) :C)', 'ClassAssertion(ObjectComplementOf(:A) :x)']);
  });
  it('attaches reified axiom annotations to their axiom (§3.2.5)', async () => {
    const o = await fromTurtle(':A rdfs:subClassOf :B .\n[] a owl:Axiom ; owl:annotatedSource :A ; owl:annotatedProperty rdfs:subClassOf ; owl:annotatedTarget :B ; rdfs:comment "why" .');
    expect(o.axioms).toHaveLength(1);
    expect(o.axioms[0]!.annotations[0]!.value).toEqual({ kind: 'literal', literal: { lexical: 'why', datatype: 'http://www.w3.org/2001/XMLSchema#string' } });
  });
  it('positions RDF axioms by line and triple', async () => {
    const o = await fromTurtle('\n:A rdfs:subClassOf :B .');
    expect(o.axioms[0]!.position).toMatchObject({ source: 'm.ttl', line: 6, triple: '<http://e/A> <http://www.w3.org/2000/01/rdf-schema#subClassOf> <http://e/B> .' });
  });
  it('reports triples that belong to no axiom instead of losing them silently', async () => {
    const { diagnostics } = await loadOntology({ path: 'w.ttl' }, { text: ttl('_:x owl:onClass :A .') });
    expect(diagnostics.map((d) => d.message).join('\n')).toMatch(/triple not part of any axiom: _:\S+ <http:\/\/www.w3.org\/2002\/07\/owl#onClass> <http:\/\/e\/A>/);
  });
});

describe('RDF errors name the line or the triple', () => {
  it('a Turtle syntax error names its line', async () => {
    const err = await loadOntology({ path: 'bad.ttl' }, { text: ttl(':A rdfs:subClassOf :B .\n:C rdfs:subClassOf .') }).catch((e) => e);
    expect(err).toBeInstanceOf(InputError);
    expect(err.diagnostics[0].position).toBe('bad.ttl:6');
  });
  it('a malformed list names the triple', async () => {
    const err = await loadOntology({ path: 'list.ttl' }, { text: ttl(':A owl:equivalentClass [ owl:intersectionOf :B ] .') }).catch((e) => e);
    expect(err).toBeInstanceOf(InputError);
    expect(err.diagnostics[0].message).toMatch(/expected an RDF list.*triple _:\S+ <http:\/\/www.w3.org\/2002\/07\/owl#intersectionOf> <http:\/\/e\/B>/);
  });
  it('an RDF/XML error names its line', async () => {
    const err = await loadOntology({ path: 'bad.rdf' }, { text: '<?xml version="1.0"?>\n<rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#">\n<rdf:Description rdf:about="http://e/a">\n</rdf:RDF>' }).catch((e) => e);
    expect(err).toBeInstanceOf(InputError);
    expect(err.diagnostics[0].position).toMatch(/^bad\.rdf:4/);
  });
});

describe('RDF/XML entity expansion is refused where it could blow up (GUIDE: security habits)', () => {
  const bomb = `<?xml version="1.0"?>
<!DOCTYPE rdf:RDF [
  <!ENTITY lol "lol">
  <!ENTITY lol1 "&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;">
  <!ENTITY lol2 "&lol1;&lol1;&lol1;&lol1;&lol1;&lol1;&lol1;&lol1;&lol1;&lol1;">
  <!ENTITY lol9 "&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;">
]>
<rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#" xmlns:rdfs="http://www.w3.org/2000/01/rdf-schema#">
  <rdf:Description rdf:about="http://e/a"><rdfs:label>&lol9;</rdfs:label></rdf:Description>
</rdf:RDF>`;
  it('refuses the "billion laughs" nested entities quickly, naming the line', async () => {
    const t0 = Date.now();
    const err = await loadOntology({ path: 'bomb.rdf' }, { text: bomb }).catch((e) => e);
    expect(err).toBeInstanceOf(InputError);
    expect(err.diagnostics[0]).toMatchObject({ position: 'bomb.rdf:4', message: expect.stringMatching(/nested expansion/) });
    expect(Date.now() - t0).toBeLessThan(1000);
  });
  it('refuses external entities (they would read files)', () => {
    expect(() => expandXmlEntities('<!DOCTYPE r [ <!ENTITY x SYSTEM "file:///etc/passwd"> ]><r>&x;</r>')).toThrow(/external entity "x" refused/);
    expect(() => expandXmlEntities('<!DOCTYPE r SYSTEM "http://e/dtd"><r/>')).toThrow(/external DTD refused/);
    expect(() => expandXmlEntities('<!DOCTYPE r [ <!ENTITY % p "x"> ]><r/>')).toThrow(/parameter entity/);
  });
  it('bounds the total expansion of flat entities (quadratic blow-up)', () => {
    const refs = '&big;'.repeat(20_000);
    expect(() => expandXmlEntities(`<!DOCTYPE r [ <!ENTITY big "${'x'.repeat(2000)}"> ]><r>${refs}</r>`)).toThrow(/exceeds the size limit/);
  });
  it('expands flat namespace entities as editors write them', () => {
    expect(expandXmlEntities('<!DOCTYPE r [\n<!ENTITY owl "http://www.w3.org/2002/07/owl#">\n]><r a="&owl;Thing"/>')).toBe('\n\n<r a="http://www.w3.org/2002/07/owl#Thing"/>');
  });
});

describe('RDF hostile nesting', () => {
  it('refuses class expressions nested deeper than 1000 blank nodes with a clear error', async () => {
    const depth = 5000;
    const body = ':A rdfs:subClassOf ' + '[ owl:complementOf '.repeat(depth) + ':B' + ' ]'.repeat(depth) + ' .';
    const err = await loadOntology({ path: 'deep.ttl' }, { text: ttl(body) }).catch((e) => e);
    expect(err).toBeInstanceOf(InputError);
    expect(err.diagnostics[0].message).toMatch(/nested deeper than 1000 levels/);
  });
});

describe('reverse mapping inverts the forward mapping on random class expressions (fast-check)', () => {
  it('SubClassOf axioms written per the Mapping (Tables 1, 16) read back to the same axioms', async () => {
    const fc = (await import('fast-check')).default;
    const { arbitraryClassExpression } = await import('./arbitraries.js');
    const { subClassOfTurtle } = await import('./turtle-writer.js');
    const { OfnWriter: Writer, IriShortener: Shortener } = await import('../../../reasoner/syntax/ofn-writer.js');
    const w = new Writer(new Shortener({}));
    await fc.assert(fc.asyncProperty(fc.array(fc.tuple(arbitraryClassExpression(4), arbitraryClassExpression(4)), { minLength: 1, maxLength: 4 }), async (pairs) => {
      const { ontology, diagnostics } = await loadOntology({ path: 'r.ttl' }, { text: subClassOfTurtle(pairs) });
      expect(diagnostics).toEqual([]);
      const expected = pairs.map(([sub, sup]) => w.axiom({ kind: 'SubClassOf', sub, sup, id: 0, position: { source: '', line: 0, column: 0 }, annotations: [] } as never));
      expect(ontology.axioms.map((a) => w.axiom(a))).toEqual(expected);
    }), { numRuns: 200 });
  });
});

describe('unsupported syntaxes get a clear message', () => {
  it('OWL/XML is recognised and refused by name', async () => {
    const owlXml = '<?xml version="1.0"?>\n<Ontology xmlns="http://www.w3.org/2002/07/owl#" ontologyIRI="http://e/o">\n<Declaration><Class IRI="#A"/></Declaration>\n</Ontology>\n';
    const err = await loadOntology({ path: 'o.owl' }, { text: owlXml }).catch((e) => e);
    expect(err).toBeInstanceOf(InputError);
    expect(err.diagnostics[0].message).toMatch(/OWL\/XML/);
  });
  it('RDF/XML in a .owl file is sniffed and read', async () => {
    const { ontology } = await loadOntology({ path: 'o.owl' }, { text: '<?xml version="1.0"?>\n<rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#" xmlns:owl="http://www.w3.org/2002/07/owl#">\n<owl:Class rdf:about="http://e/A"/>\n</rdf:RDF>\n' });
    expect(ontology.format).toBe('rdfxml');
    expect(ontology.axioms).toHaveLength(1);
  });
});

describe('annotations with undeclared properties (common practice: Dublin Core on headers and axioms)', () => {
  it('reads them as ontology and axiom annotations, not as data facts', async () => {
    const o = await fromTurtle('@prefix dc: <http://purl.org/dc/elements/1.1/> .\n<http://e/o> a owl:Ontology ; dc:creator "A. Author" .\n:A rdfs:subClassOf :B .\n[] a owl:Axiom ; owl:annotatedSource :A ; owl:annotatedProperty rdfs:subClassOf ; owl:annotatedTarget :B ; dc:source "p. 3" .');
    expect(o.annotations.map((a) => a.property)).toEqual(['http://purl.org/dc/elements/1.1/creator']);
    expect(o.axioms).toHaveLength(1);
    expect(o.axioms[0]!.annotations.map((a) => a.property)).toEqual(['http://purl.org/dc/elements/1.1/source']);
  });
});
