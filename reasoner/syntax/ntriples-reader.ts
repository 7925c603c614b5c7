// Streaming N-Triples reader over bytes (W3C RDF 1.1 N-Triples §7 grammar): one line at a time, terms decoded straight from the chunk.

import { isUtf8 } from 'node:buffer';
import { escapeLexical } from './terms.js';
import { XSD_STRING } from '../model/vocabulary.js';
import { FNV_OFFSET, FNV_PRIME, type TermDictionary } from '../model/dictionary.js';

/** Object kinds passed to the handler. */
export const IRI = 0, BLANK = 1, LITERAL = 2;

/** Receives each triple as term ids of the reader's dictionary, with the object's kind. */
export type TripleHandler = (subject: number, predicate: number, object: number, objectKind: number) => void;

/** A syntax error at a line and column (1-based; the column counts characters). */
export class LineError extends Error {
  constructor(message: string, readonly line: number, readonly column: number) {
    super(message);
    this.name = 'LineError';
  }
}

export interface NTriplesOptions {
  /** Longest line accepted, in bytes (default 16 MiB): a longer one is an error, not unbounded buffering. */
  readonly maxLineBytes?: number;
  /** Prefix for blank node labels, so that labels of different files never meet (e.g. `f2_`). */
  readonly blankPrefix?: string;
}

// IRIREF excludes #x00-#x20 < > " { } | ^ ` \ (the backslash starts a UCHAR).
const IRI_STOP = new Uint8Array(256);
for (let c = 0; c <= 0x20; c++) IRI_STOP[c] = 1;
for (const c of '<>"{}|^`\\') IRI_STOP[c.charCodeAt(0)] = 1;
// PN_CHARS for blank node labels, ASCII part (bytes ≥ 0x80 are taken as non-ASCII PN_CHARS_BASE).
const LABEL = new Uint8Array(256);
for (let c = 0; c < 256; c++) LABEL[c] = /[A-Za-z0-9_\-.]/.test(String.fromCharCode(c)) || c >= 0x80 ? 1 : 0;
const XSD_STRING_SUFFIX = '^^<' + XSD_STRING + '>';
// scheme characters after the first: ALPHA / DIGIT / "+" / "-" / "."
const SCHEME = new Uint8Array(256);
for (let c = 0; c < 256; c++) SCHEME[c] = /[A-Za-z0-9+.\-]/.test(String.fromCharCode(c)) ? 1 : 0;

/**
 * Push-style reader: `push(chunk)` as bytes arrive, `end()` at the end; calls the handler per triple with ids.
 * Terms already in canonical form (the common case) are interned straight from the chunk's bytes
 * (TermDictionary.internBytes), so repeated terms never become strings.
 */
export class NTriplesReader {
  private carry: Buffer | null = null;
  private line = 0;
  /** Triples read so far. */
  count = 0;
  private readonly maxLine: number;
  private readonly blankPrefix: string;
  private buf!: Buffer;
  private pos = 0;
  private lineStart = 0;
  private readonly blankHead: Buffer;
  private scratch = Buffer.allocUnsafe(1024);

  constructor(private readonly dictionary: TermDictionary, private readonly handler: TripleHandler, options: NTriplesOptions = {}) {
    this.maxLine = options.maxLineBytes ?? 16 * 1024 * 1024;
    this.blankPrefix = options.blankPrefix ?? '';
    this.blankHead = Buffer.from('_:' + this.blankPrefix, 'utf8');
  }

  /** Reads every complete line of the chunk; keeps the incomplete tail for the next chunk. */
  push(chunk: Buffer): void {
    let buf = chunk;
    // A UTF-8 byte-order mark at the start of the file is not part of the text.
    if (this.line === 0 && !this.carry && buf[0] === 0xef && buf[1] === 0xbb && buf[2] === 0xbf) buf = buf.subarray(3);
    if (this.carry) { buf = Buffer.concat([this.carry, chunk]); this.carry = null; }
    const last = buf.lastIndexOf(0x0a);
    if (last < 0) {
      if (buf.length > this.maxLine) throw new LineError(`line longer than ${this.maxLine} bytes`, this.line + 1, 1);
      this.carry = buf;
      return;
    }
    this.lines(buf, last + 1);
    if (last + 1 < buf.length) {
      this.carry = Buffer.from(buf.subarray(last + 1));   // copy: do not pin the whole chunk
      if (this.carry.length > this.maxLine) throw new LineError(`line longer than ${this.maxLine} bytes`, this.line + 1, 1);
    }
  }

  /** Reads the last line (without a final newline). */
  end(): void {
    if (this.carry && this.carry.length) this.lines(this.carry, this.carry.length);
    this.carry = null;
  }

