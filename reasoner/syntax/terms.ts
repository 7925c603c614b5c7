// Encodes literals and terms as canonical N-Triples text (W3C RDF 1.1 N-Triples §4, canonical form), the form the term dictionary stores.

import type { Literal } from '../model/axioms.js';
import { RDF_LANG_STRING, XSD_STRING } from '../model/vocabulary.js';

/** Escapes a lexical form per canonical N-Triples: only `"`, `\`, LF and CR are escaped (§4, "Canonical N-Triples"). */
export function escapeLexical(s: string): string {
  // Fast path: nothing to escape (the common case for dataset values).
  if (!/["\\\n\r]/.test(s)) return s;
  return s.replace(/["\\\n\r]/g, (c) => (c === '"' ? '\\"' : c === '\\' ? '\\\\' : c === '\n' ? '\\n' : '\\r'));
}

/** Returns the canonical N-Triples encoding of a literal; `^^xsd:string` is left out (RDF 1.1: simple literals are xsd:string). */
export function literalToNTriples(l: Literal): string {
  const q = '"' + escapeLexical(l.lexical) + '"';
  if (l.lang !== undefined && (l.datatype === RDF_LANG_STRING || l.datatype === '')) return q + '@' + l.lang.toLowerCase();
  if (l.datatype === XSD_STRING || l.datatype === '') return q;
  return q + '^^<' + l.datatype + '>';
}

/** Writes a dictionary term (see model/dictionary.ts) as an N-Triples term: `<iri>`, `_:b` or the literal as stored. */
export function termToNTriples(term: string): string {
  const c = term.charCodeAt(0);
  if (c === 0x22 || (c === 0x5f && term.charCodeAt(1) === 0x3a)) return term;
  return '<' + term + '>';
}

/** Decodes a stored literal back into its parts (inverse of literalToNTriples). */
export function parseStoredLiteral(term: string): Literal {
  const end = term.lastIndexOf('"');
  const lexical = term.slice(1, end).replace(/\\(["\\nr])/g, (_m, c: string) => (c === 'n' ? '\n' : c === 'r' ? '\r' : c));
  const rest = term.slice(end + 1);
  if (rest.startsWith('@')) return { lexical, datatype: RDF_LANG_STRING, lang: rest.slice(1) };
  if (rest.startsWith('^^<')) return { lexical, datatype: rest.slice(3, -1) };
  return { lexical, datatype: XSD_STRING };
}
