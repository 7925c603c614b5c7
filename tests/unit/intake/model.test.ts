// Term dictionary and columnar ABox: dense ids, byte-level interning, growth, column views.

import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { TermDictionary, termKind } from '../../../reasoner/model/dictionary.js';
import { Abox, IntColumn } from '../../../reasoner/model/abox.js';

describe('TermDictionary', () => {
  it('gives dense ids in order of first intern and maps them back, for any Unicode text (fast-check)', () => {
    fc.assert(fc.property(fc.array(fc.string({ unit: 'grapheme', maxLength: 30 }), { maxLength: 60 }), (terms) => {
      const d = new TermDictionary();
      const firstSeen: string[] = [];
      for (const t of terms) {
        const id = d.intern(t);
        if (!firstSeen.includes(t)) firstSeen.push(t);
        expect(id).toBe(firstSeen.indexOf(t));
        expect(d.term(id)).toBe(t);
      }
      expect(d.size).toBe(firstSeen.length);
      for (const t of firstSeen) expect(d.id(t)).toBe(firstSeen.indexOf(t));
    }), { numRuns: 200 });
  });

  it('interns from bytes the same id as from the string', () => {
    const d = new TermDictionary();
    const a = d.intern('http://e/é');
    const bytes = Buffer.from('xx<http://e/é>yy');
    expect(d.internBytes(bytes, 3, bytes.length - 3)).toBe(a);
    expect(d.internBytes(Buffer.from('http://e/b'), 0, 10)).toBe(1);
    expect(d.term(1)).toBe('http://e/b');
  });

  it('grows past many rehashes and keeps every term', () => {
    const d = new TermDictionary();
    for (let i = 0; i < 150_000; i++) d.intern(`http://e/i${i}`);
    expect(d.size).toBe(150_000);
    expect(d.id('http://e/i123456')).toBe(123_456);
    expect(d.term(149_999)).toBe('http://e/i149999');
    expect(d.id('http://e/missing')).toBe(-1);
    // At most 2 × length + 40 bytes per term with growth slack (see dictionary.ts); these terms average 15 bytes.
    expect(d.byteLength / d.size).toBeLessThan(2 * 15 + 40);
  });

  it('refuses ids never given out', () => {
    expect(() => new TermDictionary().term(0)).toThrow(RangeError);
  });

  it('tells term kinds apart by their first characters', () => {
    expect([termKind('http://e/a'), termKind('_:b'), termKind('"x"@en'), termKind('\u0001fresh:1')]).toEqual(['iri', 'blank', 'literal', 'fresh']);
  });
});

describe('Abox columns', () => {
  it('stores rows in insertion order and iterates them', () => {
    const abox = new Abox();
    for (let i = 0; i < 5000; i++) { abox.addClass(i % 7, i); abox.addProperty(1, i, i + 1); }
    abox.addSame(1, 2); abox.addDifferent(3, 4); abox.addData(5, 6, 7);
    expect(abox.sizes()).toEqual({ classAssertions: 5000, propertyAssertions: 5000, sameAs: 1, differentFrom: 1, dataFacts: 1 });
    const seen: number[] = [];
    abox.forEachProperty((p, s, o) => { if (s < 3) seen.push(p, s, o); });
    expect(seen).toEqual([1, 0, 1, 1, 1, 2, 1, 2, 3]);
    const cols = abox.columns();
    expect(cols.classes.cls[10]).toBe(3);
    expect(cols.data.literal[0]).toBe(7);
  });
  it('trims growth slack to the filled length', () => {
    const c = new IntColumn(16);
    for (let i = 0; i < 1000; i++) c.push(i);
    expect(c.byteLength).toBeGreaterThan(4000);
    c.trim();
    expect(c.byteLength).toBe(4000);
    expect(c.at(999)).toBe(999);
    expect(c.at(1000)).toBeUndefined();
  });
});
