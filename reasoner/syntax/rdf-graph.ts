// Reads an RDF ontology document (Turtle, N-Triples through n3; RDF/XML through rdfxml-streaming-parser) into a list of triples with lines.

import { Parser as N3Parser, type Quad, type Term } from 'n3';
import { RdfXmlParser } from 'rdfxml-streaming-parser';
import type { Literal } from '../model/axioms.js';
import { RDF_LANG_STRING, XSD_STRING } from '../model/vocabulary.js';
import { literalToNTriples } from './terms.js';

/** A node: an IRI (bare), a blank node (`_:label`), or a literal. `key` is the dictionary encoding (model/dictionary.ts). */
export type RdfTerm =
  | { readonly kind: 'iri'; readonly key: string }
  | { readonly kind: 'blank'; readonly key: string }
  | { readonly kind: 'literal'; readonly key: string; readonly literal: Literal };

export interface RdfTriple {
  readonly s: string;
  readonly p: string;
  readonly o: RdfTerm;
  /** Line of the statement where the parser reports it (0 when unknown). */
  readonly line: number;
  /** Index of the triple in its graph (0, 1, 2, … in reading order). */
  readonly i: number;
}

/** An RDF syntax error with the line (and column where known). */
export class RdfSyntaxError extends Error {
  constructor(message: string, readonly line: number, readonly column = 0) {
    super(message);
    this.name = 'RdfSyntaxError';
  }
}

/** Converts an RDF/JS term from the parsers. */
export function fromRdfJs(t: Term): RdfTerm {
  if (t.termType === 'NamedNode') return { kind: 'iri', key: t.value };
  if (t.termType === 'BlankNode') return { kind: 'blank', key: '_:' + t.value };
  if (t.termType === 'Literal') {
    const lang = t.language ? t.language.toLowerCase() : undefined;
    const datatype = lang ? RDF_LANG_STRING : t.datatype?.value || XSD_STRING;
    const literal: Literal = lang ? { lexical: t.value, datatype, lang } : { lexical: t.value, datatype };
    return { kind: 'literal', key: literalToNTriples(literal), literal };
  }
  throw new RdfSyntaxError(`unsupported RDF term (${t.termType}): quoted triples and variables are not OWL`, 0);
}

/** Writes a triple as N-Triples-like text, for positions. */
export function tripleText(t: { s: string; p: string; o: RdfTerm }): string {
  const node = (k: string) => (k.startsWith('_:') || k.startsWith('"') ? k : `<${k}>`);
  const o = t.o.key.length > 200 ? node(t.o.key.slice(0, 200)) + '…' : node(t.o.key);
  return `${node(t.s)} <${t.p}> ${o} .`;
}

/** Parses Turtle or N-Triples text (n3.js). The line of each triple is that of the token that completed it. */
export function parseTurtle(text: string, format: 'turtle' | 'ntriples', baseIRI?: string, prefixes: Record<string, string> = {}): Promise<RdfTriple[]> {
  const parser = new N3Parser({ format: format === 'ntriples' ? 'N-Triples' : 'Turtle', baseIRI });
  const triples: RdfTriple[] = [];
  let line = 1;
  return new Promise((resolve, reject) => {
    let settled = false;
    parser.parse(text, {
      onToken: (token: { line?: number }) => { if (token.line) line = token.line; },
      onPrefix: (prefix: string, iri: { value: string }) => { prefixes[prefix + ':'] = iri.value; },
      onQuad: (error: Error | null | undefined, quad: Quad | null | undefined) => {
        if (settled) return;
        if (error) {
          settled = true;
          const e = error as Error & { context?: { line?: number } };
          const at = e.context?.line ?? Number(/on line (\d+)/.exec(e.message)?.[1] ?? line);
          reject(new RdfSyntaxError(e.message.replace(/\s*on line \d+\.?$/, ''), at));
          return;
        }
        if (!quad) { settled = true; resolve(triples); return; }
        if (quad.graph.termType !== 'DefaultGraph') return;
        if (quad.subject.termType !== 'NamedNode' && quad.subject.termType !== 'BlankNode') return;
        try {
          triples.push({ s: fromRdfJs(quad.subject).key, p: quad.predicate.value, o: fromRdfJs(quad.object), line, i: triples.length });
        } catch (e) { settled = true; reject(e); }
      },
    } as never);
  });
}

export interface XmlLimits {
  /** Most entity declarations accepted in a DOCTYPE (default 256). */
  readonly maxEntities?: number;
  /** Longest entity value (default 2048 characters). */
  readonly maxEntityLength?: number;
  /** Text after entity expansion may grow to at most this many times the input plus 1 MiB (default 4). */
  readonly maxExpansionRatio?: number;
}

/**
 * Expands the DOCTYPE's internal entities ourselves, then hands the parser a document without DOCTYPE.
 * Why: RDF/XML written by ontology editors declares `<!ENTITY owl "http://…#">` and uses `&owl;Thing`, so a
 * blanket refusal would reject common files; but entity expansion is the "billion laughs" attack. So: only
 * internal general entities whose value holds no markup and no other entity reference (no nesting, hence no
 * exponential growth), a bounded number and length, and a bound on the total expanded size. External
 * (SYSTEM/PUBLIC) and parameter entities are refused: they would read files or the network.
 */
