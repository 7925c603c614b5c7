// Load benchmark of /api/v1 (autocannon on loopback, time-bounded): fact lookups (all three positions bound) and
// pattern queries (one or two bound, LIMIT 10) with 32 connections, authentication, rate limiting and metering on;
// throughput, p50 and p99; then the same lookups and patterns sent straight to PostgreSQL by this harness (32 concurrent
// clients, the API's own statements) as the reference, and the ratio. Finally checks that the usage counters equal the requests served.
// Targets (issue 6): ≥ 3,000 req/s, p99 ≤ 25 ms, ratio ≥ 0.5. Figures are printed, not asserted.
// Run: eval "$(bash server/scripts/dev-env.sh)" && npx tsx tests/bench/api-load.ts [seconds per run, default 10]
import autocannon from 'autocannon';
import { spawn } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import pg from 'pg';
import { createContext, closeContext } from '../../server/bootstrap.js';
import { createTestUser } from '../support/app.js';
import { publishedListing, subscriberWithKey, type FactRow } from '../support/market.js';
import { lookupStatement } from '../../server/services/factStore.js';
import { FactLookupBatcher } from '../../server/services/factBatch.js';

const SECONDS = Number(process.argv[2] ?? 10);
const CONNECTIONS = 32;
const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const EX = 'http://thence.test/bench#';
const SUBJECTS = 5_000;

// Invented benchmark data: 5,000 vessels, each typed twice and berthed at one of 50 quays (15,000 facts).
function benchFacts(): FactRow[] {
  const rows: FactRow[] = [];
  for (let i = 0; i < SUBJECTS; i++) {
    rows.push([`${EX}v${i}`, RDF_TYPE, `${EX}Vessel`, true], [`${EX}v${i}`, RDF_TYPE, `${EX}Craft`, false], [`${EX}v${i}`, `${EX}berthedAt`, `${EX}q${i % 50}`, true]);
  }
  return rows;
}

const pick = () => Math.floor(Math.random() * SUBJECTS);
const lookupPath = (slug: string) => {
  const i = pick();
  return `/api/v1/kbs/${slug}/facts?subject=${encodeURIComponent(`${EX}v${i}`)}&predicate=${encodeURIComponent(RDF_TYPE)}&object=${encodeURIComponent(`${EX}Craft`)}`;
};
const patternPath = (slug: string) => {
  const i = pick();
  return i % 2
    ? `/api/v1/kbs/${slug}/facts?subject=${encodeURIComponent(`${EX}v${i}`)}&limit=10`
    : `/api/v1/kbs/${slug}/facts?predicate=${encodeURIComponent(`${EX}berthedAt`)}&object=${encodeURIComponent(`${EX}q${i % 50}`)}&limit=10`;
};

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const port = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(port));
    });
  });
}

/** CPU time (ms) of a process and its direct children, user and system, from /proc (Linux); less sensitive to machine load than throughput. */
function processTreeCpuMs(pid: number): { user: number; system: number } {
  const read = (p: number) => {
    try {
      const f = fs.readFileSync(`/proc/${p}/stat`, 'utf8').split(') ')[1].split(' ');
      return { ppid: Number(f[1]), user: Number(f[11]), system: Number(f[12]) };
    } catch {
      return null;
    }
  };
  const own = read(pid);
  let user = own?.user ?? 0;
  let system = own?.system ?? 0;
  for (const entry of fs.readdirSync('/proc')) {
    if (!/^\d+$/.test(entry)) continue;
    const s = read(Number(entry));
    if (s && s.ppid === pid) {
      user += s.user;
      system += s.system;
    }
  }
  return { user: user * 10, system: system * 10 }; // USER_HZ is 100 on Linux
}

async function runHttp(url: string, auth: string, path: (slug: string) => string, slug: string) {
  const cpuBefore = processTreeCpuMs(server.pid!);
  const result = await autocannon({
    url,
    connections: CONNECTIONS,
    duration: SECONDS,
    headers: { authorization: auth },
    requests: [{ method: 'GET', setupRequest: (req) => ({ ...req, path: path(slug) }) }],
  });
  const cpuAfter = processTreeCpuMs(server.pid!);
  const n = Math.max(1, result.requests.total);
  const cpuUser = (cpuAfter.user - cpuBefore.user) / n;
  const cpuSystem = (cpuAfter.system - cpuBefore.system) / n;
  return { rps: result.requests.average, p50: result.latency.p50, p99: result.latency.p99, total: result.requests.total, ok: result['2xx'], non2xx: result.non2xx, errors: result.errors + result.timeouts, cpuPerRequest: cpuUser + cpuSystem, cpuUser, cpuSystem };
}

