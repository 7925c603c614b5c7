// Rate limits (express-rate-limit with the PostgreSQL store, shared across app instances), IETF draft-8 RateLimit
// headers and Retry-After, the monthly quota, the quota mails at 80 % and 100 %, and metering counts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import supertest from 'supertest';
import { createTestApp, type TestApp } from '../support/app.js';
import { publishedListing, subscriberWithKey, type TestListing } from '../support/market.js';
import { meterFor, stopMeter, latencyBucket, monthStartMs } from '../../server/services/metering.js';
import { leaseSize } from '../../server/services/rateLimit.js';
import { listMail, waitForMail } from '../support/mail.js';

const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const EX = 'http://thence.test/trail#';

let a: TestApp;
let b: TestApp;
let listing: TestListing;

beforeAll(async () => {
  a = await createTestApp();
  b = await createTestApp();
  listing = await publishedListing(a.ctx, [[`${EX}ridge`, RDF_TYPE, `${EX}Trail`]]);
});
afterAll(async () => {
  await stopMeter(a.ctx);
  await stopMeter(b.ctx);
  await a.close();
  await b.close();
});

const facts = (t: TestApp, auth: string) => supertest(t.app).get(`/api/v1/kbs/${listing.slug}/facts?predicate=${encodeURIComponent(RDF_TYPE)}`).set('Authorization', auth);

async function counted(keyId: string): Promise<Record<number, number>> {
  const { rows } = await a.ctx.pool.query<{ status_class: number; n: string }>(`SELECT status_class, sum(count) AS n FROM usage_counters WHERE api_key_id = $1 GROUP BY 1`, [keyId]);
  return Object.fromEntries(rows.map((r) => [r.status_class, Number(r.n)]));
}

describe('rate limit per key per plan', () => {
  it('sends draft-8 RateLimit headers, then 429 with Retry-After; the window is shared by two app instances', async () => {
    const k = await subscriberWithKey(a.ctx, listing, { ratePerMinute: 4 });
    const first = await facts(a, k.auth).expect(200);
    // draft-ietf-httpapi-ratelimit-headers-08 §2–3: RateLimit-Policy: "<id>"; q=<quota>; w=<window s>[; pk=<partition key>],
    // RateLimit: "<id>"; r=<remaining>; t=<seconds to reset>[; pk=…] (structured-field lists, RFC 8941).
    expect(first.headers['ratelimit-policy']).toMatch(/^"[^"]+"; q=4; w=60(; pk=:[^:]+:)?$/);
    expect(first.headers['ratelimit']).toMatch(/^"[^"]+"; r=3; t=\d+(; pk=:[^:]+:)?$/);
    await facts(b, k.auth).expect(200); // second instance, same PostgreSQL window
    await facts(a, k.auth).expect(200);
    const fourth = await facts(b, k.auth).expect(200);
    expect(fourth.headers['ratelimit']).toMatch(/; r=0; /);
    const refused = await facts(a, k.auth).expect(429);
    expect(refused.body.error.code).toBe('rate_limited');
    expect(refused.body.error.message).toMatch(/4 requests a minute/);
    const retry = Number(refused.headers['retry-after']); // RFC 9110 §10.2.3: delay-seconds
    expect(retry).toBeGreaterThan(0);
    expect(retry).toBeLessThanOrEqual(60);
    await facts(b, k.auth).expect(429);
    // Another key of another subscriber has its own window.
    const other = await subscriberWithKey(a.ctx, listing, { ratePerMinute: 4 });
    await facts(b, other.auth).expect(200);
    // 429s are metered as client errors; the four answers as 2xx.
    await meterFor(a.ctx).flush();
    await meterFor(b.ctx).flush();
    expect(await counted(k.key.id)).toEqual({ 2: 4, 4: 2 });
  });
});

describe('rate-limit leases (larger limits reserve hit numbers in batches)', () => {
  it('never admits more than the limit across two instances, and refuses at most (P − 1)(lease − 1) early', async () => {
    expect(leaseSize(4)).toBe(1);
    expect(leaseSize(300)).toBe(3);
    expect(leaseSize(1_000_000)).toBe(500);
    const k = await subscriberWithKey(a.ctx, listing, { ratePerMinute: 300, monthlyQuota: 1_000_000 });
    const statuses: number[] = [];
    for (let round = 0; round < 40; round++) {
      // Eight at a time, spread over both instances: concurrent claims within one process share one lease.
      const batch = await Promise.all(Array.from({ length: 8 }, (_, i) => facts(i % 2 ? a : b, k.auth)));
      statuses.push(...batch.map((r) => r.status));
    }
    const admitted = statuses.filter((s) => s === 200).length;
    expect(statuses.filter((s) => s !== 200 && s !== 429)).toEqual([]);
    expect(admitted).toBeLessThanOrEqual(300);
    expect(admitted).toBeGreaterThanOrEqual(300 - (2 - 1) * (3 - 1));
    const bucket = (await a.ctx.pool.query(`SELECT hits FROM rate_limit_buckets WHERE key = $1`, [`v1:${k.key.id}`])).rows[0];
    expect(bucket.hits).toBeGreaterThanOrEqual(320);
  });
});

