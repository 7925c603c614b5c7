// The fact store on the real PostgreSQL test database: every atomic pattern, keyset pagination, COPY escaping, atomic visibility.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import pg from 'pg';
import { config } from '../../server/config.js';
import { countFacts, dropFactTables, factTablesExist, FactLoader, InvalidCursorError, lookupFacts, type StoredFact } from '../../server/services/factStore.js';

const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const EX = 'http://example.org/fs#';
let pool: pg.Pool;
let storeKey: number;
const facts: StoredFact[] = [];

async function newKey(): Promise<number> {
  return Number((await pool.query(`SELECT nextval('kb_store_key_seq') AS k`)).rows[0].k);
}

/** Reference answer: the triple pattern matched by brute force over the generated facts (SPARQL 1.1 Query §4.1.6 / §18.3: a pattern with some positions bound). */
function reference(pattern: { subject?: string; predicate?: string; object?: string }): string[] {
  return facts
    .filter((f) => (pattern.subject === undefined || f.subject === pattern.subject) && (pattern.predicate === undefined || f.predicate === pattern.predicate) && (pattern.object === undefined || f.object === pattern.object))
    .map((f) => `${f.subject} ${f.predicate} ${f.object} ${f.asserted}`)
    .sort();
}

async function all(pattern: { subject?: string; predicate?: string; object?: string }, limit: number): Promise<string[]> {
  const seen: string[] = [];
  let cursor: string | null = null;
  for (let guard = 0; guard < 10_000; guard++) {
    const page = await lookupFacts(pool, storeKey, pattern, { limit, cursor });
    expect(page.facts.length).toBeLessThanOrEqual(limit);
    seen.push(...page.facts.map((f) => `${f.subject} ${f.predicate} ${f.object} ${f.asserted}`));
    cursor = page.nextCursor;
    if (!cursor) break;
  }
  return seen;
}

beforeAll(async () => {
  pool = new pg.Pool({ connectionString: config.databaseUrl, max: 4 });
  storeKey = await newKey();
  // Invented demo-style data; the check is the pattern semantics, not the data.
  const people = Array.from({ length: 40 }, (_, i) => `${EX}p${i}`);
  for (const [i, p] of people.entries()) {
    facts.push({ subject: p, predicate: RDF_TYPE, object: `${EX}Person`, asserted: true });
    if (i % 3 === 0) facts.push({ subject: p, predicate: RDF_TYPE, object: `${EX}Agent`, asserted: false });
    facts.push({ subject: p, predicate: `${EX}knows`, object: people[(i + 1) % people.length]!, asserted: i % 2 === 0 });
    facts.push({ subject: p, predicate: `${EX}knows`, object: people[(i + 7) % people.length]!, asserted: false });
  }
  // Literals in N-Triples form with characters COPY's text format must escape (PostgreSQL docs, COPY, "Text Format").
  facts.push({ subject: people[0]!, predicate: `${EX}note`, object: '"tab\there, back\\\\slash, newline\\n"', asserted: true });
  facts.push({ subject: people[1]!, predicate: `${EX}note`, object: '"real\ttab and real\nnewline and \\ backslash"@en', asserted: true });
  facts.push({ subject: people[2]!, predicate: `${EX}note`, object: `"${'long literal '.repeat(400)}"`, asserted: true });
  const loader = await FactLoader.open(pool, storeKey);
  for (const f of facts) await loader.write(f.subject, f.predicate, f.object, f.asserted);
  const stats = await loader.finish();
  expect(stats.facts).toBe(facts.length);
  // Before COMMIT another session must not see the tables (atomic visibility).
  expect(await factTablesExist(pool, storeKey)).toBe(false);
  await loader.commit(async () => undefined);
});

afterAll(async () => {
  await dropFactTables(pool, storeKey);
  await pool.end();
});

describe('fact store', () => {
  it('answers all eight atomic patterns exactly, across pages', async () => {
    const s = `${EX}p3`, p = `${EX}knows`, o = `${EX}p4`;
    const patterns = [{}, { subject: s }, { predicate: p }, { object: o }, { subject: s, predicate: p }, { predicate: p, object: o }, { subject: s, object: o }, { subject: s, predicate: p, object: o }, { predicate: RDF_TYPE, object: `${EX}Agent` }];
    for (const pattern of patterns) {
      const expected = reference(pattern);
      expect(expected.length).toBeGreaterThan(0);
      for (const limit of [1, 3, 1000]) {
        const got = await all(pattern, limit);
        expect([...got].sort()).toEqual(expected);
        expect(new Set(got).size).toBe(got.length); // no row repeated across pages
      }
      expect(await countFacts(pool, storeKey, pattern)).toBe(expected.length);
    }
  });

  it('keeps literals byte for byte, including tabs, newlines and backslashes', async () => {
    for (const f of facts.filter((x) => x.predicate === `${EX}note`)) {
      const page = await lookupFacts(pool, storeKey, { subject: f.subject, predicate: f.predicate, object: f.object }, { limit: 10 });
      expect(page.facts).toEqual([f]);
    }
  });

  it('gives no facts for an unknown IRI and for a missing version', async () => {
    expect((await lookupFacts(pool, storeKey, { subject: `${EX}nobody` }, { limit: 10 })).facts).toEqual([]);
    expect((await lookupFacts(pool, storeKey, { predicate: `${EX}knows`, object: `${EX}nobody` }, { limit: 10 })).facts).toEqual([]);
    expect(await countFacts(pool, storeKey, { object: `${EX}nobody` })).toBe(0);
    const missing = await newKey();
    expect(await lookupFacts(pool, missing, {}, { limit: 10 })).toEqual({ facts: [], nextCursor: null });
  });

  it('refuses a forged cursor and one from another pattern order', async () => {
    const first = await lookupFacts(pool, storeKey, { predicate: `${EX}knows` }, { limit: 2 });
    expect(first.nextCursor).toBeTruthy();
    await expect(lookupFacts(pool, storeKey, { subject: `${EX}p1` }, { limit: 2, cursor: first.nextCursor })).rejects.toBeInstanceOf(InvalidCursorError);
    await expect(lookupFacts(pool, storeKey, {}, { limit: 2, cursor: 'not-a-cursor' })).rejects.toBeInstanceOf(InvalidCursorError);
  });

  it('answers bound patterns by index', async () => {
    const client = await pool.connect();
    try {
      await client.query('SET enable_seqscan = off');
      for (const col of ['s', 'p', 'o']) {
        const { rows } = await client.query(`EXPLAIN SELECT * FROM kb_facts_${storeKey} WHERE ${col} = 1`);
        expect(rows.map((r) => r['QUERY PLAN']).join('\n')).toMatch(/Index/);
      }
    } finally {
      client.release();
    }
  });

  it('leaves nothing behind when a load is aborted half-way', async () => {
    const key = await newKey();
    const loader = await FactLoader.open(pool, key);
    for (let i = 0; i < 5000; i++) await loader.write(`${EX}x${i}`, RDF_TYPE, `${EX}Thing`, true);
    await loader.abort();
    expect(await factTablesExist(pool, key)).toBe(false);
    const { rows } = await pool.query(`SELECT to_regclass($1) AS t`, [`kb_facts_${key}`]);
    expect(rows[0].t).toBeNull();
  });
});
