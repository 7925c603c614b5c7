// Dataset intake: streams N-Triples, Turtle and mapped CSV files into the integer-encoded ABox through the term dictionary.

import { createReadStream, statSync } from 'node:fs';
import { StringDecoder } from 'node:string_decoder';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import { isUtf8 } from 'node:buffer';
import { Parser as N3Parser, type Quad } from 'n3';
import { parse as parseCsv } from 'csv-parse';
import type { CsvMapping, DatasetFormat } from '../api.js';
import type { Abox } from '../model/abox.js';
import type { TermDictionary } from '../model/dictionary.js';
import { OWL_DIFFERENT_FROM, OWL_NAMED_INDIVIDUAL, OWL_SAME_AS, OWL_THING, RDF_TYPE, isReservedIri } from '../model/vocabulary.js';
import { BLANK, IRI, LITERAL, LineError, NTriplesReader } from './ntriples-reader.js';
import { fromRdfJs } from './rdf-graph.js';

export { LineError } from './ntriples-reader.js';

export interface ReadOptions {
  readonly signal?: AbortSignal;
  /** Called with the fraction of the file read so far (0..1). */
  readonly onFraction?: (fraction: number) => void;
  readonly maxLineBytes?: number;
  /** Prefix of blank node labels for this file (labels are local to a file). */
  readonly blankPrefix?: string;
}

/** What a dataset held besides stored facts (for the report). */
export interface IntakeCounts {
  triples: number;
  classAssertions: number;
  propertyAssertions: number;
  sameAs: number;
  differentFrom: number;
  dataFacts: number;
  /** rdf:type owl:NamedIndividual: a declaration, no fact. */
  declarations: number;
  /** Triples in the RDF/RDFS/OWL vocabulary (TBox statements in a dataset): not facts, ignored. */
  schemaTriples: number;
}

export const emptyCounts = (): IntakeCounts => ({ triples: 0, classAssertions: 0, propertyAssertions: 0, sameAs: 0, differentFrom: 0, dataFacts: 0, declarations: 0, schemaTriples: 0 });

/** Maps one triple to an ABox row (class, property, sameAs, differentFrom or data fact). */
export class AboxBuilder {
  readonly counts = emptyCounts();
  /** Predicate id → 1 rdf:type, 2 owl:sameAs, 3 owl:differentFrom, 4 other reserved vocabulary, 5 user property. */
  private readonly predicates = new Map<number, number>();
  /** Class id (object of rdf:type) → 1 owl:NamedIndividual, 2 reserved vocabulary (schema), 3 user class. */
  private readonly classes = new Map<number, number>();

  constructor(readonly dictionary: TermDictionary, readonly abox: Abox) {}

  private predicateKind(p: number): number {
    let k = this.predicates.get(p);
    if (k === undefined) {
      const iri = this.dictionary.term(p);
      k = iri === RDF_TYPE ? 1 : iri === OWL_SAME_AS ? 2 : iri === OWL_DIFFERENT_FROM ? 3 : isReservedIri(iri) ? 4 : 5;
      this.predicates.set(p, k);
    }
    return k;
  }

  private classKind(c: number): number {
    let k = this.classes.get(c);
    if (k === undefined) {
      const iri = this.dictionary.term(c);
      k = iri === OWL_NAMED_INDIVIDUAL ? 1 : isReservedIri(iri) && iri !== OWL_THING ? 2 : 3;
      this.classes.set(c, k);
    }
    return k;
  }

  /** Handler over term ids (the N-Triples reader's). */
  readonly ids = (s: number, p: number, o: number, kind: number): void => {
    const c = this.counts;
    c.triples++;
    const pk = this.predicateKind(p);
    if (kind === LITERAL) {
      // Literal-valued triples (data properties, and annotations such as rdfs:label) are stored as facts.
      if (pk === 1) { c.schemaTriples++; return; }
      c.dataFacts++;
      this.abox.addData(s, p, o);
      return;
    }
    switch (pk) {
      case 5: c.propertyAssertions++; this.abox.addProperty(p, s, o); return;
      case 1: {
        const ck = kind === IRI ? this.classKind(o) : 3;
        if (ck === 1) { c.declarations++; return; }
        if (ck === 2) { c.schemaTriples++; return; }
        c.classAssertions++;
        this.abox.addClass(o, s);
        return;
      }
      case 2: c.sameAs++; this.abox.addSame(s, o); return;
      case 3: c.differentFrom++; this.abox.addDifferent(s, o); return;
      default: c.schemaTriples++;
    }
  };

  /** Handler over strings (the Turtle reader's). */
  readonly triple = (s: string, p: string, o: string, kind: number): void => {
    const d = this.dictionary;
    this.ids(d.intern(s), d.intern(p), d.intern(o), kind);
  };
}

function sizeOf(path: string): number {
  try { return statSync(path).size; } catch { return 0; }
}