/**
 * The same queries as the HTTP runs, issued by 32 concurrent loops for the same time, straight to PostgreSQL: either one
 * SQL each — the named statement lookupFacts sends for one query (lookupStatement) — or, `coalesced`, through the
 * API's own FactLookupBatcher, i.e. the very statements the API sends. A better plan speeds both sides alike.
 */
async function runDirect(pool: pg.Pool, storeKey: number, kind: 'lookup' | 'pattern', coalesced: boolean) {
  const batcher = new FactLookupBatcher(pool);
  const latencies: number[] = [];
  const until = Date.now() + SECONDS * 1000;
  await Promise.all(Array.from({ length: CONNECTIONS }, async () => {
    while (Date.now() < until) {
      const i = pick();
      const [pattern, limit] = kind === 'lookup'
        ? [{ subject: `${EX}v${i}`, predicate: RDF_TYPE, object: `${EX}Craft` }, 1]
        : [i % 2 ? { subject: `${EX}v${i}` } : { predicate: `${EX}berthedAt`, object: `${EX}q${i % 50}` }, 10];
      const t0 = process.hrtime.bigint();
      if (coalesced) await batcher.lookup(storeKey, pattern, { limit });
      else await pool.query(lookupStatement(storeKey, pattern, { limit }).statement);
      latencies.push(Number(process.hrtime.bigint() - t0) / 1e6);
    }
  }));
  latencies.sort((a, b) => a - b);
  const at = (q: number) => latencies[Math.min(latencies.length - 1, Math.floor(q * latencies.length))];
  return { rps: latencies.length / SECONDS, p50: at(0.5), p99: at(0.99), total: latencies.length };
}

const loadBefore = (await import('node:os')).loadavg().map((l) => l.toFixed(1)).join(' ');
const ctx = await createContext();
const publisher = await createTestUser(ctx, { roles: ['publisher'] });
const listing = await publishedListing(ctx, benchFacts(), { publisher, title: 'Benchmark registry' });
const k = await subscriberWithKey(ctx, listing, { ratePerMinute: 1_000_000, monthlyQuota: 1_000_000_000 });
const port = await freePort();
// WORKERS server processes on one port (default 1: on the 2-core reference machine, where PostgreSQL and the load
// generator need the cores too, a second web process was not consistently faster — see server/marketplace.md).
const WORKERS = Number(process.env.WORKERS ?? 1);
// SERVER_NODE_ARGS passes flags to the server processes, e.g. "--cpu-prof --cpu-prof-dir=/tmp/prof" to profile them.
const serverArgs = (process.env.SERVER_NODE_ARGS ?? '').split(' ').filter(Boolean);
const server = spawn(process.execPath, [...serverArgs, '--import', 'tsx', 'tests/bench/serve-cluster.ts'], { env: { ...process.env, PORT: String(port), NODE_ENV: 'production', WORKERS: String(WORKERS) }, stdio: ['ignore', 'ignore', 'inherit'] });
const exited = new Promise<number | null>((resolve) => server.on('exit', resolve));
const url = `http://127.0.0.1:${port}`;
for (let i = 0; ; i++) {
  try {
    if ((await fetch(`${url}/api/v1/openapi.json`)).ok) break;
  } catch {
    if (i > 150) throw new Error('server did not start');
  }
  await new Promise((r) => setTimeout(r, 200));
}
// Warm-up: caches, JIT, connection pool.
const warm = await autocannon({ url, connections: CONNECTIONS, duration: 2, headers: { authorization: k.auth }, requests: [{ method: 'GET', setupRequest: (req) => ({ ...req, path: lookupPath(listing.slug) }) }] });

