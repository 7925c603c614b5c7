// Subscriber and publisher endpoints: free subscriptions, API keys (shown once, hashed, revocable, last use),
// usage per key and day with quota left, the publisher's usage and revenue (JSON and CSV), and the admin's view.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import supertest from 'supertest';
import crypto from 'node:crypto';
import { createTestApp, guestAgent, signedInAgent, type TestApp, type TestAgent, type TestUser } from '../support/app.js';
import { planOn, publishedListing, type TestListing } from '../support/market.js';
import { stopMeter } from '../../server/services/metering.js';

const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const EX = 'http://thence.test/route#';

let t: TestApp;
let publisher: TestAgent & { user: TestUser };
let listing: TestListing;
let freePlan: { id: string };

beforeAll(async () => {
  t = await createTestApp();
  publisher = await signedInAgent(t, { roles: ['publisher'] });
  listing = await publishedListing(t.ctx, [[`${EX}pass`, RDF_TYPE, `${EX}Route`]], { publisher: publisher.user });
  freePlan = await planOn(t.ctx, listing, { name: 'Walker', monthlyQuota: 50, ratePerMinute: 100 });
});
afterAll(async () => {
  await stopMeter(t.ctx);
  await t.close();
});

describe('subscriptions (free plans)', () => {
  it('subscribes at once, refuses a second live subscription, bad input, archived plans and signed-out callers', async () => {
    const agent = await signedInAgent(t, { roles: ['subscriber'] });
    const res = await agent.post('/api/market/subscriptions').send({ planId: freePlan.id }).expect(201);
    expect(res.body.subscription).toMatchObject({ status: 'active', listing: { slug: listing.slug }, quota: { used: 0, limit: 50 } });
    expect(res.body.checkoutUrl).toBeNull();
    expect((await agent.post('/api/market/subscriptions').send({ planId: freePlan.id }).expect(409)).body.error.message).toMatch(/already subscribe/);
    expect((await agent.post('/api/market/subscriptions').send({ planId: 'nope' }).expect(400)).body.error.fields).toHaveProperty('planId');
    await agent.post('/api/market/subscriptions').send({ planId: crypto.randomUUID() }).expect(404);
    const archived = await planOn(t.ctx, listing, { name: 'Old' });
    await publisher.delete(`/api/market/publisher/plans/${archived.id}`).expect(200);
    const other = await signedInAgent(t, { roles: ['subscriber'] });
    await other.post('/api/market/subscriptions').send({ planId: archived.id }).expect(409);
    const guest = await guestAgent(t.app);
    await guest.post('/api/market/subscriptions').send({ planId: freePlan.id }).expect(401);
    const mine = await agent.get('/api/market/subscriptions').expect(200);
    expect(mine.body.subscriptions).toHaveLength(1);
  });
});

