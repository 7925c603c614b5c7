// Tokenizes OWL 2 Functional-Style Syntax (W3C OWL 2 Structural Specification §2.3–§2.4, §3.7), with line and column on every token.

export type TokenType =
  | 'open' | 'close' | 'equals' | 'caret'  // ( ) = ^^
  | 'keyword'       // Ontology, SubClassOf, … (letters only)
  | 'fullIRI'       // <…>          value: the IRI without brackets
  | 'prefixedName'  // PNAME_LN or PNAME_NS   value: as written
  | 'nodeID'        // _:label       value: as written
  | 'string'        // quotedString  value: unescaped
  | 'langTag'       // @en           value: without @
  | 'integer'       // nonNegativeInteger
  | 'eof';

export interface Token {
  readonly type: TokenType;
  readonly value: string;
  readonly line: number;
  readonly column: number;
}

/** A lexical or grammatical error at a position. */
export class SyntaxError extends Error {
  constructor(message: string, readonly line: number, readonly column: number) {
    super(message);
    this.name = 'OfnSyntaxError';
  }
}

export interface LexerOptions {
  /** Longest IRI, string or name accepted (default 4 MiB): a clear error instead of unbounded work. */
  readonly maxTokenLength?: number;
}

// PNAME_NS ::= PN_PREFIX? ':'   PN_LOCAL (SPARQL 1.1 §19.8, referenced by OWL 2 FS §2.3); kept permissive but anchored.
const PN_PREFIX = '[A-Za-z\\u00C0-\\uFFFF](?:[\\w.\\-\\u00B7\\u00C0-\\uFFFF]*[\\w\\-\\u00B7\\u00C0-\\uFFFF])?';
const PN_LOCAL = '(?:[\\w:\\u00C0-\\uFFFF]|%[0-9A-Fa-f]{2}|\\\\[_~.\\-!$&\'()*+,;=/?#@%])(?:(?:[\\w.:\\-\\u00B7\\u00C0-\\uFFFF]|%[0-9A-Fa-f]{2}|\\\\[_~.\\-!$&\'()*+,;=/?#@%])*(?:[\\w:\\-\\u00B7\\u00C0-\\uFFFF]|%[0-9A-Fa-f]{2}|\\\\[_~.\\-!$&\'()*+,;=/?#@%]))?';
const prefixedNamePattern = new RegExp(`(?:${PN_PREFIX})?:(?:${PN_LOCAL})?`, 'y');
const nodeIdPattern = new RegExp(`_:(?:${PN_LOCAL})`, 'y');
const keywordPattern = /[A-Za-z]+/y;
const integerPattern = /[0-9]+/y;
const langTagPattern = /@[a-zA-Z]+(?:-[a-zA-Z0-9]+)*/y;
// IRIREF characters: anything but controls, space and <>"{}|^`\ (RFC 3987 via SPARQL IRIREF)
const iriPattern = /<([^\u0000-\u0020<>"{}|^`\\]*)>/y;

/** Pull lexer over one string. `next()` returns tokens in order; `peek()` looks one ahead. */
export class OfnLexer {
  private pos = 0;
  private line = 1;
  private lineStart = 0;
  private lookahead: Token | null = null;
  private readonly maxTokenLength: number;

  constructor(private readonly input: string, options: LexerOptions = {}) {
    this.maxTokenLength = options.maxTokenLength ?? 4 * 1024 * 1024;
    // A byte-order mark is not part of the text.
    if (input.charCodeAt(0) === 0xfeff) this.pos = this.lineStart = 1;
  }

  /** Returns the next token without consuming it. */
  peek(): Token {
    return (this.lookahead ??= this.read());
  }

  /** Returns and consumes the next token. */
  next(): Token {
    const token = this.peek();
    this.lookahead = null;
    return token;
  }

  /** Offset of the lexer in the input (for progress). */
  get offset(): number {
    return this.pos;
  }

  /** Skips white space and `#` comments (OWL 2 FS §2.4), counting lines. */
  private skipSpace(): void {
    const s = this.input;
    for (;;) {
      const c = s.charCodeAt(this.pos);
      if (c === 0x0a) { this.pos++; this.line++; this.lineStart = this.pos; }
      else if (c === 0x20 || c === 0x09 || c === 0x0d) this.pos++;
      else if (c === 0x23 /* # */) {
        while (this.pos < s.length && s.charCodeAt(this.pos) !== 0x0a) this.pos++;
      } else return;
    }
  }

  private error(message: string, at = this.pos): never {
    throw new SyntaxError(message, this.line, at - this.lineStart + 1);
  }

  private token(type: TokenType, value: string, start: number): Token {
    return { type, value, line: this.line, column: start - this.lineStart + 1 };
  }

  /** Reads one token at the current position. */
  private read(): Token {
    this.skipSpace();
    const s = this.input, start = this.pos;
    if (start >= s.length) return this.token('eof', '', start);
    const c = s.charCodeAt(start);
    switch (c) {
      case 0x28: this.pos++; return this.token('open', '(', start);
      case 0x29: this.pos++; return this.token('close', ')', start);
      case 0x3d: this.pos++; return this.token('equals', '=', start);
      case 0x5e:
        if (s.charCodeAt(start + 1) === 0x5e) { this.pos += 2; return this.token('caret', '^^', start); }
        return this.error('expected "^^"');
      case 0x3c: return this.readIri(start);
      case 0x22: return this.readString(start);
      case 0x40: {
        langTagPattern.lastIndex = start;
        const m = langTagPattern.exec(s);
        if (!m) return this.error('expected a language tag after "@"');
        this.pos = langTagPattern.lastIndex;
        return this.token('langTag', m[0].slice(1), start);
      }
    }
    if (c >= 0x30 && c <= 0x39) {
      integerPattern.lastIndex = start;
      const m = integerPattern.exec(s)!;
      this.pos = integerPattern.lastIndex;
      return this.token('integer', m[0], start);
    }
    if (c === 0x5f && s.charCodeAt(start + 1) === 0x3a) {
      nodeIdPattern.lastIndex = start;
      const m = nodeIdPattern.exec(s);
      if (!m) return this.error('expected a blank node label after "_:"');
      this.pos = nodeIdPattern.lastIndex;
      return this.token('nodeID', m[0], start);
    }
    keywordPattern.lastIndex = start;
    const word = keywordPattern.exec(s);
    if (word && s.charCodeAt(keywordPattern.lastIndex) !== 0x3a && !/[\w.\-]/.test(s[keywordPattern.lastIndex] ?? '')) {
      this.pos = keywordPattern.lastIndex;
      return this.token('keyword', word[0], start);
    }
    prefixedNamePattern.lastIndex = start;
    const name = prefixedNamePattern.exec(s);
    if (name) {
      if (name[0].length > this.maxTokenLength) return this.error(`name longer than ${this.maxTokenLength} characters`);
      this.pos = prefixedNamePattern.lastIndex;
      return this.token('prefixedName', name[0], start);
    }
    const shown = c < 0x20 || c === 0x7f ? `U+${c.toString(16).toUpperCase().padStart(4, '0')}` : `"${String.fromCodePoint(s.codePointAt(start)!)}"`;
    return this.error(`unexpected character ${shown}: expected "(", ")", an IRI, a prefixed name, a literal or a keyword`);
  }

  /** Reads `<IRI>` starting at the given position. */
  private readIri(start: number): Token {
    const s = this.input;
    iriPattern.lastIndex = start;
    const m = iriPattern.exec(s);
    if (!m) {
      let end = start + 1;
      while (end < s.length && end - start < 200 && !/[\u0000-\u0020<>"{}|^`\\]/.test(s[end]!)) end++;
      if (end >= s.length) return this.error('unterminated IRI: expected ">"', start);
      return this.error(`invalid character in IRI: expected ">"`, end);
    }
    if (m[1]!.length > this.maxTokenLength) return this.error(`IRI longer than ${this.maxTokenLength} characters`, start);
    this.pos = iriPattern.lastIndex;
    return this.token('fullIRI', m[1]!, start);
  }

  /** Reads a quotedString (OWL 2 FS §2.3: only \" and \\ are escapes); may span lines. */
  private readString(start: number): Token {
    const s = this.input;
    let i = start + 1, out = '', chunkStart = i;
    const startLine = this.line, startColumn = start - this.lineStart + 1;
    for (;;) {
      if (i >= s.length) throw new SyntaxError('unterminated string: expected a closing \'"\'', startLine, startColumn);
      const c = s.charCodeAt(i);
      if (c === 0x22) break;
      if (c === 0x5c) {
        const e = s.charCodeAt(i + 1);
        if (e !== 0x22 && e !== 0x5c) {
          this.pos = i;
          return this.error('invalid escape in string: only \\" and \\\\ are allowed', i);
        }
        out += s.slice(chunkStart, i) + String.fromCharCode(e);
        i += 2; chunkStart = i;
        continue;
      }
      if (c === 0x0a) { this.line++; this.lineStart = i + 1; }
      i++;
      if (i - start > this.maxTokenLength) throw new SyntaxError(`string longer than ${this.maxTokenLength} characters`, startLine, startColumn);
    }
    out += s.slice(chunkStart, i);
    this.pos = i + 1;
    return { type: 'string', value: out, line: startLine, column: startColumn };
  }
}

/** Describes a token for an error message ("expected X, found Y"). */
export function describeToken(token: Token): string {
  switch (token.type) {
    case 'eof': return 'end of input';
    case 'open': return '"("';
    case 'close': return '")"';
    case 'equals': return '"="';
    case 'caret': return '"^^"';
    case 'fullIRI': return `<${token.value.length > 60 ? token.value.slice(0, 60) + '…' : token.value}>`;
    case 'string': return 'a string';
    case 'integer': return `the number ${token.value.slice(0, 30)}`;
    default: return `"${token.value.length > 60 ? token.value.slice(0, 60) + '…' : token.value}"`;
  }
}
