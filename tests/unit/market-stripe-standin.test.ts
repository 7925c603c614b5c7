// The Stripe stand-in's REST surface as the official SDK sees it: form-encoded nested parameters (a[b][0][c]=v, as the
// SDK encodes them; Stripe API reference, "Request format" — from memory), Stripe-shaped errors with statuses, Bearer auth,
// Idempotency-Key replay and conflict, list pagination (starting_after / ending_before / has_more).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import Stripe from 'stripe';
import { decodeForm, addMonth } from '../../server/fakes/stripeState.js';
import { startStripeStandIn, type StripeStandIn } from '../../server/fakes/stripe.js';

let standIn: StripeStandIn;
let stripe: Stripe;

beforeAll(async () => {
  standIn = await startStripeStandIn({ port: 0, secretKey: 'sk_test_unit', webhookSecret: 'whsec_unit', webhookUrl: null, stateFile: null });
  stripe = new Stripe('sk_test_unit', { host: '127.0.0.1', port: Number(new URL(standIn.url).port), protocol: 'http', maxNetworkRetries: 0 });
});
afterAll(async () => standIn?.close());

describe('decodeForm', () => {
  it('nests bracketed keys, makes arrays of numeric segments and decodes + and %XX', () => {
    expect(decodeForm('line_items[0][price]=price_1&line_items[0][quantity]=1&metadata[plan]=a+b&expand[]=x&expand[]=y&mode=subscription&note=%E2%9C%93'))
      .toEqual({ line_items: [{ price: 'price_1', quantity: '1' }], metadata: { plan: 'a b' }, expand: ['x', 'y'], mode: 'subscription', note: '✓' });
  });
});

describe('the stand-in through the SDK', () => {
  it('creates products and prices with Stripe-shaped ids and objects', async () => {
    const product = await stripe.products.create({ name: 'Tide tables', metadata: { listing: 'l1' } });
    expect(product.id).toMatch(/^prod_/);
    const price = await stripe.prices.create({ product: product.id, unit_amount: 990, currency: 'eur', recurring: { interval: 'month' } });
    expect(price).toMatchObject({ object: 'price', unit_amount: 990, currency: 'eur', type: 'recurring', recurring: { interval: 'month', interval_count: 1 } });
  });

  it('answers Stripe-shaped errors: 404 resource_missing, 400 parameter_missing, 401 for a wrong key', async () => {
    await expect(stripe.prices.retrieve('price_nothing')).rejects.toMatchObject({ type: 'StripeInvalidRequestError', statusCode: 404, code: 'resource_missing', param: 'id' });
    await expect(stripe.prices.create({ currency: 'eur' } as Stripe.PriceCreateParams)).rejects.toMatchObject({ statusCode: 400, code: 'parameter_missing' });
    const wrong = new Stripe('sk_test_wrong', { host: '127.0.0.1', port: Number(new URL(standIn.url).port), protocol: 'http', maxNetworkRetries: 0 });
    await expect(wrong.products.list()).rejects.toMatchObject({ type: 'StripeAuthenticationError', statusCode: 401 });
  });

  it('replays an idempotent request and refuses the same key with other parameters', async () => {
    const a = await stripe.customers.create({ email: 'a@example.test' }, { idempotencyKey: 'idem-1' });
    const b = await stripe.customers.create({ email: 'a@example.test' }, { idempotencyKey: 'idem-1' });
    expect(b.id).toBe(a.id);
    await expect(stripe.customers.create({ email: 'b@example.test' }, { idempotencyKey: 'idem-1' })).rejects.toMatchObject({ type: 'StripeIdempotencyError', statusCode: 400 });
  });

  it('pages lists newest first with starting_after and ending_before', async () => {
    const made: string[] = [];
    for (let i = 0; i < 5; i++) made.push((await stripe.products.create({ name: `p${i}` })).id);
    const all = await stripe.products.list({ limit: 100 });
    const ours = all.data.filter((p) => made.includes(p.id)).map((p) => p.id);
    expect(ours).toEqual([...made].reverse());
    const first = await stripe.products.list({ limit: 2 });
    expect(first.has_more).toBe(true);
    const next = await stripe.products.list({ limit: 2, starting_after: first.data[1].id });
    expect(next.data[0].id).not.toBe(first.data[1].id);
    const back = await stripe.products.list({ limit: 2, ending_before: next.data[0].id });
    expect(back.data.map((p) => p.id)).toEqual(first.data.map((p) => p.id));
    const seen: string[] = [];
    for await (const p of stripe.products.list({ limit: 2 })) seen.push(p.id); // the SDK's auto-pagination
    expect(seen.length).toBe(all.data.length);
  });

  it('refuses checkout outside subscription mode or without a recurring price', async () => {
    await expect(stripe.checkout.sessions.create({ mode: 'payment', success_url: 'http://127.0.0.1/ok', line_items: [{ price: 'price_x', quantity: 1 }] })).rejects.toMatchObject({ statusCode: 400, param: 'mode' });
  });

  it('adds a calendar month, clamped to the shorter month’s last day', () => {
    expect(new Date(addMonth(Date.UTC(2026, 0, 31) / 1000) * 1000).toISOString().slice(0, 10)).toBe('2026-02-28');
    expect(new Date(addMonth(Date.UTC(2026, 11, 15) / 1000) * 1000).toISOString().slice(0, 10)).toBe('2027-01-15');
  });
});
