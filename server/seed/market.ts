// Demo plans for the demo listings (an invented scenario): a free plan and a paid monthly plan each. Idempotent: existing
// plans are kept; a paid plan whose Stripe price is missing (e.g. a fresh stand-in) gets a new product and price.
import type { AppContext } from '../context.js';
import { createPlan, type PlanRow } from '../services/plans.js';
import { stripeClient } from '../services/stripe.js';
import type { PlanInput } from '../../shared/market.js';

export const DEMO_PLANS: Record<string, PlanInput[]> = {
  'tidewater-port-registry': [
    { name: 'Deckhand', description: 'For trying the registry out and for small tools.', kind: 'free', priceCents: 0, currency: 'eur', monthlyQuota: 2_000, ratePerMinute: 60 },
    { name: 'Harbourmaster', description: 'For production apps that look up berths and vessels all day.', kind: 'paid', priceCents: 2900, currency: 'eur', monthlyQuota: 500_000, ratePerMinute: 3_000 },
  ],
  'glacier-valley-trails': [
    { name: 'Day hiker', description: 'Enough for a trail app in development.', kind: 'free', priceCents: 0, currency: 'eur', monthlyQuota: 1_000, ratePerMinute: 30 },
    { name: 'Mountain guide', description: 'For guide services and published maps.', kind: 'paid', priceCents: 1500, currency: 'eur', monthlyQuota: 200_000, ratePerMinute: 1_200 },
  ],
};

export async function seedMarket(
  ctx: AppContext,
  log: (line: string) => void = (line) => console.log(`[seed] ${line}`),
  plansBySlug: Record<string, PlanInput[]> = DEMO_PLANS,
): Promise<void> {
  for (const [slug, plans] of Object.entries(plansBySlug)) {
    const listing = (await ctx.pool.query<{ id: string; publisher_id: string }>(`SELECT id, publisher_id FROM listings WHERE slug = $1`, [slug])).rows[0];
    if (!listing) {
      log(`plans for ${slug}: listing not found, skipped`);
      continue;
    }
    const existing = (await ctx.pool.query<PlanRow>(`SELECT * FROM plans WHERE listing_id = $1`, [listing.id])).rows;
    const actor = { id: listing.publisher_id, roles: ['publisher'] };
    for (const plan of plans) {
      const found = existing.find((p) => p.name === plan.name);
      if (!found) {
        await createPlan(ctx, actor, listing.id, plan);
        log(`plan ${slug} / ${plan.name}: created`);
      } else if (found.kind === 'paid') {
        await ensurePrice(ctx, found, slug);
      }
    }
  }
}

/** Re-creates the product and price of a paid plan when the payment provider no longer knows them. */
async function ensurePrice(ctx: AppContext, plan: PlanRow, slug: string): Promise<void> {
  const stripe = stripeClient(ctx.config);
  try {
    if (plan.stripe_price_id) {
      await stripe.prices.retrieve(plan.stripe_price_id);
      return;
    }
  } catch (error) {
    if ((error as { code?: string }).code !== 'resource_missing') throw error;
  }
  const product = await stripe.products.create({ name: `${slug} — ${plan.name}`, metadata: { thence_listing: plan.listing_id, thence_plan: plan.id } });
  const price = await stripe.prices.create({ product: product.id, unit_amount: plan.price_cents, currency: plan.currency, recurring: { interval: 'month' }, metadata: { thence_plan: plan.id } });
  await ctx.pool.query(`UPDATE plans SET stripe_product_id = $2, stripe_price_id = $3, updated_at = now() WHERE id = $1`, [plan.id, product.id, price.id]);
}