describe('API keys', () => {
  it('shows the secret once, stores only its SHA-256, lists last use, revokes', async () => {
    const agent = await signedInAgent(t, { roles: ['subscriber'] });
    const sub = (await agent.post('/api/market/subscriptions').send({ planId: freePlan.id }).expect(201)).body.subscription;
    const created = await agent.post('/api/market/keys').send({ subscriptionId: sub.id, name: 'mobile app' }).expect(201);
    const key = created.body.key;
    expect(created.headers['cache-control']).toBe('no-store');
    expect(key.secret).toMatch(/^thk_[a-z2-9]{12}_[A-Za-z0-9_-]{32}$/);
    expect(key.secret.startsWith(key.prefix + '_')).toBe(true);
    const row = (await t.ctx.pool.query(`SELECT * FROM api_keys WHERE id = $1`, [key.id])).rows[0];
    expect(row.secret_sha256).toBe(crypto.createHash('sha256').update(key.secret).digest('hex'));
    expect(JSON.stringify(row)).not.toContain(key.secret.split('_')[2]);
    let list = await agent.get('/api/market/keys').expect(200);
    expect(list.body.keys).toHaveLength(1);
    expect(list.body.keys[0]).not.toHaveProperty('secret');
    expect(list.body.keys[0].lastUsedAt).toBeNull();
    await supertest(t.app).get(`/api/v1/kbs/${listing.slug}/facts`).set('Authorization', `Bearer ${key.secret}`).expect(200);
    list = await agent.get('/api/market/keys').expect(200);
    expect(list.body.keys[0].lastUsedAt).not.toBeNull();
    expect((await agent.post('/api/market/keys').send({ subscriptionId: sub.id, name: '' }).expect(400)).body.error.fields).toHaveProperty('name');
    const stranger = await signedInAgent(t, { roles: ['subscriber'] });
    await stranger.post('/api/market/keys').send({ subscriptionId: sub.id, name: 'theirs' }).expect(404);
    await stranger.delete(`/api/market/keys/${key.id}`).expect(404);
    const revoked = await agent.delete(`/api/market/keys/${key.id}`).expect(200);
    expect(revoked.body.key.revokedAt).not.toBeNull();
    await supertest(t.app).get(`/api/v1/kbs/${listing.slug}/facts`).set('Authorization', `Bearer ${key.secret}`).expect(401);
  });
});

describe('usage and revenue', () => {
  it('the subscriber sees per key and day with quota left; the publisher per listing, day and subscriber, also as CSV; the admin sees all', async () => {
    const agent = await signedInAgent(t, { roles: ['subscriber'] });
    const sub = (await agent.post('/api/market/subscriptions').send({ planId: freePlan.id }).expect(201)).body.subscription;
    const k1 = (await agent.post('/api/market/keys').send({ subscriptionId: sub.id, name: 'first' }).expect(201)).body.key;
    const k2 = (await agent.post('/api/market/keys').send({ subscriptionId: sub.id, name: 'second' }).expect(201)).body.key;
    for (let i = 0; i < 3; i++) await supertest(t.app).get(`/api/v1/kbs/${listing.slug}/facts`).set('Authorization', `Bearer ${k1.secret}`).expect(200);
    await supertest(t.app).get(`/api/v1/kbs/${listing.slug}/facts?limit=-1`).set('Authorization', `Bearer ${k2.secret}`).expect(400);
    const mine = await agent.get('/api/market/usage/mine?days=7').expect(200);
    const today = new Date().toISOString().slice(0, 10);
    expect(mine.body.rows).toEqual(expect.arrayContaining([
      expect.objectContaining({ day: today, keyName: 'first', ok: 3, clientErrors: 0, total: 3 }),
      expect.objectContaining({ day: today, keyName: 'second', ok: 0, clientErrors: 1, total: 1 }),
    ]));
    expect(mine.body.quotas).toEqual([expect.objectContaining({ subscriptionId: sub.id, used: 3, limit: 50 })]);

    const pub = await publisher.get('/api/market/usage/publisher?days=7').expect(200);
    expect(pub.body.rows).toEqual(expect.arrayContaining([expect.objectContaining({ day: today, listingSlug: listing.slug, subscriberEmail: agent.user.email, ok: 3, clientErrors: 1, total: 4 })]));
    const csv = await publisher.get('/api/market/usage/publisher.csv?days=7').expect(200);
    expect(csv.headers['content-type']).toMatch(/^text\/csv/);
    expect(csv.headers['content-disposition']).toMatch(/^attachment; filename="?thence-usage.csv"?$/);
    const lines = csv.text.split('\r\n');
    expect(lines[0]).toBe('day,listing,subscriber,answered,client_errors,server_errors,total');
    expect(lines).toContain(`${today},${listing.slug},${agent.user.email},3,1,0,4`);

    const otherPublisher = await signedInAgent(t, { roles: ['publisher'] });
    const theirs = await otherPublisher.get('/api/market/usage/publisher?days=7').expect(200);
    expect(theirs.body.rows.filter((r: { listingSlug: string }) => r.listingSlug === listing.slug)).toEqual([]);
    await agent.get('/api/market/usage/publisher').expect(403);
    await publisher.get('/api/market/usage/all').expect(403);
    const admin = await signedInAgent(t, { roles: ['admin'] });
    const all = await admin.get('/api/market/usage/all?days=7').expect(200);
    expect(all.body.rows).toEqual(expect.arrayContaining([expect.objectContaining({ listingSlug: listing.slug, subscriberEmail: agent.user.email, total: 4 })]));
  });

  it('revenue counts paid invoices only, split into the platform fee and the publisher share', async () => {
    const agent = await signedInAgent(t, { roles: ['subscriber'] });
    const sub = (await agent.post('/api/market/subscriptions').send({ planId: freePlan.id }).expect(201)).body.subscription;
    // Invoices as the webhook books them (see market-billing.test.ts for the path through Stripe).
    await t.ctx.pool.query(
      `INSERT INTO invoices (subscription_id, listing_id, stripe_invoice_id, status, amount_cents, currency, platform_fee_cents, publisher_share_cents, paid_at)
       VALUES ($1, $2, $3, 'paid', 1900, 'eur', 285, 1615, now()), ($1, $2, $4, 'failed', 1900, 'eur', 285, 1615, NULL)`,
      [sub.id, listing.id, `in_${crypto.randomUUID()}`, `in_${crypto.randomUUID()}`]);
    const pub = await publisher.get('/api/market/usage/publisher').expect(200);
    expect(pub.body.revenue).toEqual([expect.objectContaining({ listingSlug: listing.slug, currency: 'eur', invoices: 1, amountCents: 1900, platformFeeCents: 285, publisherShareCents: 1615 })]);
  });
});

