// Term conversion between the API's inputs, the fact store's stored form (bare IRIs, `_:b` blank nodes, canonical
// N-Triples literals) and the W3C SPARQL 1.1 Query Results JSON Format (§3.2.2, "Encoding RDF terms").
import type { Response } from 'express';
import { literalToNTriples, parseStoredLiteral } from '../../reasoner/syntax/terms.js';

const XSD_STRING = 'http://www.w3.org/2001/XMLSchema#string';
const RDF_LANG_STRING = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#langString';

/** An absolute IRI (RFC 3987 scheme ":" …) without the characters N-Triples forbids inside <…> (IRIREF). */
const IRI = /^[A-Za-z][A-Za-z0-9+.-]*:[^\s<>"{}|\\^`]*$/;
/** A literal in N-Triples form: "…" with optional @lang or ^^<datatype> (N-Triples §2.4, STRING_LITERAL_QUOTE). */
const LITERAL = /^"(?:[^"\\\n\r]|\\["\\nrtbf]|\\u[0-9A-Fa-f]{4}|\\U[0-9A-Fa-f]{8})*"(?:@[A-Za-z]+(?:-[A-Za-z0-9]+)*|\^\^<[^\s<>"{}|\\^`]+>)?$/;

export function isIri(value: string): boolean {
  return IRI.test(value);
}
export function isNTriplesLiteral(value: string): boolean {
  return LITERAL.test(value);
}

/** Normalises a literal given in N-Triples form to the store's canonical form (language tag lower case, xsd:string dropped). */
export function canonicalLiteral(value: string): string {
  const parsed = parseStoredLiteral(value.replace(/\\t/g, '\t').replace(/\\u([0-9A-Fa-f]{4})/g, (_m, h: string) => String.fromCharCode(parseInt(h, 16))));
  return literalToNTriples(parsed);
}

export interface SparqlTermLike { termType: string; value: string; language?: string; datatype?: { value: string } }

/** The stored form of a constant term from a parsed query (sparqljs / RDF/JS terms). */
export function storedFromQueryTerm(term: SparqlTermLike): string {
  if (term.termType === 'NamedNode') return term.value;
  if (term.termType === 'Literal') {
    const datatype = term.language ? RDF_LANG_STRING : term.datatype?.value ?? XSD_STRING;
    return literalToNTriples({ lexical: term.value, datatype, ...(term.language ? { lang: term.language } : {}) });
  }
  throw new Error(`unexpected term type ${term.termType}`);
}

export type JsonTerm =
  | { type: 'uri'; value: string }
  | { type: 'bnode'; value: string }
  | { type: 'literal'; value: string; 'xml:lang'?: string; datatype?: string };

/** Encodes a stored term per SPARQL 1.1 Query Results JSON Format §3.2.2 (uri, literal with xml:lang or datatype, bnode). */
export function jsonTerm(stored: string): JsonTerm {
  if (stored.charCodeAt(0) === 0x22) {
    const l = parseStoredLiteral(stored);
    if (l.lang !== undefined) return { type: 'literal', value: l.lexical, 'xml:lang': l.lang };
    if (l.datatype === XSD_STRING) return { type: 'literal', value: l.lexical };
    return { type: 'literal', value: l.lexical, datatype: l.datatype };
  }
  if (stored.startsWith('_:')) return { type: 'bnode', value: stored.slice(2) };
  return { type: 'uri', value: stored };
}

/**
 * Writes a JSON answer with res.end, not res.json: Express would hash every body for an ETag, work that a query answer
 * (rarely revalidated, and cheap to recompute) does not need on the hot path. Content-Length is left to Node, which
 * sets it from the body that end() is given when no header has been sent yet.
 */
export function sendJson(res: Response, body: unknown, type = 'application/json; charset=utf-8'): void {
  res.setHeader('Content-Type', type);
  res.end(JSON.stringify(body));
}
