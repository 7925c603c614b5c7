// Benchmark: a ~1M-fact knowledge base from upload to published, with the time of each stage, and the storing rate
// (facts/s into PostgreSQL) against a reference measured in the same run: a bare COPY of the same number of integer rows
// into an unindexed table (the ceiling of PostgreSQL's bulk load on this machine). Prints figures; asserts nothing.
//   eval "$(bash server/scripts/dev-env.sh)" && npx tsx tests/bench/publish.ts            (VESSELS=130000 RUNS=3)
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import supertest from 'supertest';
import copyStreams from 'pg-copy-streams';
import { createApp } from '../../server/app.js';
import { closeContext, createContext } from '../../server/bootstrap.js';
import { stopQueue } from '../../server/jobs/queue.js';
import { dropFactTables, FactLoader } from '../../server/services/factStore.js';
import { processVersion } from '../../server/services/processing.js';
import { createPasswordUser } from '../../server/services/users.js';
import { closeMail } from '../../server/services/mail.js';
import { writeHarbourDataset } from './harbour-data.js';

// The uploads of this run go to a queue nobody works on: the benchmark processes the version itself, timed.
process.env.THENCE_KB_QUEUE = `kb-bench-${randomUUID().slice(0, 8)}`;
const VESSELS = Number(process.env.VESSELS ?? 130_000);
const RUNS = Number(process.env.RUNS ?? 3);
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const rate = (n: number, ms: number) => Math.round(n / (ms / 1000));
const fmt = (n: number) => n.toLocaleString('en');

const ctx = await createContext();
const app = createApp(ctx);
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'thence-bench-'));

