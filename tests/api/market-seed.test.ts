// The marketplace seed step: a free and a paid plan per listing, created once; a paid plan whose price the payment
// provider no longer knows (a fresh stand-in) gets a new product and price on the next run.
import { afterAll, beforeAll, expect, it } from 'vitest';
import { startPaymentsHarness, type PaymentsHarness } from '../support/payments.js';
import { publishedListing } from '../support/market.js';
import { DEMO_PLANS, seedMarket } from '../../server/seed/market.js';
import { stripeClient } from '../../server/services/stripe.js';

let h: PaymentsHarness;
beforeAll(async () => {
  h = await startPaymentsHarness();
});
afterAll(async () => h?.close());

it('creates the plans once and repairs a missing Stripe price', async () => {
  const listing = await publishedListing(h.ctx, [['http://thence.test/seed#a', 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type', 'http://thence.test/seed#B']]);
  const plans = { [listing.slug]: DEMO_PLANS['glacier-valley-trails'], 'no-such-listing': DEMO_PLANS['tidewater-port-registry'] };
  const log: string[] = [];
  await seedMarket(h.ctx, (line) => log.push(line), plans);
  await seedMarket(h.ctx, (line) => log.push(line), plans);
  const rows = (await h.ctx.pool.query(`SELECT name, kind, stripe_price_id FROM plans WHERE listing_id = $1 ORDER BY price_cents`, [listing.id])).rows;
  expect(rows.map((r) => [r.name, r.kind])).toEqual([['Day hiker', 'free'], ['Mountain guide', 'paid']]);
  expect(log.filter((l) => l.includes('created'))).toHaveLength(2);
  expect(log.some((l) => l.includes('no-such-listing: listing not found'))).toBe(true);
  const price = await stripeClient(h.ctx.config).prices.retrieve(rows[1].stripe_price_id);
  expect(price).toMatchObject({ unit_amount: 1500, currency: 'eur', recurring: { interval: 'month' } });

  // The provider forgets the price (as a stand-in restarted without its state file would).
  h.standIn.account.objects.get('price')!.delete(rows[1].stripe_price_id);
  await seedMarket(h.ctx, () => {}, plans);
  const repaired = (await h.ctx.pool.query(`SELECT stripe_price_id FROM plans WHERE listing_id = $1 AND kind = 'paid'`, [listing.id])).rows[0];
  expect(repaired.stripe_price_id).not.toBe(rows[1].stripe_price_id);
  expect((await stripeClient(h.ctx.config).prices.retrieve(repaired.stripe_price_id)).unit_amount).toBe(1500);
});
