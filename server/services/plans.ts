// Plans per listing: the publisher defines free or paid monthly plans; saving a paid plan creates its Stripe product and
// a recurring monthly price. Stripe prices are immutable, so a price change creates a new price and archives the old one.
import type { AppContext } from '../context.js';
import { HttpError, notFound } from '../http/errors.js';
import type { PlanInput, PlanView } from '../../shared/market.js';
import { getOwnedListing, type Actor } from './listings.js';
import { stripeClient } from './stripe.js';

export interface PlanRow {
  id: string; listing_id: string; name: string; description: string; kind: 'free' | 'paid'; price_cents: number; currency: string;
  monthly_quota: number; rate_per_minute: number; stripe_product_id: string | null; stripe_price_id: string | null; archived_at: Date | null; position: number;
}

export function toPlanView(row: PlanRow): PlanView {
  return {
    id: row.id, listingId: row.listing_id, name: row.name, description: row.description, kind: row.kind, priceCents: row.price_cents,
    currency: row.currency, monthlyQuota: row.monthly_quota, ratePerMinute: row.rate_per_minute, archived: row.archived_at !== null,
  };
}

/** Wraps a failure of the payment provider into a 502 that says what could not be done; nothing is saved. */
export function paymentProviderError(action: string, error: unknown): HttpError {
  const message = ((error as { message?: string }).message ?? String(error)).replace(/\.+$/, '');
  return new HttpError(502, `The payment provider refused or did not answer while ${action}: ${message}. Nothing was saved; try again.`, 'payment_provider');
}

/** The plans subscribers can choose on a published listing (archived plans hidden), cheapest first. */
export async function publicPlans(ctx: AppContext, slug: string): Promise<PlanView[] | null> {
  const listing = await ctx.pool.query<{ id: string }>(`SELECT id FROM listings WHERE slug = $1 AND published_version_id IS NOT NULL`, [slug]);
  if (!listing.rows[0]) return null;
  const { rows } = await ctx.pool.query<PlanRow>(`SELECT * FROM plans WHERE listing_id = $1 AND archived_at IS NULL ORDER BY price_cents, position, created_at`, [listing.rows[0].id]);
  return rows.map(toPlanView);
}

/** Every plan of a listing the actor manages, archived ones included. */
export async function listingPlans(ctx: AppContext, actor: Actor, listingId: string): Promise<PlanView[]> {
  await getOwnedListing(ctx, actor, listingId);
  const { rows } = await ctx.pool.query<PlanRow>(`SELECT * FROM plans WHERE listing_id = $1 ORDER BY archived_at NULLS FIRST, price_cents, position, created_at`, [listingId]);
  return rows.map(toPlanView);
}

export async function getPlan(ctx: AppContext, planId: string): Promise<PlanRow | null> {
  if (!/^[0-9a-f-]{36}$/i.test(planId)) return null;
  const { rows } = await ctx.pool.query<PlanRow>(`SELECT * FROM plans WHERE id = $1`, [planId]);
  return rows[0] ?? null;
}

async function ownedPlan(ctx: AppContext, actor: Actor, planId: string): Promise<PlanRow> {
  const plan = await getPlan(ctx, planId);
  if (!plan) throw notFound('No such plan.');
  await getOwnedListing(ctx, actor, plan.listing_id).catch(() => {
    throw notFound('No such plan.');
  });
  return plan;
}

async function createStripePrice(ctx: AppContext, productId: string, input: PlanInput, planRef: string): Promise<string> {
  const price = await stripeClient(ctx.config).prices.create({
    product: productId,
    unit_amount: input.priceCents,
    currency: input.currency,
    recurring: { interval: 'month' },
    metadata: { thence_plan: planRef },
  });
  return price.id;
}

