// Fuzzing the parsers with random and mutated inputs: only InputError (with a position), never a crash, in bounded time.

import { describe, expect, it } from 'vitest';
import { readFileSync, mkdtempSync, writeFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { loadOntology, loadDatasets, InputError } from '../../../reasoner/intake.js';
import { TermDictionary } from '../../../reasoner/model/dictionary.js';
import { Abox } from '../../../reasoner/model/abox.js';
import type { OntologyFormat } from '../../../reasoner/api.js';

const fixture = (name: string) => readFileSync(new URL(`../../fixtures/ontologies/${name}`, import.meta.url));
const seeds: [OntologyFormat, Buffer][] = [['ofn', fixture('family-core.ofn')], ['turtle', fixture('family-core.ttl')], ['rdfxml', fixture('family-core.rdf')]];

/** Loads and returns 'ok', or the InputError's first position; anything else thrown fails the test. */
async function outcome(bytes: Uint8Array, format: OntologyFormat): Promise<string> {
  try {
    await loadOntology({ path: 'fuzz', format }, { text: bytes });
    return 'ok';
  } catch (e) {
    if (e instanceof InputError) {
      expect(e.diagnostics.length).toBeGreaterThan(0);
      expect(e.diagnostics[0]!.position.startsWith('fuzz')).toBe(true);
      expect(e.diagnostics[0]!.message).not.toMatch(/\n\s+at /);   // no stack trace in messages
      return e.diagnostics[0]!.position;
    }
    throw e;
  }
}

const mutation = (size: number) => fc.oneof(
  fc.record({ op: fc.constant('delete' as const), at: fc.nat(size - 1), length: fc.integer({ min: 1, max: 40 }) }),
  fc.record({ op: fc.constant('insert' as const), at: fc.nat(size - 1), bytes: fc.uint8Array({ minLength: 1, maxLength: 8 }) }),
  fc.record({ op: fc.constant('duplicate' as const), at: fc.nat(size - 1), length: fc.integer({ min: 1, max: 200 }) }),
  fc.record({ op: fc.constant('truncate' as const), at: fc.nat(size - 1) }),
);

function mutate(input: Buffer, m: fc.Arbitrary<unknown> extends never ? never : { op: string; at: number; length?: number; bytes?: Uint8Array }): Buffer {
  switch (m.op) {
    case 'delete': return Buffer.concat([input.subarray(0, m.at), input.subarray(m.at + m.length!)]);
    case 'insert': return Buffer.concat([input.subarray(0, m.at), Buffer.from(m.bytes!), input.subarray(m.at)]);
    case 'duplicate': return Buffer.concat([input.subarray(0, m.at + m.length!), input.subarray(m.at)]);
    default: return input.subarray(0, m.at);
  }
}

describe('ontology parsers under mutation and random input', () => {
  for (const [format, seed] of seeds) {
    it(`${format}: mutated fixture gives success or InputError, never a crash`, async () => {
      await fc.assert(fc.asyncProperty(fc.array(mutation(seed.length), { minLength: 1, maxLength: 4 }), async (ms) => {
        let input: Buffer = seed;
        for (const m of ms) input = mutate(input, m as never);
        const t0 = Date.now();
        await outcome(input, format);
        expect(Date.now() - t0).toBeLessThan(2000);
      }), { numRuns: format === 'rdfxml' ? 50 : 100 });
    });
    it(`${format}: random text gives success or InputError`, async () => {
      await fc.assert(fc.asyncProperty(fc.string({ maxLength: 300 }), async (s) => { await outcome(Buffer.from(s), format); }), { numRuns: 150 });
    });
  }

  it('functional syntax: a stray control character is reported exactly where it was inserted', async () => {
    const text = seeds[0]![1].toString('utf8');
    // Offsets outside strings and comments, where the lexer must stop at the character itself.
    const allowed: number[] = [];
    let inString = false, inComment = false, inIri = false;
    for (let i = 0; i < text.length; i++) {
      const c = text[i]!;
      if (inComment) { if (c === '\n') inComment = false; continue; }
      if (inString) { if (c === '\\') i++; else if (c === '"') inString = false; continue; }
      if (c === '#' && !inIri) { inComment = true; continue; }
      if (c === '"') { inString = true; continue; }
      if (c === '<') inIri = true;
      if (c === '>') inIri = false;
      allowed.push(i);
    }
    await fc.assert(fc.asyncProperty(fc.constantFrom(...allowed), async (at) => {
      const broken = text.slice(0, at) + '\u0007' + text.slice(at);
      const before = text.slice(0, at);
      const line = before.split('\n').length, column = at - before.lastIndexOf('\n');
      // Inside a token ("Obj␇ectInverseOf", "^␇^") the part before is read as a token and rejected: the error then
      // points at the start of the broken token; elsewhere at the character itself. Never before the token, never after.
      const tokenStart = column - (/[^\s()]*$/.exec(before)![0].length);
      const [, l, c] = (await outcome(Buffer.from(broken), 'ofn')).split(':');
      expect(Number(l)).toBe(line);
      expect(Number(c)).toBeGreaterThanOrEqual(tokenStart);
      expect(Number(c)).toBeLessThanOrEqual(column);
    }), { numRuns: 150 });
  });
});

describe('N-Triples dataset reader under mutation', () => {
  it('mutated lines give success or InputError naming file:line', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'thence-fuzz-'));
    try {
      const base = Buffer.from(Array.from({ length: 40 }, (_, i) => `<http://e/s${i}> <http://e/p> ${i % 3 ? `<http://e/o${i}>` : `"v${i}\\n"@en`} .`).join('\n') + '\n');
      let n = 0;
      await fc.assert(fc.asyncProperty(fc.array(mutation(base.length), { minLength: 1, maxLength: 3 }), async (ms) => {
        let input: Buffer = base;
        for (const m of ms) input = mutate(input, m as never);
        const path = join(dir, `m${n++}.nt`);
        writeFileSync(path, input);
        try {
          await loadDatasets([{ path }], new TermDictionary(), new Abox());
        } catch (e) {
          if (!(e instanceof InputError)) throw e;
          expect(e.diagnostics[0]!.position).toMatch(/m\d+\.nt(:\d+(:\d+)?)?$/);
        }
      }), { numRuns: 100 });
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
