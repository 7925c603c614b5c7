// A worker process killed in the middle of a job: no half-loaded version is ever visible, the sweep hands the job back
// to the queue, and another worker finishes it on the retry.
import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, expect, it } from 'vitest';
import { createTestApp, signedInAgent, type TestApp } from '../support/app.js';
import { startJobs, type RunningJobs } from '../../server/jobs/index.js';
import { kbQueueName, queueFor, stopQueue } from '../../server/jobs/queue.js';
import { sweepDeadVersions } from '../../server/jobs/kbProcess.js';
import { countFacts, factTablesExist } from '../../server/services/factStore.js';
import { writeHarbourDataset } from '../bench/harbour-data.js';

process.env.THENCE_KB_QUEUE = `kb-crash-test-${randomUUID().slice(0, 8)}`;
process.env.THENCE_KB_RETRY_DELAY_SECONDS = '1';

let t: TestApp;
let child: ChildProcess | null = null;
let jobs: RunningJobs | null = null;

beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  child?.kill('SIGKILL');
  await jobs?.stop();
  await stopQueue(t.ctx, 5000);
  await t.close();
});

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function until<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs = 60_000): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await probe();
    if (value) return value;
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`);
    await sleep(200);
  }
}

it('recovers from a worker killed mid-job without ever showing partial facts', async () => {
  const alice = await signedInAgent(t, { roles: ['publisher'] });
  const listing = (await alice.post('/api/publisher/listings').send({ title: 'Crash test harbour', slug: `crash-${Date.now().toString(36)}`, summary: 'A listing for the worker crash test.', licence: 'CC0 1.0', contact: 'test@example.test' })).body.listing;
  const file = path.join(t.ctx.config.dataDir, `crash-${randomUUID()}.nt`);
  fs.mkdirSync(path.dirname(file), { recursive: true });
  await writeHarbourDataset(file, 60_000);
  const res = await alice
    .post(`/api/publisher/listings/${listing.id}/versions`)
    .field('notice', 'true')
    .attach('ontology', fs.readFileSync('server/seed/data/tidewater/tidewater.ofn'), 'tidewater.ofn')
    .attach('datasets', fs.readFileSync(file), 'harbour.nt');
  fs.rmSync(file, { force: true });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  const versionId = res.body.version.id as string;
  const { store_key: storeKey } = (await t.ctx.pool.query(`SELECT store_key FROM kb_versions WHERE id = $1`, [versionId])).rows[0];

  // A separate worker process (the real server/worker.ts) takes the job …
  child = spawn(process.execPath, ['--import', 'tsx', 'server/worker.ts'], { env: { ...process.env }, stdio: 'ignore' });
  const childPid = child.pid!;
  await until('the child worker to start the job', async () => {
    const { rows } = await t.ctx.pool.query(`SELECT message FROM kb_version_log WHERE version_id = $1 AND message LIKE 'Attempt 1 started on worker %'`, [versionId]);
    return rows.some((r) => r.message.includes(`:${childPid} `));
  });
  await sleep(1500);
  // … and is killed in the middle of it (no shutdown hooks run on SIGKILL).
  child.kill('SIGKILL');
  await new Promise((r) => child!.once('exit', r));
  child = null;

  const afterKill = (await t.ctx.pool.query(`SELECT status FROM kb_versions WHERE id = $1`, [versionId])).rows[0];
  expect(afterKill.status).toBe('processing');
  // PostgreSQL rolls back the dead connection's load transaction: no table, no facts, nothing half-visible.
  await until('the dead transaction to be rolled back', async () => !(await factTablesExist(t.ctx.pool, storeKey)) || null, 10_000).catch(() => undefined);
  expect(await factTablesExist(t.ctx.pool, storeKey)).toBe(false);
  expect(await countFacts(t.ctx.pool, storeKey, {})).toBe(0);

  // The sweep finds the stale heartbeat, fails the still-active job so pg-boss schedules its retry, and re-queues the version.
  const boss = await queueFor(t.ctx);
  await sleep(3500);
  expect(await sweepDeadVersions(t.ctx, boss, 3)).toBeGreaterThanOrEqual(1);
  const swept = (await t.ctx.pool.query(`SELECT v.status, j.state FROM kb_versions v JOIN pgboss.job j ON j.id::text = v.job_id AND j.name = $2 WHERE v.id = $1`, [versionId, kbQueueName()])).rows[0];
  expect(swept).toEqual({ status: 'queued', state: 'retry' });

  // Another worker (this process) takes the retry and finishes the version.
  jobs = await startJobs(t.ctx);
  const done = await until(
    'the retry to finish',
    async () => {
      const { rows } = await t.ctx.pool.query(`SELECT status, attempts, fact_count FROM kb_versions WHERE id = $1`, [versionId]);
      return rows[0].status !== 'queued' && rows[0].status !== 'processing' ? rows[0] : null;
    },
    90_000,
  );
  expect(done.status).toBe('ready');
  expect(done.attempts).toBe(2);
  expect(await countFacts(t.ctx.pool, storeKey, {})).toBe(Number(done.fact_count));
  const log = (await t.ctx.pool.query(`SELECT message FROM kb_version_log WHERE version_id = $1 ORDER BY id`, [versionId])).rows.map((r) => r.message).join('\n');
  expect(log).toMatch(/worker stopped during stage/);
}, 180_000);