/** Streams a file's bytes to `onChunk`, honouring the abort signal and reporting progress. */
async function streamBytes(path: string, opts: ReadOptions, onChunk: (chunk: Buffer) => void): Promise<void> {
  const total = sizeOf(path);
  let read = 0, reported = 0;
  const stream = createReadStream(path, { highWaterMark: 1 << 20 });
  try {
    for await (const chunk of stream as AsyncIterable<Buffer>) {
      opts.signal?.throwIfAborted();
      onChunk(chunk);
      read += chunk.length;
      if (opts.onFraction && total && read - reported > total / 100) { reported = read; opts.onFraction(read / total); }
    }
  } finally {
    stream.destroy();
  }
  opts.onFraction?.(1);
}

/** N-Triples with the byte-level reader (ntriples-reader.ts). */
export async function readNTriples(path: string, builder: AboxBuilder, opts: ReadOptions = {}): Promise<void> {
  const reader = new NTriplesReader(builder.dictionary, builder.ids, { maxLineBytes: opts.maxLineBytes, blankPrefix: opts.blankPrefix });
  await streamBytes(path, opts, (chunk) => reader.push(chunk));
  reader.end();
}

/**
 * Turtle through n3's parser fed chunk by chunk (its quads are handled at once and dropped: no object per
 * triple is kept). Chunks are cut at line ends so UTF-8 is checked exactly; n3's lexer buffer is watched so a
 * huge token is an error, not unbounded memory.
 */
export async function readTurtle(path: string, builder: AboxBuilder, opts: ReadOptions = {}): Promise<void> {
  // Relative IRIs resolve against the file's own URL, as for ontologies (RDF 1.1 Turtle §6.3: the retrieval URI).
  const parser = new N3Parser({ format: 'Turtle', blankNodePrefix: '', baseIRI: pathToFileURL(resolve(path)).href });
  const local = opts.blankPrefix ?? '';
  const key = (t: ReturnType<typeof fromRdfJs>) => (t.kind === 'blank' ? '_:' + local + t.key.slice(2) : t.key);
  const lexer = (parser as unknown as { _lexer?: { _line?: number; _input?: string | null } })._lexer;
  const maxLine = opts.maxLineBytes ?? 16 * 1024 * 1024;
  let onData: ((chunk: string) => void) | undefined, onEnd: (() => void) | undefined;
  let failure: LineError | null = null;
  parser.parse({ on: (event: string, cb: (x?: string) => void) => { if (event === 'data') onData = cb; if (event === 'end') onEnd = cb as () => void; } } as never,
    (error: Error | null | undefined, quad: Quad | null | undefined) => {
      if (error) {
        const e = error as Error & { context?: { line?: number } };
        failure ??= new LineError(e.message.replace(/\s*on line \d+\.?$/, ''), e.context?.line ?? lexer?._line ?? 0, 0);
        return;
      }
      if (!quad || failure) return;
      const s = fromRdfJs(quad.subject), o = fromRdfJs(quad.object);
      builder.triple(key(s), quad.predicate.value, key(o), o.kind === 'iri' ? IRI : o.kind === 'blank' ? BLANK : LITERAL);
    });
  const decoder = new StringDecoder('utf8');
  let carry: Buffer | null = null, line = 0;
  const feed = (buf: Buffer) => {
    if (!isUtf8(buf)) {
      const text = buf.toString('utf8'), bad = text.indexOf('\ufffd');
      const before = text.slice(0, Math.max(0, bad));
      throw new LineError('invalid UTF-8: the file must be UTF-8', line + before.split('\n').length, bad - before.lastIndexOf('\n'));
    }
    for (let i = buf.indexOf(0x0a); i >= 0; i = buf.indexOf(0x0a, i + 1)) line++;
    onData!(decoder.write(buf));
    if (failure) throw failure;
    if ((lexer?._input?.length ?? 0) > maxLine) throw new LineError(`token longer than ${maxLine} bytes (e.g. a huge literal)`, lexer?._line ?? line, 0);
  };
  await streamBytes(path, opts, (chunk) => {
    const buf: Buffer = carry ? Buffer.concat([carry, chunk]) : chunk;
    carry = null;
    const last = buf.lastIndexOf(0x0a);
    if (last < 0) {
      if (buf.length > maxLine) throw new LineError(`line longer than ${maxLine} bytes`, line + 1, 0);
      carry = buf;
      return;
    }
    if (last + 1 < buf.length) carry = Buffer.from(buf.subarray(last + 1));
    feed(buf.subarray(0, last + 1));
  });
  if (carry) feed(carry);
  onData!(decoder.end());
  onEnd!();
  if (failure) throw failure;
}

/** Returns the length of the prefix of buf that ends on a character boundary (an incomplete last character is left out). */
function completeUtf8(buf: Buffer): number {
  for (let back = 1; back <= 3 && back <= buf.length; back++) {
    const b = buf[buf.length - back]!;
    if ((b & 0xc0) === 0x80) continue;                 // continuation byte: look further back
    const need = b >= 0xf0 ? 4 : b >= 0xe0 ? 3 : b >= 0xc0 ? 2 : 1;
    return need > back ? buf.length - back : buf.length;
  }
  return buf.length;
}

const TRUTHY = new Set(['true', '1', 'yes', 'x', 'y']);

