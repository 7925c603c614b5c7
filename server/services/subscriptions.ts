// Subscriptions: free plans start at once; paid plans go through Stripe Checkout (subscription mode) and become live when
// the signed webhook (or the success page's sync) reports the session complete. Plan changes and cancellations go through
// the Stripe SDK for paid plans; price changes apply at once without proration (common practice for simple monthly plans).
import type pg from 'pg';
import type { AppContext } from '../context.js';
import { conflict, HttpError, notFound } from '../http/errors.js';
import type { SubscribeResult, SubscriptionView } from '../../shared/market.js';
import { getPlan, paymentProviderError, toPlanView, type PlanRow } from './plans.js';
import { stripeClient } from './stripe.js';
import { meterFor, monthStart } from './metering.js';
import { forgetSubscription } from './apiKeys.js';

export interface SubscriptionRow {
  id: string; subscriber_id: string; listing_id: string; plan_id: string; status: 'pending' | 'active' | 'past_due' | 'canceled';
  stripe_customer_id: string | null; stripe_subscription_id: string | null; stripe_checkout_session_id: string | null;
  current_period_start: Date | null; current_period_end: Date | null; cancel_at_period_end: boolean; created_at: Date;
}

export const LIVE_STATUSES = ['active', 'past_due'] as const;
/** Past-due subscriptions keep API access while Stripe retries the card (common practice: a grace period). */
export const isLive = (status: string) => (LIVE_STATUSES as readonly string[]).includes(status);

const addMonth = (d: Date) => new Date(Date.UTC(d.getUTCFullYear(), d.getUTCMonth() + 1, d.getUTCDate(), d.getUTCHours(), d.getUTCMinutes(), d.getUTCSeconds()));

export async function subscriptionView(ctx: AppContext, row: SubscriptionRow): Promise<SubscriptionView> {
  const { rows } = await ctx.pool.query<PlanRow & { slug: string; title: string }>(
    `SELECT p.*, l.slug, l.title FROM plans p JOIN listings l ON l.id = $2 WHERE p.id = $1`, [row.plan_id, row.listing_id]);
  const plan = rows[0];
  const used = await meterFor(ctx).usedThisMonth(row.id);
  return {
    id: row.id, status: row.status, listing: { id: row.listing_id, slug: plan.slug, title: plan.title }, plan: toPlanView(plan),
    currentPeriodStart: row.current_period_start?.toISOString() ?? null, currentPeriodEnd: row.current_period_end?.toISOString() ?? null,
    cancelAtPeriodEnd: row.cancel_at_period_end, createdAt: row.created_at.toISOString(),
    quota: { month: monthStart().toISOString().slice(0, 7), used, limit: plan.monthly_quota },
  };
}

/** The subscriber's subscriptions, live ones first; unfinished checkouts older than a day are left out. */
export async function mySubscriptions(ctx: AppContext, userId: string): Promise<SubscriptionView[]> {
  const { rows } = await ctx.pool.query<SubscriptionRow>(
    `SELECT * FROM subscriptions WHERE subscriber_id = $1 AND (status <> 'pending' OR created_at > now() - interval '1 day')
      ORDER BY (status IN ('active','past_due')) DESC, created_at DESC`, [userId]);
  return Promise.all(rows.map((row) => subscriptionView(ctx, row)));
}

export async function ownedSubscription(ctx: AppContext, userId: string, id: string, client: pg.Pool | pg.PoolClient = ctx.pool): Promise<SubscriptionRow> {
  if (!/^[0-9a-f-]{36}$/i.test(id)) throw notFound('No such subscription.');
  const { rows } = await client.query<SubscriptionRow>(`SELECT * FROM subscriptions WHERE id = $1 AND subscriber_id = $2`, [id, userId]);
  if (!rows[0]) throw notFound('No such subscription.');
  return rows[0];
}

async function subscribablePlan(ctx: AppContext, planId: string): Promise<PlanRow & { slug: string; published: boolean }> {
  const plan = await getPlan(ctx, planId);
  if (!plan) throw notFound('No such plan.');
  const { rows } = await ctx.pool.query<{ slug: string; published: boolean }>(`SELECT slug, published_version_id IS NOT NULL AS published FROM listings WHERE id = $1`, [plan.listing_id]);
  if (plan.archived_at) throw conflict('This plan is no longer offered; choose another plan of the listing.');
  if (!rows[0]?.published) throw conflict('This listing has no published version yet, so it cannot be subscribed to.');
  return { ...plan, ...rows[0] };
}