try {
  // --- the whole path, once: upload (HTTP) → process (parse … materialise, store) → publish (HTTP)
  const dataset = path.join(tmp, 'harbour.nt');
  const triples = await writeHarbourDataset(dataset, VESSELS);
  const email = `bench.${randomUUID().slice(0, 8)}@example.test`;
  await createPasswordUser(ctx, { name: 'Bench publisher', email, password: 'bench-password-2026', roles: ['publisher'] }, { verified: true });
  const agent = supertest.agent(app);
  const csrf = async () => (await agent.get('/api/csrf')).body.token as string;
  let token = await csrf();
  await agent.post('/api/auth/sign-in').set('X-CSRF-Token', token).send({ email, password: 'bench-password-2026' }).expect(200);
  token = await csrf();
  const listing = (await agent.post('/api/publisher/listings').set('X-CSRF-Token', token).send({ title: 'Bench harbour', slug: `bench-${Date.now().toString(36)}`, summary: 'Benchmark listing, deleted afterwards.', licence: 'CC0 1.0', contact: 'bench@example.test' }).expect(201)).body.listing;

  let t = performance.now();
  const up = await agent.post(`/api/publisher/listings/${listing.id}/versions`).set('X-CSRF-Token', token).field('notice', 'true').attach('ontology', 'server/seed/data/tidewater/tidewater.ofn').attach('datasets', dataset);
  if (up.status !== 201) throw new Error(`upload failed: ${up.status} ${JSON.stringify(up.body)}`);
  const uploadMs = performance.now() - t;
  const versionId = up.body.version.id as string;
  // Withdraw it from the queue (nobody works on this queue anyway) and process it here, synchronously, as the seed does.
  t = performance.now();
  const outcome = await processVersion(ctx, versionId, { finalAttempt: true });
  const processMs = performance.now() - t;
  if (outcome !== 'ready') throw new Error(`processing ended ${outcome}`);
  t = performance.now();
  await agent.post(`/api/publisher/versions/${versionId}/publish`).set('X-CSRF-Token', token).expect(200);
  const publishMs = performance.now() - t;
  const { rows } = await ctx.pool.query(`SELECT fact_count, timings, store_key FROM kb_versions WHERE id = $1`, [versionId]);
  const facts = Number(rows[0].fact_count);
  const timings = rows[0].timings as Record<string, number>;
  // The store's own time: inside FactLoader.write (dictionary, encoding, COPY back-pressure), dictionary COPY, indexes.
  const storeMs = timings.storeWriteMs + timings.storeTermsMs + timings.storeIndexMs;
  const size = fs.statSync(dataset).size;

  console.log(`\nFrom upload to published: ${fmt(triples)} input triples (${(size / 1e6).toFixed(0)} MB N-Triples) → ${fmt(facts)} facts`);
  console.log(`  upload (HTTP, multer, sha256)   ${uploadMs.toFixed(0).padStart(7)} ms   ${(size / 1e6 / (uploadMs / 1000)).toFixed(0)} MB/s`);
  for (const stage of ['parse', 'profile', 'normalise', 'rewrite', 'materialise']) console.log(`  ${stage.padEnd(31)}${(timings[stage] ?? 0).toFixed(0).padStart(7)} ms`);
  console.log(`  fact streaming (reasoner → COPY) ${timings.storeStreamMs.toFixed(0).padStart(6)} ms   of which in the store: ${timings.storeWriteMs.toFixed(0)} ms`);
  console.log(`  store: COPY term dictionary     ${timings.storeTermsMs.toFixed(0).padStart(7)} ms`);
  console.log(`  store: indexes + ANALYZE        ${timings.storeIndexMs.toFixed(0).padStart(7)} ms`);
  console.log(`  processing in total             ${processMs.toFixed(0).padStart(7)} ms`);
  console.log(`  publish (HTTP)                  ${publishMs.toFixed(0).padStart(7)} ms`);
  console.log(`  storing rate (store's share of COPY + dictionary + indexes): ${fmt(rate(facts, storeMs))} facts/s (target ≥ 200,000)`);
  console.log(`  bulk-load rate without index build:                        ${fmt(rate(facts, timings.storeWriteMs + timings.storeTermsMs))} facts/s`);
  await agent.post(`/api/publisher/listings/${listing.id}/unpublish`).set('X-CSRF-Token', token).expect(200);
  await agent.delete(`/api/publisher/listings/${listing.id}`).set('X-CSRF-Token', token).expect(204);

  // --- the store alone, RUNS times, against a bare COPY of the same rows (reference)
  const loaderRates: number[] = [];
  const loaderCopyRates: number[] = [];
  const referenceRates: number[] = [];
  const T = 'https://demo.thence.test/tidewater#';
  // Terms made once, as a reasoner hands out the strings of its own dictionary (not a fresh string per fact).
  const subjects = Array.from({ length: (facts >> 3) + 1 }, (_, i) => `${T}vessel-${i}`);
  const objects = Array.from({ length: 5000 }, (_, i) => `${T}thing-${i}`);
  const predicates = ['http://www.w3.org/1999/02/22-rdf-syntax-ns#type', `${T}visits`];
  for (let run = 0; run < RUNS; run++) {
    const key = Number((await ctx.pool.query(`SELECT nextval('kb_store_key_seq') AS k`)).rows[0].k);
    const loader = await FactLoader.open(ctx.pool, key);
    t = performance.now();
    for (let i = 0; i < facts; i++) {
      const pending = loader.write(subjects[i >> 3]!, predicates[i & 1]!, objects[i % 5000]!, (i & 3) === 0);
      if (pending) await pending;
    }
    const stats = await loader.finish();
    await loader.commit(async () => undefined);
    const ms = performance.now() - t;
    loaderRates.push(rate(facts, ms));
    loaderCopyRates.push(rate(facts, stats.timings.copyFactsMs + stats.timings.copyTermsMs));
    await dropFactTables(ctx.pool, key);

    const client = await ctx.pool.connect();
    try {
      await client.query(`CREATE TEMP TABLE bench_reference (s integer, p integer, o integer, asserted boolean)`);
      t = performance.now();
      const stream = client.query(copyStreams.from(`COPY bench_reference FROM STDIN WITH (FORMAT text)`));
      const done = new Promise<void>((resolve, reject) => stream.on('finish', resolve).on('error', reject));
      let chunk = '';
      for (let i = 0; i < facts; i++) {
        chunk += `${i >> 3}\t${i & 1}\t${i % 5000}\t${(i & 3) === 0 ? 't' : 'f'}\n`;
        if (chunk.length > 1 << 18) {
          if (!stream.write(chunk)) await new Promise<void>((r) => stream.once('drain', () => r()));
          chunk = '';
        }
      }
      stream.end(chunk);
      await done;
      referenceRates.push(rate(facts, performance.now() - t));
      await client.query(`DROP TABLE bench_reference`);
    } finally {
      client.release();
    }
  }
  const ours = median(loaderRates), reference = median(referenceRates);
  console.log(`\nFact store alone, ${fmt(facts)} facts, median of ${RUNS} runs:`);
  console.log(`  FactLoader, dictionary + COPY + 3 indexes + ANALYZE: ${fmt(ours)} facts/s  (runs: ${loaderRates.map(fmt).join(', ')})`);
  console.log(`  FactLoader, bulk load only (facts + dictionary COPY): ${fmt(median(loaderCopyRates))} facts/s`);
  console.log(`  reference: bare COPY of 4-column integer rows, no index: ${fmt(reference)} facts/s  (runs: ${referenceRates.map(fmt).join(', ')})`);
  console.log(`  ratio store/reference: ${(ours / reference).toFixed(2)}`);
} finally {
  fs.rmSync(tmp, { recursive: true, force: true });
  await stopQueue(ctx, 2000);
  closeMail(ctx);
  await closeContext(ctx);
}