/** Resolves a cell to an IRI: absolute IRIs as written (angle brackets allowed), else against the base. */
function cellIri(cell: string, base: string | undefined, line: number, column: string): string {
  let v = cell.trim();
  if (v.startsWith('<') && v.endsWith('>')) v = v.slice(1, -1);
  if (/^[A-Za-z][A-Za-z0-9+.\-]*:/.test(v) && !/[\s<>"{}|^`\\]/.test(v)) return v;
  if (v.startsWith('_:')) return v;
  if (!base) throw new LineError(`column "${column}": "${v.slice(0, 80)}" is not an absolute IRI and the mapping gives no base`, line, 0);
  return base + encodeURI(v).replace(/#/g, '%23');
}

/**
 * CSV with a declared mapping (api.ts CsvMapping): the subject column names the individual; a `class` column
 * asserts membership when the cell is truthy; a `property` column holds objects (several separated by `|`);
 * a `type` column holds class names. Headers are checked against the mapping before any row is read.
 */
export async function readCsv(path: string, mapping: CsvMapping, builder: AboxBuilder, opts: ReadOptions = {}): Promise<void> {
  const parser = parseCsv({ bom: true, info: true, skip_empty_lines: true, relax_column_count: false, max_record_size: opts.maxLineBytes ?? 16 * 1024 * 1024 });
  const d = builder.dictionary, abox = builder.abox, c = builder.counts;
  let header: string[] | null = null;
  let subjectIndex = -1;
  let plan: { index: number; kind: 'class' | 'property' | 'type'; id: number; header: string }[] = [];
  // The first error (from a row handler or from csv-parse) wins; later writes stop at it instead of masking it.
  let failure: Error | null = null;
  const done = new Promise<void>((resolve, reject) => {
    parser.on('readable', () => {
      try {
        let row: { record: string[]; info: { lines: number } } | null;
        while ((row = parser.read()) !== null) {
          const { record, info } = row;
          if (!header) {
            header = record.map((h) => h.trim());
            subjectIndex = header.indexOf(mapping.subjectColumn);
            if (subjectIndex < 0) throw new LineError(`subject column "${mapping.subjectColumn}" not in the header (found: ${header.join(', ')})`, info.lines, 0);
            plan = Object.entries(mapping.columns).map(([h, m]) => {
              const index = header!.indexOf(h);
              if (index < 0) throw new LineError(`mapped column "${h}" not in the header (found: ${header!.join(', ')})`, info.lines, 0);
              if (m.kind !== 'type' && !m.iri) throw new LineError(`mapping for column "${h}" (${m.kind}) needs an IRI`, info.lines, 0);
              return { index, kind: m.kind, id: m.iri ? d.intern(m.iri) : -1, header: h };
            });
            continue;
          }
          const subjectCell = record[subjectIndex]!.trim();
          if (!subjectCell) throw new LineError(`empty subject in column "${mapping.subjectColumn}"`, info.lines, 0);
          const s = d.intern(cellIri(subjectCell, mapping.base, info.lines, mapping.subjectColumn));
          for (const col of plan) {
            const cell = record[col.index]!.trim();
            if (!cell) continue;
            if (col.kind === 'class') {
              if (TRUTHY.has(cell.toLowerCase())) { abox.addClass(col.id, s); c.classAssertions++; }
              continue;
            }
            for (const part of cell.split('|')) {
              if (!part.trim()) continue;
              const o = d.intern(cellIri(part, mapping.base, info.lines, col.header));
              if (col.kind === 'property') { abox.addProperty(col.id, s, o); c.propertyAssertions++; }
              else { abox.addClass(o, s); c.classAssertions++; }
            }
          }
          c.triples++;
        }
      } catch (e) {
        failure ??= e as Error;
        parser.destroy();
        reject(failure);
      }
    });
    parser.on('error', (e: Error & { lines?: number; code?: string }) => {
      failure ??= e instanceof LineError ? e : new LineError(e.message, e.lines ?? 0, 0);
      reject(failure);
    });
    parser.on('end', () => resolve());
  });
  done.catch(() => undefined);
  try {
    let pending: Buffer | null = null;
    await streamBytes(path, opts, (chunk) => {
      const buf: Buffer = pending ? Buffer.concat([pending, chunk]) : chunk;
      const cut = completeUtf8(buf);
      pending = cut < buf.length ? Buffer.from(buf.subarray(cut)) : null;
      if (!isUtf8(buf.subarray(0, cut))) throw new LineError('invalid UTF-8: the file must be UTF-8', 0, 0);
      if (failure) throw failure;
      parser.write(buf.subarray(0, cut));
    });
    if (pending) throw new LineError('invalid UTF-8 at the end of the file', 0, 0);
    if (failure) throw failure;
    parser.end();
  } catch (e) {
    parser.destroy();
    throw failure ?? e;
  }
  await done;
}

/** Guesses a dataset format from the file name. */
export function datasetFormat(path: string, declared?: DatasetFormat): DatasetFormat {
  if (declared) return declared;
  if (/\.csv$/i.test(path)) return 'csv';
  if (/\.(ttl|turtle)$/i.test(path)) return 'turtle';
  return 'ntriples';
}
