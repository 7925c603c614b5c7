// Coalesced fact lookups (server/services/factBatch.ts) on the real PostgreSQL test database: lookups made in one
// event-loop turn share one statement per (version, shape), and every caller still gets exactly the page lookupFacts
// gives it alone — checked against lookupFacts and against a brute-force match of the triple pattern over the loaded
// facts (SPARQL 1.1 Query §18.3, basic graph pattern of one triple pattern: a solution binds every unbound position).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import pg from 'pg';
import { config } from '../../server/config.js';
import { FactLookupBatcher, MAX_BATCH, MAX_BATCH_ROWS } from '../../server/services/factBatch.js';
import { dropFactTables, FactLoader, InvalidCursorError, lookupFacts, type FactPattern, type FactPage, type StoredFact } from '../../server/services/factStore.js';

const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const EX = 'http://example.org/batch#';
let pool: pg.Pool;
let storeKey: number;
const facts: StoredFact[] = [];
const line = (f: StoredFact) => `${f.subject} ${f.predicate} ${f.object} ${f.asserted}`;

/** A batcher over a pool whose query() calls are counted, to see how many statements the lookups cost. */
function countingBatcher(): { batcher: FactLookupBatcher; statements: () => number } {
  let n = 0;
  const counted = { query: (config: pg.QueryConfig) => { n++; return pool.query(config); } } as unknown as pg.Pool;
  return { batcher: new FactLookupBatcher(counted), statements: () => n };
}

beforeAll(async () => {
  pool = new pg.Pool({ connectionString: config.databaseUrl, max: 4 });
  storeKey = Number((await pool.query(`SELECT nextval('kb_store_key_seq') AS k`)).rows[0].k);
  // Invented data; the checks are the pattern semantics and the paging, not the data.
  const people = Array.from({ length: 30 }, (_, i) => `${EX}p${i}`);
  for (const [i, p] of people.entries()) {
    facts.push({ subject: p, predicate: RDF_TYPE, object: `${EX}Person`, asserted: true });
    if (i % 4 === 0) facts.push({ subject: p, predicate: RDF_TYPE, object: `${EX}Agent`, asserted: false });
    facts.push({ subject: p, predicate: `${EX}knows`, object: people[(i + 1) % people.length]!, asserted: i % 2 === 0 });
    facts.push({ subject: p, predicate: `${EX}knows`, object: people[(i + 5) % people.length]!, asserted: false });
  }
  // Terms that must survive the text[] array literal node-pg builds: quotes, backslashes, commas, braces, tab, newline.
  facts.push({ subject: people[0]!, predicate: `${EX}note`, object: '"a \\"quoted\\", {braced} back\\\\slash"', asserted: true });
  facts.push({ subject: people[1]!, predicate: `${EX}note`, object: '"real\ttab and real\nnewline"@en', asserted: true });
  const loader = await FactLoader.open(pool, storeKey);
  for (const f of facts) await loader.write(f.subject, f.predicate, f.object, f.asserted);
  await loader.finish();
  await loader.commit(async () => undefined);
});

afterAll(async () => {
  await dropFactTables(pool, storeKey);
  await pool.end();
});

/** Every shape of pattern (each subset of positions bound), from the loaded facts, plus patterns with an unknown term. */
function patterns(): FactPattern[] {
  const out: FactPattern[] = [{}];
  for (const f of facts.filter((_, i) => i % 7 === 0)) {
    out.push({ subject: f.subject }, { predicate: f.predicate }, { object: f.object }, { subject: f.subject, predicate: f.predicate },
      { predicate: f.predicate, object: f.object }, { subject: f.subject, object: f.object }, { subject: f.subject, predicate: f.predicate, object: f.object });
  }
  out.push({ subject: `${EX}nobody` }, { predicate: RDF_TYPE, object: `${EX}Nothing` }, { subject: `${EX}p0`, predicate: RDF_TYPE, object: `${EX}Agent` }, { subject: `${EX}p1`, predicate: RDF_TYPE, object: `${EX}Agent` });
  return out;
}