const httpLookup = await runHttp(url, k.auth, lookupPath, listing.slug);
const httpPattern = await runHttp(url, k.auth, patternPath, listing.slug);
server.kill('SIGTERM');
await exited;

const direct = new pg.Pool({ connectionString: ctx.config.databaseUrl, max: CONNECTIONS });
await runDirect(direct, listing.storeKey, 'lookup', false);
const pgLookup = await runDirect(direct, listing.storeKey, 'lookup', false);
const pgPattern = await runDirect(direct, listing.storeKey, 'pattern', false);
const pgLookupCoalesced = await runDirect(direct, listing.storeKey, 'lookup', true);
const pgPatternCoalesced = await runDirect(direct, listing.storeKey, 'pattern', true);
await direct.end();

const { rows } = await ctx.pool.query<{ n: string }>(`SELECT coalesce(sum(count), 0) AS n FROM usage_counters WHERE api_key_id = $1`, [k.key.id]);
const counted = Number(rows[0].n);

const f = (n: number) => n.toFixed(n < 10 ? 2 : 0);
console.log(`\n/api/v1 load, ${CONNECTIONS} connections, ${SECONDS} s per run, ${WORKERS} server process(es) (auth + PostgreSQL rate limit + metering on); load average before: ${loadBefore}`);
console.log('run                    req/s     p50 ms   p99 ms   requests   non-2xx   server CPU ms/request');
for (const [name, r] of [['HTTP fact lookup', httpLookup], ['HTTP pattern query', httpPattern]] as const) {
  console.log(`${name.padEnd(22)} ${f(r.rps).padStart(7)}   ${f(r.p50).padStart(6)}   ${f(r.p99).padStart(6)}   ${String(r.total).padStart(8)}   ${String(r.non2xx + r.errors).padStart(7)}   ${r.cpuPerRequest.toFixed(3)} (user ${r.cpuUser.toFixed(3)}, system ${r.cpuSystem.toFixed(3)})`);
}
for (const [name, r] of [['PostgreSQL lookup', pgLookup], ['PostgreSQL pattern', pgPattern], ['  coalesced lookup', pgLookupCoalesced], ['  coalesced pattern', pgPatternCoalesced]] as const) {
  console.log(`${name.padEnd(22)} ${f(r.rps).padStart(7)}   ${f(r.p50).padStart(6)}   ${f(r.p99).padStart(6)}   ${String(r.total).padStart(8)}`);
}
console.log(`Web-process CPU per answered request: lookups ${httpLookup.cpuPerRequest.toFixed(3)} ms, patterns ${httpPattern.cpuPerRequest.toFixed(3)} ms → about ${f(1000 / httpLookup.cpuPerRequest)} lookups/s per core of web process, PostgreSQL's own work not included`);
console.log(`ratio HTTP/PostgreSQL (one statement per query): lookups ${(httpLookup.rps / pgLookup.rps).toFixed(2)}, patterns ${(httpPattern.rps / pgPattern.rps).toFixed(2)}   (target ≥ 0.5)`);
console.log(`ratio HTTP/PostgreSQL (the API's coalesced statements, as the API sends them): lookups ${(httpLookup.rps / pgLookupCoalesced.rps).toFixed(2)}, patterns ${(httpPattern.rps / pgPatternCoalesced.rps).toFixed(2)}`);
console.log(`targets: ≥ 3000 req/s → lookups ${httpLookup.rps >= 3000 ? 'met' : 'NOT met'}, patterns ${httpPattern.rps >= 3000 ? 'met' : 'NOT met'}; p99 ≤ 25 ms → lookups ${httpLookup.p99 <= 25 ? 'met' : 'NOT met'}, patterns ${httpPattern.p99 <= 25 ? 'met' : 'NOT met'}`);
// autocannon stops each run with up to one request per connection still in flight: the server answers (and counts) those too.
const received = warm.requests.total + httpLookup.total + httpPattern.total;
const inFlight = 3 * CONNECTIONS;
const equal = counted >= received && counted <= received + inFlight;
console.log(`usage counters after graceful stop: ${counted} counted; the load generator received ${received} answers (runs end with ≤ ${inFlight} in flight) → ${equal ? 'counts equal the requests served' : 'MISMATCH'}`);
await closeContext(ctx);