  /** Reads lines of buf[0, end); the region ends at a line boundary, so UTF-8 can be checked as a whole. */
  private lines(buf: Buffer, end: number): void {
    const region = buf.subarray(0, end);
    if (!isUtf8(region)) this.findBadUtf8(region);
    this.buf = buf;
    let start = 0;
    while (start < end) {
      let nl = buf.indexOf(0x0a, start);
      if (nl < 0 || nl >= end) nl = end;
      this.line++;
      if (nl - start > this.maxLine) throw new LineError(`line longer than ${this.maxLine} bytes`, this.line, 1);
      this.statement(start, nl);
      start = nl + 1;
    }
  }

  private findBadUtf8(region: Buffer): never {
    let start = 0, line = this.line;
    while (start < region.length) {
      let nl = region.indexOf(0x0a, start);
      if (nl < 0) nl = region.length;
      line++;
      const bytes = region.subarray(start, nl);
      if (!isUtf8(bytes)) {
        let good = 0;
        while (good < bytes.length && isUtf8(bytes.subarray(0, good + 1))) good++;
        // `good` may stop inside a multi-byte character that is merely incomplete; the fault is at or after it.
        throw new LineError(`invalid UTF-8 byte 0x${bytes[good]?.toString(16).padStart(2, '0') ?? '??'}: the file must be UTF-8`, line, bytes.subarray(0, good).toString('utf8').length + 1);
      }
      start = nl + 1;
    }
    throw new LineError('invalid UTF-8', line, 1);
  }

  private error(message: string, at = this.pos): never {
    const column = this.buf.toString('utf8', this.lineStart, at).length + 1;
    throw new LineError(message, this.line, column);
  }

  private skipSpace(end: number): void {
    const b = this.buf;
    while (this.pos < end && (b[this.pos] === 0x20 || b[this.pos] === 0x09 || b[this.pos] === 0x0d)) this.pos++;
  }

  /** triple ::= subject predicate object '.'   (§7); blank lines and comments are skipped. */
  private statement(start: number, end: number): void {
    const b = this.buf;
    this.pos = this.lineStart = start;
    this.skipSpace(end);
    if (this.pos >= end || b[this.pos] === 0x23 /* # */) return;
    let subject: number;
    if (b[this.pos] === 0x3c) subject = this.iri(end);
    else if (b[this.pos] === 0x5f && b[this.pos + 1] === 0x3a) subject = this.blank(end);
    else return this.error('expected a subject: an IRI in angle brackets or a blank node "_:label"');
    this.skipSpace(end);
    if (b[this.pos] !== 0x3c) return this.error('expected a predicate: an IRI in angle brackets');
    const predicate = this.iri(end);
    this.skipSpace(end);
    let object: number, kind: number;
    const c = b[this.pos];
    if (c === 0x3c) { object = this.iri(end); kind = IRI; }
    else if (c === 0x5f && b[this.pos + 1] === 0x3a) { object = this.blank(end); kind = BLANK; }
    else if (c === 0x22) { object = this.literal(end); kind = LITERAL; }
    else return this.error('expected an object: an IRI, a blank node or a literal');
    this.skipSpace(end);
    if (b[this.pos] !== 0x2e) return this.error('expected "." at the end of the triple');
    this.pos++;
    this.skipSpace(end);
    if (this.pos < end && b[this.pos] !== 0x23) return this.error('unexpected text after "."');
    this.count++;
    this.handler(subject, predicate, object, kind);
  }

  /** IRIREF: returns the IRI's id (UCHAR escapes decoded); pos ends after ">". */
  private iri(end: number): number {
    const b = this.buf, start = ++this.pos;
    let escaped = false, p = start, h = FNV_OFFSET;
    // One pass: find ">", check IRIREF characters and fold the FNV-1a hash the dictionary needs.
    while (p < end) {
      const c = b[p]!;
      if (c === 0x3e) break;
      if (IRI_STOP[c]) {
        if (c === 0x5c) { escaped = true; p += 2; continue; }
        this.pos = p;
        return this.error(`invalid character in IRI: ${c < 0x21 ? 'U+' + c.toString(16).padStart(4, '0').toUpperCase() : '"' + String.fromCharCode(c) + '"'}`);
      }
      h = Math.imul(h ^ c, FNV_PRIME);
      p++;
    }
    this.pos = p;
    if (this.pos >= end) return this.error('unterminated IRI: expected ">"', start - 1);
    const stop = this.pos++;
    if (start === stop) return this.error('empty IRI <>: relative IRIs are not allowed in N-Triples', start - 1);
    if (escaped) return this.dictionary.intern(this.unescapeIri(b.toString('utf8', start, stop), start - 1));
    // scheme ":" — an absolute IRI (RFC 3987 §2.2): ALPHA *( ALPHA / DIGIT / "+" / "-" / "." ) ":"
    let i = start;
    if (((b[i]! | 0x20) >= 0x61 && (b[i]! | 0x20) <= 0x7a)) {
      i++;
      while (i < stop && (SCHEME[b[i]!] === 1)) i++;
    }
    if (i === start || i >= stop || b[i] !== 0x3a) return this.error('relative IRI: N-Triples needs absolute IRIs', start - 1);
    return this.dictionary.internHashed(b, start, stop, h);
  }

