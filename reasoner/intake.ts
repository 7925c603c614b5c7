// Intake facade: ontology and datasets in (parse), ALCHIQ profile check, normal form out. The rest of the reasoner calls only this.

import { isUtf8 } from 'node:buffer';
import { readFile, stat } from 'node:fs/promises';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { DatasetSource, Diagnostic, OntologyFormat, OntologySource, ProfileMode, ProfileReport, Progress } from './api.js';
import type { Axiom, Ontology } from './model/axioms.js';
import { assemble, normaliseAxioms } from './normal/normalise.js';
import { checkProfile, normalFormCache } from './profile/profile.js';
import { AboxBuilder, LineError, datasetFormat, readCsv, readNTriples, readTurtle, type IntakeCounts, type ReadOptions } from './syntax/dataset-readers.js';
import { OfnSyntaxError, parseOfn } from './syntax/ofn-parser.js';
import { RdfSyntaxError, parseRdfXml, parseTurtle } from './syntax/rdf-graph.js';
import { rdfToOntology } from './syntax/rdf-to-owl.js';
import type { NormalOntology } from './model/normal.js';
import type { TermDictionary } from './model/dictionary.js';
import type { Abox } from './model/abox.js';

export type { Ontology, Axiom } from './model/axioms.js';
export type { IntakeCounts } from './syntax/dataset-readers.js';
export { formatPosition } from './model/axioms.js';
export { profileDiagnostics } from './profile/profile.js';

/** An input problem (syntax error, unreadable file, bad encoding): carries every diagnostic, each with file:line:column. */
export class InputError extends Error {
  readonly diagnostics: readonly Diagnostic[];

  constructor(diagnostics: readonly Diagnostic[]) {
    const first = diagnostics[0];
    super(first ? `${first.position}: ${first.message}` : 'input error');
    this.name = 'InputError';
    this.diagnostics = diagnostics;
  }
}

export interface LoadOntologyOptions {
  /** Parse this text instead of reading `source.path` (which is then only the name used in positions). */
  readonly text?: string | Uint8Array;
  /** Refuse files larger than this (default 512 MiB). */
  readonly maxBytes?: number;
  readonly signal?: AbortSignal;
}

/** The profile report plus the axioms that the normaliser may use (all logical in-profile axioms). */
export interface ProfileResult extends ProfileReport {
  /** Axioms kept for reasoning: in strict mode all logical axioms when none is outside, else none; in approximate mode the in-profile ones. */
  readonly kept: readonly Axiom[];
}

export interface LoadDatasetsOptions {
  readonly signal?: AbortSignal;
  readonly onProgress?: (progress: Progress) => void;
  /** Refuse a line (N-Triples) or a token (Turtle) longer than this many bytes (default 16 MiB). */
  readonly maxLineBytes?: number;
}

