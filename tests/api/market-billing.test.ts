// Paid plans through the Stripe stand-in and the official SDK: products and prices on save, Checkout in subscription
// mode, signed webhooks (bad signature, replay), invoices with the platform fee split, receipts, renewals, failed
// payments, upgrade, downgrade and cancellation.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import supertest from 'supertest';
import Stripe from 'stripe';
import { signedInAgent, type TestAgent, type TestUser } from '../support/app.js';
import { startPaymentsHarness, type PaymentsHarness } from '../support/payments.js';
import { publishedListing, type TestListing } from '../support/market.js';
import { waitForMail, listMail } from '../support/mail.js';
import { splitAmount } from '../../server/services/billing.js';

const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const EX = 'http://thence.test/port#';

let h: PaymentsHarness;
let publisher: TestAgent & { user: TestUser };
let listing: TestListing;
const plans: Record<string, { id: string }> = {};

beforeAll(async () => {
  h = await startPaymentsHarness();
  publisher = await signedInAgent(h, { roles: ['publisher'] });
  listing = await publishedListing(h.ctx, [[`${EX}quay1`, RDF_TYPE, `${EX}Quay`]], { publisher: publisher.user });
  for (const [name, body] of Object.entries({
    free: { name: 'Harbour free', kind: 'free', monthlyQuota: 100, ratePerMinute: 60 },
    basic: { name: 'Harbour basic', kind: 'paid', priceCents: 1900, currency: 'eur', monthlyQuota: 10_000, ratePerMinute: 600 },
    pro: { name: 'Harbour pro', kind: 'paid', priceCents: 4900, currency: 'eur', monthlyQuota: 100_000, ratePerMinute: 6000 },
  })) {
    const res = await publisher.post(`/api/market/publisher/listings/${listing.id}/plans`).send(body);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    plans[name] = res.body.plan;
  }
});
afterAll(async () => h?.close());

const sub = async (id: string) => (await h.ctx.pool.query(`SELECT * FROM subscriptions WHERE id = $1`, [id])).rows[0];

/** Pays a checkout on the stand-in's hosted page (the form its button submits) and follows nothing: returns the redirect. */
async function pay(checkoutUrl: string, card = '4242 4242 4242 4242') {
  const page = await fetch(checkoutUrl);
  expect(page.status).toBe(200);
  expect(await page.text()).toContain('data-testid="confirm-payment"');
  return fetch(`${checkoutUrl}/confirm`, { method: 'POST', headers: { 'Content-Type': 'application/x-www-form-urlencoded' }, body: new URLSearchParams({ card, email: 'ignored@example.test' }), redirect: 'manual' });
}

async function subscribedAgent(planKey: string) {
  const agent = await signedInAgent(h, { roles: ['subscriber'] });
  const res = await agent.post('/api/market/subscriptions').send({ planId: plans[planKey].id }).expect(200);
  expect(res.body.checkoutUrl).toMatch(new RegExp(`^${h.standIn.url}/checkout/cs_test_`));
  const redirect = await pay(res.body.checkoutUrl);
  expect(redirect.status).toBe(303);
  const location = redirect.headers.get('location')!;
  expect(location).toMatch(new RegExp(`^${h.baseUrl}/market/subscriptions\\?checkout=cs_test_`)); // {CHECKOUT_SESSION_ID} replaced
  const sessionId = new URL(location).searchParams.get('checkout')!;
  const synced = await agent.post(`/api/market/subscriptions/checkout/${sessionId}/sync`).expect(200);
  return { agent, subscription: synced.body.subscription, sessionId };
}