  /** The value of an IRIREF as a string (for datatypes). */
  private iriText(end: number): string {
    const id = this.iri(end);
    return this.dictionary.term(id);
  }

  private unescapeIri(text: string, at: number): string {
    const out = text.replace(/\\u([0-9A-Fa-f]{4})|\\U([0-9A-Fa-f]{8})|\\(.?)/g, (_m, u4: string, u8: string, other: string) => {
      if (u4 || u8) {
        const cp = parseInt(u4 ?? u8, 16);
        if (cp > 0x10ffff) this.error('escape beyond U+10FFFF in IRI', at);
        return String.fromCodePoint(cp);
      }
      return this.error(`invalid escape "\\${other}" in IRI: only \\uXXXX and \\UXXXXXXXX`, at);
    });
    if (/[\u0000-\u0020<>"{}|^`\\]/.test(out)) this.error('escaped IRI contains a character IRIs may not hold', at);
    return out;
  }

  /** BLANK_NODE_LABEL: `_:` label, with the reader's prefix; trailing dots belong to the statement. */
  private blank(end: number): number {
    const b = this.buf, start = this.pos + 2;
    let p = start;
    while (p < end && LABEL[b[p]!]) p++;
    while (p > start && b[p - 1] === 0x2e) p--;
    if (p === start) return this.error('expected a blank node label after "_:"');
    this.pos = p;
    // `_:` + the file's prefix + the label, assembled in a scratch buffer.
    const head = this.blankHead.length, n = head + p - start;
    if (n > this.scratch.length) this.scratch = Buffer.allocUnsafe(n * 2);
    this.blankHead.copy(this.scratch, 0);
    b.copy(this.scratch, head, start, p);
    return this.dictionary.internBytes(this.scratch, 0, n);
  }

  /** STRING_LITERAL_QUOTE with optional LANGTAG or ^^IRIREF; returns the canonical N-Triples literal (see syntax/terms.ts). */
  private literal(end: number): number {
    const b = this.buf, start = this.pos;
    let p = start + 1, escaped = false;
    while (p < end) {
      const c = b[p]!;
      if (c === 0x22) break;
      if (c === 0x5c) { escaped = true; p += 2; continue; }
      p++;
    }
    if (p >= end) return this.error('unterminated literal: expected a closing \'"\'', start);
    const close = p++;
    let suffix = '', canonical = !escaped;
    if (b[p] === 0x40) {
      const langStart = p + 1;
      p = langStart;
      while (p < end && ((b[p]! | 0x20) >= 0x61 && (b[p]! | 0x20) <= 0x7a || b[p] === 0x2d || (b[p]! >= 0x30 && b[p]! <= 0x39))) p++;
      let upper = false;
      for (let i = langStart; i < p; i++) if (b[i]! >= 0x41 && b[i]! <= 0x5a) upper = true;
      if (upper || !canonical) {
        const lang = b.toString('latin1', langStart, p);
        if (!/^[a-zA-Z]+(-[a-zA-Z0-9]+)*$/.test(lang)) return this.error('invalid language tag', langStart - 1);
        canonical = false;
        suffix = '@' + lang.toLowerCase();
      } else if (p === langStart || b[langStart] === 0x2d || b[p - 1] === 0x2d) {
        return this.error('invalid language tag', langStart - 1);
      }
    } else if (b[p] === 0x5e && b[p + 1] === 0x5e) {
      this.pos = p + 2;
      if (b[this.pos] !== 0x3c) return this.error('expected a datatype IRI after "^^"');
      const datatype = this.iriText(end);
      p = this.pos;
      if (datatype === XSD_STRING) canonical = false;   // "a"^^xsd:string is written "a"
      else suffix = '^^<' + datatype + '>';
    }
    this.pos = p;
    // The common case: the text as written is already canonical, so take it in one flat string.
    if (canonical) return this.dictionary.internBytes(b, start, p);
    const raw = b.toString('utf8', start + 1, close);
    const lexical = escaped ? this.unescapeLiteral(raw, start) : raw;
    return this.dictionary.intern('"' + escapeLexical(lexical) + '"' + (suffix === XSD_STRING_SUFFIX ? '' : suffix));
  }

  /** ECHAR and UCHAR (§7). */
  private unescapeLiteral(raw: string, at: number): string {
    return raw.replace(/\\(?:u([0-9A-Fa-f]{4})|U([0-9A-Fa-f]{8})|(.))/g, (_m, u4: string, u8: string, e: string) => {
      if (u4 || u8) {
        const cp = parseInt(u4 ?? u8, 16);
        if (cp > 0x10ffff) this.error('escape beyond U+10FFFF in literal', at);
        return String.fromCodePoint(cp);
      }
      switch (e) {
        case 't': return '\t'; case 'b': return '\b'; case 'n': return '\n'; case 'r': return '\r';
        case 'f': return '\f'; case '"': return '"'; case "'": return "'"; case '\\': return '\\';
      }
      return this.error(`invalid escape "\\${e ?? ''}" in literal`, at);
    });
  }
}
