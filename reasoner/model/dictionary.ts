// Term dictionary: maps every term (IRI, blank node, N-Triples literal) to a dense integer id and back.

/**
 * Term encoding, shared by every user of the dictionary (so that one dictionary can hold a whole ABox):
 * - an IRI is stored as the bare IRI text, without angle brackets (`http://example.org/a`);
 * - a blank node is stored as `_:label` (no IRI can start with `_:`: a scheme starts with a letter);
 * - a literal is stored in canonical N-Triples form, `"lexical"`, `"lexical"@lang` or `"lexical"^^<datatype>`
 *   (no IRI starts with `"`); see `syntax/ntriples.ts` for the canonicalisation.
 * - internal fresh names (`model/normal.ts` FRESH_PREFIX) start with U+0001 and never clash with the above.
 *
 * Memory (V8, 64-bit with pointer compression, measured by tests/bench/intake.ts): one Map entry
 * (≈ 12 bytes in the ordered hash table plus bucket share), one array slot (4 bytes) and the string itself
 * (≈ 12–16 bytes header + 1 byte per Latin-1 character, 2 per character otherwise). The string is
 * shared between the map key and the array. Roughly 30 bytes + length per term.
 *
 * Callers must pass *flat* strings (e.g. from `Buffer.toString(start, end)`), not slices of a large chunk:
 * V8 keeps the parent of a sliced string alive, so interning slices would retain whole input chunks.
 */
export class TermDictionary {
  private readonly ids = new Map<string, number>();
  private readonly terms: string[] = [];

  /** Returns the id of the term, adding it if new. Ids are dense: 0, 1, 2, … in order of first intern. */
  intern(term: string): number {
    let id = this.ids.get(term);
    if (id === undefined) {
      id = this.terms.length;
      this.ids.set(term, id);
      this.terms.push(term);
    }
    return id;
  }

  /** Returns the id of a term already interned, or -1. */
  id(term: string): number {
    const id = this.ids.get(term);
    return id === undefined ? -1 : id;
  }

  /** Returns true if the term is interned. */
  has(term: string): boolean {
    return this.ids.has(term);
  }

  /** Returns the term of an id; throws a RangeError for an id never given out. */
  term(id: number): string {
    const term = this.terms[id];
    if (term === undefined) throw new RangeError(`no term with id ${id} (dictionary size ${this.terms.length})`);
    return term;
  }

  /** Number of distinct terms. */
  get size(): number {
    return this.terms.length;
  }

  /** Iterates [id, term] in id order. */
  *entries(): IterableIterator<[number, string]> {
    for (let i = 0; i < this.terms.length; i++) yield [i, this.terms[i]!];
  }
}

/** Kind of an encoded term, by its first character (see the encoding above). */
export function termKind(term: string): 'iri' | 'blank' | 'literal' | 'fresh' {
  const c = term.charCodeAt(0);
  if (c === 0x22 /* " */) return 'literal';
  if (c === 0x5f /* _ */ && term.charCodeAt(1) === 0x3a /* : */) return 'blank';
  if (c === 0x01) return 'fresh';
  return 'iri';
}