export function expandXmlEntities(text: string, limits: XmlLimits = {}): string {
  const start = text.search(/<!DOCTYPE/);
  if (start < 0) {
    if (/<!ENTITY/.test(text)) throw new RdfSyntaxError('entity declaration outside a DOCTYPE', lineAt(text, text.search(/<!ENTITY/)));
    return text;
  }
  const open = text.indexOf('[', start), gt = text.indexOf('>', start);
  let end: number, subset = '';
  if (open >= 0 && (gt < 0 || open < gt)) {
    const close = text.indexOf(']', open);
    if (close < 0) throw new RdfSyntaxError('unterminated DOCTYPE internal subset: expected "]>"', lineAt(text, start));
    subset = text.slice(open + 1, close);
    end = text.indexOf('>', close) + 1;
  } else {
    end = gt + 1;
  }
  const header = text.slice(start, open >= 0 && open < end ? open : end);
  if (/\b(SYSTEM|PUBLIC)\b/.test(header)) throw new RdfSyntaxError('external DTD refused (DOCTYPE with SYSTEM or PUBLIC)', lineAt(text, start));
  const entities = new Map<string, string>();
  const maxEntities = limits.maxEntities ?? 256, maxLength = limits.maxEntityLength ?? 2048;
  const declaration = /<!ENTITY\s+(%\s+)?([A-Za-z_][\w.\-]*)\s+(?:"([^"]*)"|'([^']*)'|(SYSTEM|PUBLIC)[^>]*)\s*>/g;
  let m: RegExpExecArray | null, seen = 0;
  while ((m = declaration.exec(subset))) {
    const line = lineAt(text, (open >= 0 ? open + 1 : 0) + m.index);
    if (m[1]) throw new RdfSyntaxError(`parameter entity "%${m[2]}" refused`, line);
    if (m[5]) throw new RdfSyntaxError(`external entity "${m[2]}" refused`, line);
    const value = m[3] ?? m[4] ?? '';
    if (/[<&%]/.test(value)) throw new RdfSyntaxError(`entity "${m[2]}" refused: its value contains markup or another entity reference (nested expansion)`, line);
    if (value.length > maxLength) throw new RdfSyntaxError(`entity "${m[2]}" refused: value longer than ${maxLength} characters`, line);
    if (++seen > maxEntities) throw new RdfSyntaxError(`more than ${maxEntities} entity declarations`, line);
    entities.set(m[2]!, value);
  }
  if (/<!ENTITY/.test(subset.replace(declaration, ''))) throw new RdfSyntaxError('malformed entity declaration in DOCTYPE', lineAt(text, start));
  // Keep the line count: the DOCTYPE is replaced by as many newlines as it spanned.
  const blank = text.slice(start, end).replace(/[^\n]/g, '');
  const rest = text.slice(end);
  const budget = (limits.maxExpansionRatio ?? 4) * text.length + (1 << 20);
  let grown = 0;
  const expanded = rest.replace(/&([A-Za-z_][\w.\-]*);/g, (whole, name: string) => {
    if (/^(amp|lt|gt|quot|apos)$/.test(name)) return whole;
    const value = entities.get(name);
    if (value === undefined) throw new RdfSyntaxError(`undeclared entity "&${name};"`, 0);
    grown += value.length;
    if (grown > budget) throw new RdfSyntaxError('entity expansion exceeds the size limit', 0);
    return value;
  });
  return text.slice(0, start) + blank + expanded;
}

function lineAt(text: string, offset: number): number {
  let line = 1;
  for (let i = 0; i < offset && i < text.length; i++) if (text.charCodeAt(i) === 0x0a) line++;
  return line;
}

/** Parses RDF/XML text (entities expanded by expandXmlEntities first; the parser never sees a DOCTYPE). */
export async function parseRdfXml(text: string, baseIRI?: string, limits?: XmlLimits, prefixes: Record<string, string> = {}): Promise<RdfTriple[]> {
  const safe = expandXmlEntities(text, limits);
  // The parser reports no namespace events: read the xmlns declarations (for printing names short) ourselves.
  for (const m of safe.slice(0, 1 << 16).matchAll(/\bxmlns(?::([A-Za-z_][\w.\-]*))?\s*=\s*(?:"([^"]*)"|'([^']*)')/g)) {
    const ns = m[2] ?? m[3] ?? '';
    if (/^[a-z][a-z0-9+.\-]*:/i.test(ns)) prefixes[(m[1] ?? '') + ':'] ??= ns;
  }
  const parser = new RdfXmlParser({ baseIRI, trackPosition: true });
  const triples: RdfTriple[] = [];
  const sax = (parser as unknown as { saxParser?: { line?: number } }).saxParser;
  return new Promise((resolve, reject) => {
    parser.on('data', (quad: Quad) => {
      if (quad.graph.termType !== 'DefaultGraph') return;
      try {
        triples.push({ s: fromRdfJs(quad.subject).key, p: quad.predicate.value, o: fromRdfJs(quad.object), line: sax?.line ?? 0, i: triples.length });
      } catch (e) { reject(e); }
    });
    parser.on('error', (e: Error) => {
      const line = Number(/[Ll]ine:?\s*(\d+)/.exec(e.message)?.[1] ?? sax?.line ?? 0);
      const column = Number(/[Cc]olumn:?\s*(\d+)/.exec(e.message)?.[1] ?? 0);
      reject(new RdfSyntaxError(e.message.replace(/^Line \d+ column \d+: /, '').split('\n')[0]!, line, column));
    });
    parser.on('end', () => resolve(triples));
    // Feed in slices so a huge document does not become one parser call.
    const step = 1 << 16;
    for (let i = 0; i < safe.length; i += step) parser.write(safe.slice(i, i + step));
    parser.end();
  });
}