export async function createPlan(ctx: AppContext, actor: Actor, listingId: string, input: PlanInput): Promise<PlanView> {
  const listing = await getOwnedListing(ctx, actor, listingId);
  const id = (await ctx.pool.query<{ id: string }>(`SELECT gen_random_uuid() AS id`)).rows[0].id;
  let productId: string | null = null;
  let priceId: string | null = null;
  if (input.kind === 'paid') {
    try {
      const product = await stripeClient(ctx.config).products.create({ name: `${listing.title} — ${input.name}`, metadata: { thence_listing: listing.id, thence_plan: id } });
      productId = product.id;
      priceId = await createStripePrice(ctx, product.id, input, id);
    } catch (error) {
      throw paymentProviderError('creating the plan’s product and price', error);
    }
  }
  const { rows } = await ctx.pool.query<PlanRow>(
    `INSERT INTO plans (id, listing_id, name, description, kind, price_cents, currency, monthly_quota, rate_per_minute, stripe_product_id, stripe_price_id, position)
     VALUES ($1,$2,$3,$4,$5,$6,$7,$8,$9,$10,$11, (SELECT count(*) FROM plans WHERE listing_id = $2)) RETURNING *`,
    [id, listing.id, input.name, input.description, input.kind, input.kind === 'paid' ? input.priceCents : 0, input.currency, input.monthlyQuota, input.ratePerMinute, productId, priceId],
  );
  return toPlanView(rows[0]);
}

/**
 * Updates a plan. Its kind cannot change once it has subscribers' money attached (free ↔ paid); a new price for a paid
 * plan becomes a new Stripe price (existing Stripe subscriptions keep the price they were sold, as on Stripe).
 */
export async function updatePlan(ctx: AppContext, actor: Actor, planId: string, input: PlanInput): Promise<PlanView> {
  const plan = await ownedPlan(ctx, actor, planId);
  if (plan.kind !== input.kind) throw new HttpError(409, `A ${plan.kind} plan cannot become ${input.kind}; archive it and create a new plan.`, 'conflict', { kind: ['Create a new plan instead.'] });
  let priceId = plan.stripe_price_id;
  if (plan.kind === 'paid') {
    const stripe = stripeClient(ctx.config);
    try {
      if (input.priceCents !== plan.price_cents || input.currency !== plan.currency || !priceId) {
        const old = priceId;
        priceId = await createStripePrice(ctx, plan.stripe_product_id!, input, plan.id);
        if (old) await stripe.prices.update(old, { active: false });
      }
      if (input.name !== plan.name) {
        const listing = await getOwnedListing(ctx, actor, plan.listing_id);
        await stripe.products.update(plan.stripe_product_id!, { name: `${listing.title} — ${input.name}` });
      }
    } catch (error) {
      throw paymentProviderError('updating the plan’s price', error);
    }
  }
  const { rows } = await ctx.pool.query<PlanRow>(
    `UPDATE plans SET name=$2, description=$3, price_cents=$4, currency=$5, monthly_quota=$6, rate_per_minute=$7, stripe_price_id=$8, updated_at=now()
     WHERE id=$1 RETURNING *`,
    [plan.id, input.name, input.description, plan.kind === 'paid' ? input.priceCents : 0, input.currency, input.monthlyQuota, input.ratePerMinute, priceId],
  );
  return toPlanView(rows[0]);
}

/** Archives a plan: no new subscriptions; existing subscribers keep it until they change or cancel. */
export async function archivePlan(ctx: AppContext, actor: Actor, planId: string): Promise<PlanView> {
  const plan = await ownedPlan(ctx, actor, planId);
  if (plan.stripe_price_id) {
    try {
      await stripeClient(ctx.config).prices.update(plan.stripe_price_id, { active: false });
    } catch (error) {
      throw paymentProviderError('archiving the plan’s price', error);
    }
  }
  const { rows } = await ctx.pool.query<PlanRow>(`UPDATE plans SET archived_at = coalesce(archived_at, now()), updated_at = now() WHERE id = $1 RETURNING *`, [plan.id]);
  return toPlanView(rows[0]);
}