describe('coalesced lookups', () => {
  it('give every lookup of one turn the page lookupFacts gives it alone, page after page', async () => {
    const { batcher, statements } = countingBatcher();
    const all = patterns();
    for (const limit of [1, 3, 1000]) {
      // Walk every pattern's pages in lock step: each round issues one page per pattern in the same turn.
      let cursors: (string | null | undefined)[] = all.map(() => undefined);
      const seen: string[][] = all.map(() => []);
      for (let round = 0; cursors.some((c) => c !== null) && round < 200; round++) {
        const live = all.map((_, i) => i).filter((i) => cursors[i] !== null);
        const pages = await Promise.all(live.map((i) => batcher.lookup(storeKey, all[i]!, { limit, cursor: cursors[i] ?? null })));
        const alone = await Promise.all(live.map((i) => lookupFacts(pool, storeKey, all[i]!, { limit, cursor: cursors[i] ?? null })));
        const next = [...cursors];
        live.forEach((i, n) => {
          expect(pages[n]).toEqual(alone[n]);
          seen[i]!.push(...pages[n]!.facts.map(line));
          next[i] = pages[n]!.nextCursor;
        });
        cursors = next;
      }
      all.forEach((p, i) => {
        const expected = facts.filter((f) => (p.subject === undefined || f.subject === p.subject) && (p.predicate === undefined || f.predicate === p.predicate) && (p.object === undefined || f.object === p.object));
        expect([...seen[i]!].sort()).toEqual(expected.map(line).sort());
      });
    }
    expect(statements()).toBeGreaterThan(0);
  });

  it('send one statement per version and shape for the lookups of one turn (split above MAX_BATCH)', async () => {
    const { batcher, statements } = countingBatcher();
    const subjects = facts.map((f) => f.subject);
    const whole = Array.from({ length: MAX_BATCH + 5 }, (_, i) => facts[i % facts.length]!);
    const pages: Promise<FactPage>[] = [
      ...whole.map((f) => batcher.lookup(storeKey, { subject: f.subject, predicate: f.predicate, object: f.object }, { limit: 1 })),
      ...subjects.slice(0, 10).map((s) => batcher.lookup(storeKey, { subject: s }, { limit: 2 })),
    ];
    const answered = await Promise.all(pages);
    // MAX_BATCH + 5 whole-fact lookups: two statements; ten subject lookups: one.
    expect(statements()).toBe(3);
    whole.forEach((f, i) => expect(answered[i]!.facts).toEqual([f]));
    const more = await Promise.all(subjects.slice(0, 10).map((s) => lookupFacts(pool, storeKey, { subject: s }, { limit: 2 })));
    expect(answered.slice(whole.length)).toEqual(more);
  });

  it('split the lookups of a turn so that no statement may return more than MAX_BATCH_ROWS rows', async () => {
    const { batcher, statements } = countingBatcher();
    // Each lookup may return limit + 1 rows: 12 × 1001 > MAX_BATCH_ROWS (10,000) ≥ 9 × 1001, so two statements.
    expect(MAX_BATCH_ROWS).toBe(10_000);
    const pages = await Promise.all(Array.from({ length: 12 }, () => batcher.lookup(storeKey, {}, { limit: 1000 })));
    expect(statements()).toBe(2);
    const alone = await lookupFacts(pool, storeKey, {}, { limit: 1000 });
    for (const page of pages) expect(page).toEqual(alone);
  });

  it('reject a cursor it did not hand out for that lookup only', async () => {
    const { batcher } = countingBatcher();
    const first = await batcher.lookup(storeKey, { predicate: `${EX}knows` }, { limit: 2 });
    expect(first.nextCursor).not.toBeNull();
    const [wrong, fine] = await Promise.allSettled([
      batcher.lookup(storeKey, { subject: `${EX}p1` }, { limit: 2, cursor: first.nextCursor }),
      batcher.lookup(storeKey, { predicate: `${EX}knows` }, { limit: 2, cursor: first.nextCursor }),
    ]);
    expect(wrong.status).toBe('rejected');
    expect((wrong as PromiseRejectedResult).reason).toBeInstanceOf(InvalidCursorError);
    expect(fine).toEqual({ status: 'fulfilled', value: await lookupFacts(pool, storeKey, { predicate: `${EX}knows` }, { limit: 2, cursor: first.nextCursor }) });
  });

  it('answer no facts for a version whose tables do not exist, as lookupFacts does', async () => {
    const { batcher } = countingBatcher();
    expect(await batcher.lookup(2_000_000_000, { subject: `${EX}p0` }, { limit: 5 })).toEqual({ facts: [], nextCursor: null });
  });
});