/** Guesses the ontology format: declared, else by extension, else by the first bytes. */
export function ontologyFormat(path: string, head: string, declared?: OntologyFormat): OntologyFormat {
  if (declared) return declared;
  if (/\.(ofn|fss)$/i.test(path)) return 'ofn';
  if (/\.(ttl|turtle)$/i.test(path)) return 'turtle';
  if (/\.nt$/i.test(path)) return 'ntriples';
  if (/\.(rdf|xml)$/i.test(path)) return 'rdfxml';
  const start = head.replace(/^\uFEFF/, '').replace(/^(\s|#[^\n]*\n)*/, '');
  if (/^(Prefix|Ontology)\s*\(/.test(start)) return 'ofn';
  if (start.startsWith('<?xml') || /^<(rdf:RDF|RDF)\b/.test(start) || start.startsWith('<!DOCTYPE')) return 'rdfxml';
  return 'turtle';
}

const DEFAULT_MAX_BYTES = 512 * 1024 * 1024;

/** True when the XML document's root element is OWL/XML's `Ontology` rather than `rdf:RDF` (or a node element). */
function isOwlXml(text: string): boolean {
  const head = text.slice(0, 1 << 16).replace(/<\?[\s\S]*?\?>|<!--[\s\S]*?-->|<!DOCTYPE[^[>]*(\[[\s\S]*?\])?\s*>/g, '');
  const root = /<([A-Za-z_][\w.\-]*:)?([A-Za-z_][\w.\-]*)/.exec(head);
  return !!root && root[2] === 'Ontology' && !/^rdf:/.test(root[1] ?? '');
}

/** Returns `file:line:column` of the first invalid UTF-8 byte. */
function badUtf8Position(name: string, bytes: Uint8Array): string {
  const buf = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  let line = 1, lineStart = 0;
  for (let i = 0; i < buf.length; i++) {
    if (buf[i] === 0x0a) { line++; lineStart = i + 1; continue; }
    if (buf[i]! < 0x80) continue;
    const need = buf[i]! >= 0xf0 ? 4 : buf[i]! >= 0xe0 ? 3 : buf[i]! >= 0xc2 ? 2 : 0;
    if (need === 0 || i + need > buf.length || !isUtf8(buf.subarray(i, i + need))) {
      return `${name}:${line}:${buf.toString('utf8', lineStart, i).length + 1}`;
    }
    i += need - 1;
  }
  return `${name}:${line}:1`;
}

function inputError(position: string, message: string): InputError {
  return new InputError([{ severity: 'error', position, message }]);
}

/**
 * Reads an ontology in OWL 2 Functional-Style Syntax, Turtle, N-Triples or RDF/XML (format from `source.format`,
 * else from the extension, else sniffed). Throws `InputError` on any syntax error (position file:line:column);
 * returns warnings (e.g. imports not followed, RDF triples that belong to no axiom) as diagnostics.
 */
export async function loadOntology(source: OntologySource, opts: LoadOntologyOptions = {}): Promise<{ ontology: Ontology; diagnostics: Diagnostic[] }> {
  const name = source.path;
  const maxBytes = opts.maxBytes ?? DEFAULT_MAX_BYTES;
  let bytes: Uint8Array;
  if (opts.text !== undefined) {
    bytes = typeof opts.text === 'string' ? Buffer.from(opts.text, 'utf8') : opts.text;
  } else {
    let size: number;
    try { size = (await stat(name)).size; } catch (e) { throw inputError(name, `cannot read the file: ${(e as NodeJS.ErrnoException).code ?? (e as Error).message}`); }
    if (size > maxBytes) throw inputError(name, `file is ${size} bytes; the limit is ${maxBytes}`);
    bytes = await readFile(name);
  }
  if (bytes.byteLength > maxBytes) throw inputError(name, `input is ${bytes.byteLength} bytes; the limit is ${maxBytes}`);
  opts.signal?.throwIfAborted();
  if (!isUtf8(bytes)) throw inputError(badUtf8Position(name, bytes), 'invalid UTF-8 byte sequence: the file must be UTF-8');
  const text = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength).toString('utf8');
  const format = ontologyFormat(name, text.slice(0, 512), source.format);
  const diagnostics: Diagnostic[] = [];
  if (!source.format && /^(\uFEFF)?(\s|#[^\n]*\n)*(Prefix|Ontology):\s/.test(text.slice(0, 4096))) {
    throw inputError(name, 'this looks like Manchester syntax ("Prefix:" / "Ontology:"), which Thence does not read: save it as Functional-Style Syntax, Turtle or RDF/XML');
  }
  if (format === 'rdfxml' && isOwlXml(text)) {
    throw inputError(name, 'this is OWL/XML (root element Ontology), which Thence does not read: save it as Functional-Style Syntax, Turtle or RDF/XML');
  }
  let ontology: Ontology;
  try {
    if (format === 'ofn') {
      ontology = parseOfn(text, name, { onWarning: (message, line, column) => diagnostics.push({ severity: 'warning', position: `${name}:${line}:${column}`, message }) });
    } else {
      const prefixes: Record<string, string> = {};
      const base = /^[a-z][a-z0-9+.-]*:/i.test(name) ? name : pathToFileURL(resolve(name)).href;
      const triples = format === 'rdfxml' ? await parseRdfXml(text, base, undefined, prefixes) : await parseTurtle(text, format, base, prefixes);
      ontology = rdfToOntology(triples, name, format, prefixes);
    }
  } catch (e) {
    if (e instanceof OfnSyntaxError) throw inputError(`${name}:${e.line}:${e.column}`, e.message);
    if (e instanceof RdfSyntaxError) throw inputError(e.line ? `${name}:${e.line}${e.column ? ':' + e.column : ''}` : name, e.message);
    if (e instanceof RangeError) throw inputError(name, `input too deeply nested or too large (${e.message})`);
    throw e;
  }
  for (const i of ontology.imports) diagnostics.push({ severity: 'warning', position: name, message: `import of <${i}> is not followed: upload the imported ontology's axioms in the same file` });
  for (const w of ontology.warnings ?? []) diagnostics.push({ severity: 'warning', position: name, message: w });
  return { ontology, diagnostics };
}

/** Classifies every logical axiom (Horn-ALCHIQ, ALCHIQ, outside) and decides what is kept, per mode. */
export function profile(ontology: Ontology, mode: ProfileMode = 'strict'): ProfileResult {
  return checkProfile(ontology, mode);
}

/** Normal form of the kept axioms (and of the assertions among them). */
export function normalise(ontology: Ontology, keptAxioms: readonly Axiom[]): NormalOntology {
  // The profile check already normalised each in-profile axiom; reuse its slices when it covers them all.
  const cached = normalFormCache.get(ontology);
  if (cached && keptAxioms.every((a) => cached.slices.has(a.id))) {
    return assemble(ontology.axioms, cached.normaliser, keptAxioms.map((a) => cached.slices.get(a.id)!));
  }
  return normaliseAxioms(ontology.axioms, keptAxioms);
}

/**
 * Streams datasets (N-Triples, Turtle, CSV with a mapping) into `abox`, interning terms in `dictionary`.
 * Throws `InputError` on syntax errors (with file:line:column); rejects with an AbortError when `signal` aborts.
 * Data-property facts are stored in `abox.data`, not reasoned with. Blank node labels are made local to each file.
 */
export async function loadDatasets(
  sources: readonly DatasetSource[],
  dictionary: TermDictionary,
  abox: Abox,
  opts: LoadDatasetsOptions = {},
): Promise<{ diagnostics: Diagnostic[]; counts: IntakeCounts }> {
  const builder = new AboxBuilder(dictionary, abox);
  const diagnostics: Diagnostic[] = [];
  for (let i = 0; i < sources.length; i++) {
    const source = sources[i]!;
    const format = datasetFormat(source.path, source.format);
    const before = { ...builder.counts };
    const read: ReadOptions = {
      signal: opts.signal, maxLineBytes: opts.maxLineBytes, blankPrefix: `f${i + 1}_`,
      onFraction: (f) => opts.onProgress?.({ stage: 'parse', fraction: (i + f) / sources.length, message: source.path }),
    };
    try {
      if (format === 'csv') {
        if (!source.csv) throw new LineError('a CSV dataset needs a column mapping', 0, 0);
        await readCsv(source.path, source.csv, builder, read);
      } else if (format === 'turtle') await readTurtle(source.path, builder, read);
      else await readNTriples(source.path, builder, read);
    } catch (e) {
      if (e instanceof LineError) throw inputError(e.line ? `${source.path}:${e.line}${e.column ? ':' + e.column : ''}` : source.path, e.message);
      const code = (e as NodeJS.ErrnoException).code;
      if (code === 'ENOENT' || code === 'EACCES' || code === 'EISDIR') throw inputError(source.path, `cannot read the file: ${code}`);
      throw e;
    }
    const c = builder.counts;
    if (c.schemaTriples > before.schemaTriples)
      diagnostics.push({ severity: 'warning', position: source.path, message: `${c.schemaTriples - before.schemaTriples} triples in the RDF/RDFS/OWL vocabulary ignored: put TBox statements in the ontology` });
    if (c.dataFacts > before.dataFacts)
      diagnostics.push({ severity: 'info', position: source.path, message: `${c.dataFacts - before.dataFacts} data-property facts kept as facts without datatype reasoning` });
  }
  abox.trim();
  return { diagnostics, counts: builder.counts };
}

/**
 * Adds the ontology's own (normalised) assertions to an ABox: class, property, sameAs and differentFrom rows.
 * Use after `normalise` so that facts written in the ontology file join the datasets' facts. Data-property
 * assertions of the ontology go to `abox.data` (kept, not reasoned with).
 */
export function addAssertionsToAbox(normal: NormalOntology, dictionary: TermDictionary, abox: Abox): void {
  // Anonymous individuals of the ontology become `_:o_label`; dataset blank nodes are `_:f<n>_label`: never the same.
  const ind = (a: string) => dictionary.intern(a.startsWith('_:') ? '_:o_' + a.slice(2) : a);
  for (const a of normal.assertions) {
    switch (a.kind) {
      case 'classAssertion': abox.addClass(dictionary.intern(a.cls), ind(a.individual)); break;
      case 'propertyAssertion': abox.addProperty(dictionary.intern(a.property), ind(a.subject), ind(a.object)); break;
      case 'sameIndividual': abox.addSame(ind(a.a), ind(a.b)); break;
      case 'differentIndividuals': abox.addDifferent(ind(a.a), ind(a.b)); break;
    }
  }
  for (const d of normal.dataAssertions ?? []) abox.addData(ind(d.subject), dictionary.intern(d.property), dictionary.intern(d.literal));
}