async function checkoutFor(ctx: AppContext, user: Express.User, subscriptionId: string, plan: PlanRow & { slug: string }): Promise<string> {
  if (!plan.stripe_price_id) throw new HttpError(409, 'This paid plan has no price at the payment provider yet; the publisher must save it again.', 'conflict');
  const previous = await ctx.pool.query<{ stripe_customer_id: string }>(
    `SELECT stripe_customer_id FROM subscriptions WHERE subscriber_id = $1 AND stripe_customer_id IS NOT NULL ORDER BY created_at DESC LIMIT 1`, [user.id]);
  const metadata = { thence_subscription: subscriptionId, thence_plan: plan.id };
  try {
    const session = await stripeClient(ctx.config).checkout.sessions.create({
      mode: 'subscription',
      line_items: [{ price: plan.stripe_price_id, quantity: 1 }],
      ...(previous.rows[0] ? { customer: previous.rows[0].stripe_customer_id } : { customer_email: user.email }),
      client_reference_id: subscriptionId,
      metadata,
      subscription_data: { metadata },
      success_url: `${ctx.config.publicUrl}/market/subscriptions?checkout={CHECKOUT_SESSION_ID}`,
      cancel_url: `${ctx.config.publicUrl}/listings/${encodeURIComponent(plan.slug)}?checkout=canceled`,
    });
    await ctx.pool.query(`UPDATE subscriptions SET stripe_checkout_session_id = $2, updated_at = now() WHERE id = $1 AND status = 'pending'`, [subscriptionId, session.id]);
    if (!session.url) throw new Error('the checkout session has no URL');
    return session.url;
  } catch (error) {
    throw paymentProviderError('starting the checkout', error);
  }
}

export async function subscribe(ctx: AppContext, user: Express.User, planId: string): Promise<SubscribeResult> {
  const plan = await subscribablePlan(ctx, planId);
  const live = await ctx.pool.query<{ id: string }>(`SELECT id FROM subscriptions WHERE subscriber_id = $1 AND listing_id = $2 AND status IN ('active','past_due')`, [user.id, plan.listing_id]);
  if (live.rows[0]) throw conflict('You already subscribe to this listing; change the plan of that subscription instead.', { planId: [`Subscription ${live.rows[0].id} is live.`] });
  if (plan.kind === 'free') {
    const now = new Date();
    try {
      const { rows } = await ctx.pool.query<SubscriptionRow>(
        `INSERT INTO subscriptions (subscriber_id, listing_id, plan_id, status, current_period_start, current_period_end) VALUES ($1,$2,$3,'active',$4,$5) RETURNING *`,
        [user.id, plan.listing_id, plan.id, now, addMonth(now)]);
      return { subscription: await subscriptionView(ctx, rows[0]), checkoutUrl: null };
    } catch (error) {
      if ((error as { code?: string }).code === '23505') throw conflict('You already subscribe to this listing.');
      throw error;
    }
  }
  const { rows } = await ctx.pool.query<{ id: string }>(
    `INSERT INTO subscriptions (subscriber_id, listing_id, plan_id, status) VALUES ($1,$2,$3,'pending') RETURNING id`, [user.id, plan.listing_id, plan.id]);
  try {
    return { subscription: null, checkoutUrl: await checkoutFor(ctx, user, rows[0].id, plan) };
  } catch (error) {
    // No checkout was opened: leave no half-made subscription behind.
    await ctx.pool.query(`DELETE FROM subscriptions WHERE id = $1 AND status = 'pending'`, [rows[0].id]);
    throw error;
  }
}