describe('plans', () => {
  it('a paid plan has a Stripe product and a recurring monthly price; a new price replaces and archives the old one', async () => {
    const row = (await h.ctx.pool.query(`SELECT * FROM plans WHERE id = $1`, [plans.basic.id])).rows[0];
    const stripe = new Stripe('sk_test_thence_harness', { host: '127.0.0.1', port: Number(new URL(h.standIn.url).port), protocol: 'http' });
    const price = await stripe.prices.retrieve(row.stripe_price_id);
    expect(price).toMatchObject({ unit_amount: 1900, currency: 'eur', recurring: { interval: 'month' }, product: row.stripe_product_id, active: true });
    const updated = await publisher.put(`/api/market/publisher/plans/${plans.basic.id}`).send({ name: 'Harbour basic', kind: 'paid', priceCents: 2100, currency: 'eur', monthlyQuota: 10_000, ratePerMinute: 600 }).expect(200);
    expect(updated.body.plan.priceCents).toBe(2100);
    const after = (await h.ctx.pool.query(`SELECT stripe_price_id FROM plans WHERE id = $1`, [plans.basic.id])).rows[0];
    expect(after.stripe_price_id).not.toBe(row.stripe_price_id);
    expect((await stripe.prices.retrieve(row.stripe_price_id)).active).toBe(false);
    expect((await stripe.prices.retrieve(after.stripe_price_id)).unit_amount).toBe(2100);
    // The stand-in's list pagination, as Stripe's: newest first, starting_after, has_more.
    const first = await stripe.prices.list({ product: row.stripe_product_id, limit: 1 });
    expect(first).toMatchObject({ object: 'list', has_more: true, url: '/v1/prices' });
    const second = await stripe.prices.list({ product: row.stripe_product_id, limit: 1, starting_after: first.data[0].id });
    expect(second.has_more).toBe(false);
    expect(new Set([first.data[0].id, second.data[0].id])).toEqual(new Set([row.stripe_price_id, after.stripe_price_id]));
  });

  it('refuses bad plan input per field and plans on another publisher’s listing', async () => {
    const bad = await publisher.post(`/api/market/publisher/listings/${listing.id}/plans`).send({ name: '', kind: 'paid', priceCents: 10, monthlyQuota: 0, ratePerMinute: 1 }).expect(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(expect.arrayContaining(['name', 'priceCents', 'monthlyQuota']));
    const stranger = await signedInAgent(h, { roles: ['publisher'] });
    await stranger.post(`/api/market/publisher/listings/${listing.id}/plans`).send({ name: 'x', kind: 'free', monthlyQuota: 5, ratePerMinute: 5 }).expect(404);
    const subscriber = await signedInAgent(h, { roles: ['subscriber'] });
    await subscriber.post(`/api/market/publisher/listings/${listing.id}/plans`).send({ name: 'x', kind: 'free', monthlyQuota: 5, ratePerMinute: 5 }).expect(403);
    const listed = await supertest(h.app).get(`/api/market/listings/${listing.slug}/plans`).expect(200);
    expect(listed.body.plans.map((p: { name: string }) => p.name)).toEqual(['Harbour free', 'Harbour basic', 'Harbour pro']);
  });
});

describe('checkout and webhooks', () => {
  it('subscribing to a paid plan goes through checkout; webhooks make it live, book the invoice with the fee split and mail a receipt', async () => {
    const { agent, subscription } = await subscribedAgent('basic');
    expect(subscription).toMatchObject({ status: 'active', plan: { id: plans.basic.id } });
    const row = await sub(subscription.id);
    expect(row.stripe_subscription_id).toMatch(/^sub_/);
    expect(row.stripe_customer_id).toMatch(/^cus_/);
    const invoices = (await h.ctx.pool.query(`SELECT * FROM invoices WHERE subscription_id = $1`, [subscription.id])).rows;
    expect(invoices).toHaveLength(1);
    const { fee, share } = splitAmount(2100, h.ctx.config.stripe.platformFeePercent);
    expect(invoices[0]).toMatchObject({ status: 'paid', amount_cents: 2100, currency: 'eur', platform_fee_cents: fee, publisher_share_cents: share });
    expect(fee + share).toBe(2100);
    const receipt = await waitForMail(agent.user.email, /^Receipt /);
    expect(receipt.text).toContain('21.00 EUR');
    const key = await agent.post('/api/market/keys').send({ subscriptionId: subscription.id, name: 'prod' }).expect(201);
    await supertest(h.app).get(`/api/v1/kbs/${listing.slug}/facts`).set('Authorization', `Bearer ${key.body.key.secret}`).expect(200);
  });

  it('a declined test card leaves the subscription pending, with the reason on the page', async () => {
    const agent = await signedInAgent(h, { roles: ['subscriber'] });
    const res = await agent.post('/api/market/subscriptions').send({ planId: plans.pro.id }).expect(200);
    const declined = await pay(res.body.checkoutUrl, '4000 0000 0000 0002'); // Stripe's documented generic-decline card
    expect(declined.status).toBe(402);
    expect(await declined.text()).toContain('Your card was declined.');
    const mine = await agent.get('/api/market/subscriptions').expect(200);
    expect(mine.body.subscriptions[0].status).toBe('pending');
  });

  it('refuses a webhook whose signature does not verify, and changes nothing', async () => {
    const before = (await h.ctx.pool.query(`SELECT count(*)::int AS n FROM webhook_events`)).rows[0].n;
    const payload = JSON.stringify({ id: 'evt_forged_1', object: 'event', type: 'invoice.paid', data: { object: {} } });
    const wrongSecret = Stripe.webhooks.generateTestHeaderString({ payload, secret: 'whsec_not_ours' });
    const res = await supertest(h.app).post('/api/webhooks/stripe').set('Content-Type', 'application/json').set('Stripe-Signature', wrongSecret).send(payload).expect(400);
    expect(res.body.error.code).toBe('bad_signature');
    const good = Stripe.webhooks.generateTestHeaderString({ payload, secret: h.webhookSecret });
    await supertest(h.app).post('/api/webhooks/stripe').set('Content-Type', 'application/json').set('Stripe-Signature', good).send(payload.replace('invoice.paid', 'invoice.payment_failed')).expect(400);
    await supertest(h.app).post('/api/webhooks/stripe').set('Content-Type', 'application/json').send(payload).expect(400);
    // A timestamp outside the SDK's default five-minute tolerance is refused as well (replay protection).
    const stale = Stripe.webhooks.generateTestHeaderString({ payload, secret: h.webhookSecret, timestamp: Math.floor(Date.now() / 1000) - 3600 });
    await supertest(h.app).post('/api/webhooks/stripe').set('Content-Type', 'application/json').set('Stripe-Signature', stale).send(payload).expect(400);
    expect((await h.ctx.pool.query(`SELECT count(*)::int AS n FROM webhook_events`)).rows[0].n).toBe(before);
  });

  it('a replayed event (same id, freshly signed) is acknowledged and not applied twice', async () => {
    const { agent, subscription } = await subscribedAgent('pro');
    const row = await sub(subscription.id);
    const stripe = new Stripe('sk_test_thence_harness', { host: '127.0.0.1', port: Number(new URL(h.standIn.url).port), protocol: 'http' });
    const events = await stripe.events.list({ type: 'invoice.paid', limit: 100 });
    const event = events.data.find((e) => (e.data.object as Stripe.Invoice).parent?.subscription_details?.subscription === row.stripe_subscription_id)!;
    expect(event).toBeDefined();
    await waitForMail(agent.user.email, /^Receipt /);
    const payload = JSON.stringify(event);
    const res = await supertest(h.app).post('/api/webhooks/stripe').set('Content-Type', 'application/json')
      .set('Stripe-Signature', Stripe.webhooks.generateTestHeaderString({ payload, secret: h.webhookSecret })).send(payload).expect(200);
    expect(res.body.outcome).toBe('duplicate');
    const invoices = (await h.ctx.pool.query(`SELECT count(*)::int AS n FROM invoices WHERE subscription_id = $1`, [subscription.id])).rows[0].n;
    expect(invoices).toBe(1);
    await new Promise((r) => setTimeout(r, 300));
    expect((await listMail(agent.user.email)).filter((m) => m.subject.startsWith('Receipt'))).toHaveLength(1);
  });
});

describe('renewals, failed payments, plan changes and cancellation', () => {
  it('a renewal books a second invoice and moves the period; a failed payment makes it past due (keys still work), mails, and recovers', async () => {
    const { agent, subscription } = await subscribedAgent('basic');
    const row = await sub(subscription.id);
    const key = (await agent.post('/api/market/keys').send({ subscriptionId: subscription.id, name: 'k' }).expect(201)).body.key.secret;
    const renew = await fetch(`${h.standIn.url}/_standin/subscriptions/${row.stripe_subscription_id}/renew`, { method: 'POST' });
    expect(renew.status).toBe(200);
    const renewed = await sub(subscription.id);
    expect(renewed.current_period_start.getTime()).toBeGreaterThan(row.current_period_start.getTime());
    const failed = await fetch(`${h.standIn.url}/_standin/subscriptions/${row.stripe_subscription_id}/fail-payment`, { method: 'POST' });
    expect(failed.status).toBe(200);
    expect((await sub(subscription.id)).status).toBe('past_due');
    await waitForMail(agent.user.email, /^Payment failed/);
    await supertest(h.app).get(`/api/v1/kbs/${listing.slug}/facts`).set('Authorization', `Bearer ${key}`).expect(200);
    const inv = (await h.ctx.pool.query(`SELECT status, count(*)::int AS n FROM invoices WHERE subscription_id = $1 GROUP BY 1 ORDER BY 1`, [subscription.id])).rows;
    expect(inv).toEqual([{ status: 'failed', n: 1 }, { status: 'paid', n: 2 }]);
    await fetch(`${h.standIn.url}/_standin/subscriptions/${row.stripe_subscription_id}/renew`, { method: 'POST' });
    expect((await sub(subscription.id)).status).toBe('active');
  });

  it('upgrade and downgrade between paid plans change the Stripe price; downgrade to free ends the Stripe subscription', async () => {
    const { agent, subscription } = await subscribedAgent('basic');
    const stripeId = (await sub(subscription.id)).stripe_subscription_id;
    const up = await agent.put(`/api/market/subscriptions/${subscription.id}/plan`).send({ planId: plans.pro.id }).expect(200);
    expect(up.body.subscription.plan.id).toBe(plans.pro.id);
    const remote = h.standIn.account.get('subscription', stripeId) as unknown as Stripe.Subscription;
    const proPrice = (await h.ctx.pool.query(`SELECT stripe_price_id FROM plans WHERE id = $1`, [plans.pro.id])).rows[0].stripe_price_id;
    expect(remote.items.data[0].price.id).toBe(proPrice);
    const down = await agent.put(`/api/market/subscriptions/${subscription.id}/plan`).send({ planId: plans.free.id }).expect(200);
    expect(down.body.subscription).toMatchObject({ status: 'active', plan: { id: plans.free.id } });
    expect(remote.status).toBe('canceled');
    // The customer.subscription.deleted event of the detached Stripe subscription leaves the free subscription alone.
    expect((await sub(subscription.id)).status).toBe('active');
    // Free → paid again goes through checkout and keeps the same subscription (and its keys).
    const again = await agent.put(`/api/market/subscriptions/${subscription.id}/plan`).send({ planId: plans.basic.id }).expect(200);
    expect(again.body.checkoutUrl).toBeTruthy();
    expect((await pay(again.body.checkoutUrl)).status).toBe(303);
    const row = await sub(subscription.id);
    expect(row.plan_id).toBe(plans.basic.id);
    expect(row.stripe_subscription_id).not.toBe(stripeId);
    await agent.put(`/api/market/subscriptions/${subscription.id}/plan`).send({ planId: plans.basic.id }).expect(409);
  });

  it('cancel at period end keeps access until the period ends; then the key is refused', async () => {
    const { agent, subscription } = await subscribedAgent('pro');
    const key = (await agent.post('/api/market/keys').send({ subscriptionId: subscription.id, name: 'k' }).expect(201)).body.key.secret;
    const canceled = await agent.post(`/api/market/subscriptions/${subscription.id}/cancel`).send({ when: 'period_end' }).expect(200);
    expect(canceled.body.subscription).toMatchObject({ status: 'active', cancelAtPeriodEnd: true });
    await supertest(h.app).get(`/api/v1/kbs/${listing.slug}/facts`).set('Authorization', `Bearer ${key}`).expect(200);
    const row = await sub(subscription.id);
    await fetch(`${h.standIn.url}/_standin/subscriptions/${row.stripe_subscription_id}/renew`, { method: 'POST' }); // period ends
    expect((await sub(subscription.id)).status).toBe('canceled');
    const refused = await supertest(h.app).get(`/api/v1/kbs/${listing.slug}/facts`).set('Authorization', `Bearer ${key}`).expect(403);
    expect(refused.body.error.code).toBe('subscription_inactive');
    await agent.post(`/api/market/subscriptions/${subscription.id}/cancel`).send({ when: 'now' }).expect(409);
  });

  it('a scheduled cancellation can be taken back (resume), at Stripe and here', async () => {
    const { agent, subscription } = await subscribedAgent('basic');
    await agent.post(`/api/market/subscriptions/${subscription.id}/resume`).send({}).expect(409);
    await agent.post(`/api/market/subscriptions/${subscription.id}/cancel`).send({ when: 'period_end' }).expect(200);
    const remote = h.standIn.account.get('subscription', (await sub(subscription.id)).stripe_subscription_id);
    expect(remote.cancel_at_period_end).toBe(true);
    const resumed = await agent.post(`/api/market/subscriptions/${subscription.id}/resume`).send({}).expect(200);
    expect(resumed.body.subscription.cancelAtPeriodEnd).toBe(false);
    expect(remote.cancel_at_period_end).toBe(false);
    const stranger = await signedInAgent(h, { roles: ['subscriber'] });
    await stranger.post(`/api/market/subscriptions/${subscription.id}/cancel`).send({ when: 'now' }).expect(404);
    await stranger.put(`/api/market/subscriptions/${subscription.id}/plan`).send({ planId: plans.pro.id }).expect(404);
  });

  it('cancel now ends a paid subscription at Stripe and here', async () => {
    const { agent, subscription } = await subscribedAgent('basic');
    const res = await agent.post(`/api/market/subscriptions/${subscription.id}/cancel`).send({ when: 'now' }).expect(200);
    expect(res.body.subscription.status).toBe('canceled');
    const remote = h.standIn.account.get('subscription', (await sub(subscription.id)).stripe_subscription_id);
    expect(remote.status).toBe('canceled');
  });
});
