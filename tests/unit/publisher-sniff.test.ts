// Upload type checks: extension plus a sniff of the first bytes, against the openings of the W3C specifications' own examples.
import { describe, expect, it } from 'vitest';
import { csvHeader, sniffFormat } from '../../server/services/uploads.js';

const b = (text: string) => Buffer.from(text);

describe('sniffFormat', () => {
  it('accepts the openings of the specifications’ examples', () => {
    // OWL 2 Primer (W3C, 2012), §4 functional-syntax examples open with Prefix(...) declarations.
    expect(sniffFormat('ontology', 'families.ofn', b('Prefix(:=<http://example.com/owl/families/>)\nOntology(<http://example.com/owl/families>\n'))).toBe('ofn');
    // RDF 1.1 XML Syntax (W3C, 2014), Example 1 opens with the XML declaration and rdf:RDF.
    expect(sniffFormat('ontology', 'families.owl', b('<?xml version="1.0"?>\n<rdf:RDF xmlns:rdf="http://www.w3.org/1999/02/22-rdf-syntax-ns#">'))).toBe('rdfxml');
    // An .owl file may equally hold functional syntax.
    expect(sniffFormat('ontology', 'families.owl', b('Ontology(<http://example.com/owl/families>)'))).toBe('ofn');
    // RDF 1.1 Turtle (W3C, 2014), Example 1 opens with @base, then @prefix.
    expect(sniffFormat('dataset', 'spiderman.ttl', b('@base <http://example.org/> .\n@prefix rdf: <http://www.w3.org/1999/02/22-rdf-syntax-ns#> .'))).toBe('turtle');
    expect(sniffFormat('ontology', 'o.ttl', b('# comment first\nPREFIX ex: <http://example.org/>\n'))).toBe('turtle');
    // RDF 1.1 N-Triples (W3C, 2014), Example 1: a line starting with an IRI; blank nodes start with _: (§2.3).
    expect(sniffFormat('dataset', 'd.nt', b('<http://one.example/subject1> <http://one.example/predicate1> <http://one.example/object1> . # comments here\n'))).toBe('ntriples');
    expect(sniffFormat('dataset', 'd.nt', b('\uFEFF_:subject1 <http://an.example/predicate1> "object1" .\n'))).toBe('ntriples');
    expect(sniffFormat('dataset', 'd.csv', b('id,name\nx,y\n'))).toBe('csv');
  });

  it('refuses wrong extensions, wrong roles and content of another kind, naming the file', () => {
    expect(() => sniffFormat('dataset', 'o.ofn', b('Prefix(:=<http://e/>)'))).toThrow(/o\.ofn: a dataset file must end in/);
    expect(() => sniffFormat('ontology', 'o.csv', b('a,b'))).toThrow(/o\.csv/);
    expect(() => sniffFormat('ontology', 'o.ofn', b('<?xml version="1.0"?>'))).toThrow(/functional-style/);
    expect(() => sniffFormat('dataset', 'd.nt', b('@prefix ex: <http://e/> .'))).toThrow(/N-Triples/);
    expect(() => sniffFormat('dataset', 'd.nt', Buffer.from([0x1f, 0x8b, 0x08, 0x00]))).toThrow(/NUL bytes/);
    expect(() => sniffFormat('ontology', 'o.ofn', Buffer.alloc(0))).toThrow(/empty/);
  });
});

describe('csvHeader', () => {
  it('splits fields with quotes and doubled quotes (RFC 4180 §2, rules 5–7)', () => {
    expect(csvHeader(b('id,"full name","say ""hi""",x\r\n1,2,3,4'))).toEqual(['id', 'full name', 'say "hi"', 'x']);
  });
});