/** Upgrade or downgrade within the same listing. Free → paid goes through checkout; paid → free ends the Stripe subscription now. */
export async function changePlan(ctx: AppContext, user: Express.User, subscriptionId: string, planId: string): Promise<SubscribeResult> {
  const sub = await ownedSubscription(ctx, user.id, subscriptionId);
  if (!isLive(sub.status)) throw conflict(`This subscription is ${sub.status}; subscribe again instead.`);
  const plan = await subscribablePlan(ctx, planId);
  if (plan.listing_id !== sub.listing_id) throw new HttpError(400, 'The new plan belongs to another listing; plans can only change within one listing.', 'bad_request', { planId: ['Choose a plan of the same listing.'] });
  if (plan.id === sub.plan_id) throw conflict('The subscription is already on this plan.');
  const current = (await getPlan(ctx, sub.plan_id))!;
  const stripe = stripeClient(ctx.config);
  if (plan.kind === 'paid' && !sub.stripe_subscription_id) return { subscription: null, checkoutUrl: await checkoutFor(ctx, user, sub.id, plan) };
  if (plan.kind === 'paid' && sub.stripe_subscription_id) {
    try {
      const remote = await stripe.subscriptions.retrieve(sub.stripe_subscription_id);
      await stripe.subscriptions.update(sub.stripe_subscription_id, {
        items: [{ id: remote.items.data[0].id, price: plan.stripe_price_id! }],
        proration_behavior: 'none',
        cancel_at_period_end: false,
        metadata: { thence_subscription: sub.id, thence_plan: plan.id },
      });
    } catch (error) {
      throw paymentProviderError('changing the plan', error);
    }
  } else if (current.kind === 'paid' && sub.stripe_subscription_id) {
    try {
      await stripe.subscriptions.cancel(sub.stripe_subscription_id);
    } catch (error) {
      throw paymentProviderError('ending the paid plan', error);
    }
  }
  const now = new Date();
  const { rows } = await ctx.pool.query<SubscriptionRow>(
    `UPDATE subscriptions SET plan_id = $2, cancel_at_period_end = false, updated_at = now(),
        stripe_subscription_id = CASE WHEN $3 THEN NULL ELSE stripe_subscription_id END,
        status = 'active',
        current_period_start = CASE WHEN $3 THEN $4 ELSE current_period_start END,
        current_period_end = CASE WHEN $3 THEN $5 ELSE current_period_end END
      WHERE id = $1 RETURNING *`,
    [sub.id, plan.id, plan.kind === 'free', now, addMonth(now)]);
  forgetSubscription(sub.id);
  return { subscription: await subscriptionView(ctx, rows[0]), checkoutUrl: null };
}

/** Cancels now (access ends at once) or at the end of the paid period (access until then). Free plans end now. */
export async function cancelSubscription(ctx: AppContext, user: Express.User, subscriptionId: string, when: 'now' | 'period_end'): Promise<SubscriptionView> {
  const sub = await ownedSubscription(ctx, user.id, subscriptionId);
  if (sub.status === 'canceled') throw conflict('This subscription is already canceled.');
  if (sub.status === 'pending') {
    const { rows } = await ctx.pool.query<SubscriptionRow>(`UPDATE subscriptions SET status = 'canceled', canceled_at = now(), updated_at = now() WHERE id = $1 RETURNING *`, [sub.id]);
    return subscriptionView(ctx, rows[0]);
  }
  const stripe = stripeClient(ctx.config);
  let rows: SubscriptionRow[];
  if (sub.stripe_subscription_id && when === 'period_end') {
    try {
      await stripe.subscriptions.update(sub.stripe_subscription_id, { cancel_at_period_end: true });
    } catch (error) {
      throw paymentProviderError('scheduling the cancellation', error);
    }
    ({ rows } = await ctx.pool.query<SubscriptionRow>(`UPDATE subscriptions SET cancel_at_period_end = true, updated_at = now() WHERE id = $1 RETURNING *`, [sub.id]));
  } else {
    if (sub.stripe_subscription_id) {
      try {
        await stripe.subscriptions.cancel(sub.stripe_subscription_id);
      } catch (error) {
        throw paymentProviderError('canceling the subscription', error);
      }
    }
    ({ rows } = await ctx.pool.query<SubscriptionRow>(`UPDATE subscriptions SET status = 'canceled', canceled_at = now(), updated_at = now() WHERE id = $1 RETURNING *`, [sub.id]));
  }
  forgetSubscription(sub.id);
  return subscriptionView(ctx, rows[0]);
}

/** Takes back a cancellation scheduled for the period end. */
export async function resumeSubscription(ctx: AppContext, user: Express.User, subscriptionId: string): Promise<SubscriptionView> {
  const sub = await ownedSubscription(ctx, user.id, subscriptionId);
  if (!isLive(sub.status) || !sub.cancel_at_period_end) throw conflict('Only a subscription with a scheduled cancellation can be resumed.');
  try {
    await stripeClient(ctx.config).subscriptions.update(sub.stripe_subscription_id!, { cancel_at_period_end: false });
  } catch (error) {
    throw paymentProviderError('resuming the subscription', error);
  }
  const { rows } = await ctx.pool.query<SubscriptionRow>(`UPDATE subscriptions SET cancel_at_period_end = false, updated_at = now() WHERE id = $1 RETURNING *`, [sub.id]);
  return subscriptionView(ctx, rows[0]);
}