describe('when the payment provider cannot be reached', () => {
  it('saving a paid plan or subscribing to one answers 502 and saves nothing', async () => {
    // A port with nothing listening (bound, read, closed) stands for an unreachable provider.
    const net = await import('node:net');
    const port = await new Promise<number>((resolve) => {
      const s = net.createServer().listen(0, '127.0.0.1', () => {
        const p = (s.address() as { port: number }).port;
        s.close(() => resolve(p));
      });
    });
    const offline = await createTestApp({ stripe: { secretKey: 'sk_test_offline', host: '127.0.0.1', port, protocol: 'http' } });
    try {
      const owner = await signedInAgent(offline, { roles: ['publisher'] });
      const own = await publishedListing(offline.ctx, [[`${EX}col`, RDF_TYPE, `${EX}Route`]], { publisher: owner.user });
      const res = await owner.post(`/api/market/publisher/listings/${own.id}/plans`).send({ name: 'Paid', kind: 'paid', priceCents: 900, currency: 'eur', monthlyQuota: 10, ratePerMinute: 10 }).expect(502);
      expect(res.body.error.code).toBe('payment_provider');
      expect(res.body.error.message).toMatch(/Nothing was saved/);
      expect((await offline.ctx.pool.query(`SELECT count(*)::int AS n FROM plans WHERE listing_id = $1`, [own.id])).rows[0].n).toBe(0);
      const priced = (await offline.ctx.pool.query(
        `INSERT INTO plans (listing_id, name, kind, price_cents, currency, monthly_quota, rate_per_minute, stripe_product_id, stripe_price_id) VALUES ($1, 'Paid', 'paid', 900, 'eur', 10, 10, 'prod_x', $2) RETURNING id`,
        [own.id, `price_${crypto.randomUUID()}`])).rows[0];
      const buyer = await signedInAgent(offline, { roles: ['subscriber'] });
      await buyer.post('/api/market/subscriptions').send({ planId: priced.id }).expect(502);
      expect((await offline.ctx.pool.query(`SELECT count(*)::int AS n FROM subscriptions WHERE subscriber_id = $1`, [buyer.user.id])).rows[0].n).toBe(0);
    } finally {
      await stopMeter(offline.ctx);
      await offline.close();
    }
  });
});