describe('monthly quota', () => {
  it('refuses with 429 quota_exhausted after the quota is used, and mails at 80 % and at 100 % once each', async () => {
    const k = await subscriberWithKey(a.ctx, listing, { monthlyQuota: 5, ratePerMinute: 1000 });
    for (let i = 0; i < 4; i++) await facts(a, k.auth).expect(200);
    await meterFor(a.ctx).flush();
    const warning = await waitForMail(k.user.email, /80 % of your quota/);
    expect(warning.text).toMatch(/4 of your 5 monthly requests/);
    await facts(a, k.auth).expect(200);
    const refused = await facts(a, k.auth).expect(429);
    expect(refused.body.error.code).toBe('quota_exhausted');
    expect(Number(refused.headers['retry-after'])).toBeGreaterThan(0);
    await meterFor(a.ctx).flush();
    await waitForMail(k.user.email, /Quota used up/);
    // The other instance reads the month's total from PostgreSQL and refuses as well.
    await facts(b, k.auth).expect(429);
    await meterFor(a.ctx).flush();
    await meterFor(b.ctx).flush();
    const mails = (await listMail(k.user.email)).filter((m) => /quota/i.test(m.subject));
    expect(mails).toHaveLength(2);
    expect(await counted(k.key.id)).toEqual({ 2: 5, 4: 2 });
  });
});

describe('metering', () => {
  it('counts every answered request by status class, latency bucket and hour, and stamps last_used_at', async () => {
    const k = await subscriberWithKey(a.ctx, listing);
    for (let i = 0; i < 7; i++) await facts(a, k.auth).expect(200);
    await supertest(a.app).get(`/api/v1/kbs/${listing.slug}/facts?subject=bad`).set('Authorization', k.auth).expect(400);
    await meterFor(a.ctx).flush();
    expect(await counted(k.key.id)).toEqual({ 2: 7, 4: 1 });
    const { rows } = await a.ctx.pool.query(`SELECT hour, latency_bucket, listing_id, subscription_id FROM usage_counters WHERE api_key_id = $1`, [k.key.id]);
    for (const r of rows) {
      expect(r.hour.getUTCMinutes()).toBe(0);
      expect(r.listing_id).toBe(listing.id);
      expect(r.subscription_id).toBe(k.subscription.id);
    }
    const used = await a.ctx.pool.query(`SELECT last_used_at FROM api_keys WHERE id = $1`, [k.key.id]);
    expect(used.rows[0].last_used_at).not.toBeNull();
  });

  it('the quota month starts on the 1st at 00:00 UTC, also when the clock crosses a month or goes back', () => {
    // Calendar dates (Gregorian, ISO 8601 instants in UTC), written out by hand: 2028 is a leap year.
    const at = (iso: string) => new Date(iso).getTime();
    expect(monthStartMs(at('2028-02-29T23:59:59.999Z'))).toBe(at('2028-02-01T00:00:00Z'));
    expect(monthStartMs(at('2028-03-01T00:00:00Z'))).toBe(at('2028-03-01T00:00:00Z'));
    expect(monthStartMs(at('2028-12-31T23:59:59.999Z'))).toBe(at('2028-12-01T00:00:00Z'));
    expect(monthStartMs(at('2029-01-01T00:00:00Z'))).toBe(at('2029-01-01T00:00:00Z'));
    expect(monthStartMs(at('2028-02-15T12:00:00Z'))).toBe(at('2028-02-01T00:00:00Z'));
  });
  it('latency buckets are upper bounds in milliseconds', () => {
    expect(latencyBucket(0.4)).toBe(0);
    expect(latencyBucket(1)).toBe(0);
    expect(latencyBucket(1.01)).toBe(1);
    expect(latencyBucket(30)).toBe(5);
    expect(latencyBucket(5000)).toBe(10);
  });
});
