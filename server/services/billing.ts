// Stripe webhook processing: each verified event is applied once (its id stored in webhook_events in the same
// transaction as its effects), invoices are booked with the platform fee and the publisher's share, receipts are mailed.
import type pg from 'pg';
import type Stripe from 'stripe';
import type { AppContext } from '../context.js';
import { forbidden } from '../http/errors.js';
import { sendMail } from './mail.js';
import { stripeClient } from './stripe.js';
import { forgetSubscription } from './apiKeys.js';
import { isLive, subscriptionView, type SubscriptionRow } from './subscriptions.js';
import type { SubscriptionView } from '../../shared/market.js';

export const HANDLED_EVENTS = ['checkout.session.completed', 'customer.subscription.updated', 'customer.subscription.deleted', 'invoice.paid', 'invoice.payment_failed'] as const;

type AfterCommit = () => Promise<void>;

/**
 * The platform's share of an invoice. A percentage fee withheld by the marketplace is common practice for app and data
 * marketplaces (config.stripe.platformFeePercent, default 15 %); rounding to the cent goes to the publisher's side.
 */
export function splitAmount(amountCents: number, feePercent: number): { fee: number; share: number } {
  const fee = Math.floor((amountCents * feePercent) / 100);
  return { fee, share: amountCents - fee };
}

/** Applies one verified event; returns 'duplicate' when its id was seen before (a replay), without touching anything. */
export async function handleStripeEvent(ctx: AppContext, event: Stripe.Event): Promise<'processed' | 'duplicate' | 'ignored'> {
  const client = await ctx.pool.connect();
  const after: AfterCommit[] = [];
  let outcome: 'processed' | 'duplicate' | 'ignored' = 'processed';
  try {
    await client.query('BEGIN');
    const inserted = await client.query(`INSERT INTO webhook_events (id, type) VALUES ($1, $2) ON CONFLICT (id) DO NOTHING RETURNING id`, [event.id, event.type]);
    if (!inserted.rowCount) outcome = 'duplicate';
    else if (event.type === 'checkout.session.completed') await applyCheckoutCompleted(ctx, client, event.data.object as Stripe.Checkout.Session, after);
    else if (event.type === 'customer.subscription.updated' || event.type === 'customer.subscription.deleted') await applySubscription(client, event.data.object as Stripe.Subscription, event.type === 'customer.subscription.deleted');
    else if (event.type === 'invoice.paid' || event.type === 'invoice.payment_failed') await applyInvoice(ctx, client, event.data.object as Stripe.Invoice, event.type === 'invoice.paid', after);
    else outcome = 'ignored';
    await client.query('COMMIT');
  } catch (error) {
    await client.query('ROLLBACK').catch(() => undefined);
    throw error;
  } finally {
    client.release();
  }
  for (const task of after) await task().catch((error) => console.error('after webhook:', (error as Error).message));
  return outcome;
}

async function lockRow(client: pg.PoolClient, where: string, value: string): Promise<SubscriptionRow | null> {
  const { rows } = await client.query<SubscriptionRow>(`SELECT * FROM subscriptions WHERE ${where} = $1 FOR UPDATE`, [value]);
  return rows[0] ?? null;
}

/** Checkout finished: the pending subscription becomes live on the paid plan (or a free one switches to it). Idempotent. */
async function applyCheckoutCompleted(ctx: AppContext, client: pg.PoolClient, session: Stripe.Checkout.Session, after: AfterCommit[]): Promise<void> {
  const subscriptionId = session.metadata?.thence_subscription ?? session.client_reference_id;
  const planId = session.metadata?.thence_plan;
  const stripeSubscription = typeof session.subscription === 'string' ? session.subscription : session.subscription?.id ?? null;
  const customer = typeof session.customer === 'string' ? session.customer : session.customer?.id ?? null;
  if (!subscriptionId || !/^[0-9a-f-]{36}$/i.test(subscriptionId) || session.status !== 'complete') return;
  const row = await lockRow(client, 'id', subscriptionId);
  if (!row || row.status === 'canceled') return;
  const other = await client.query(`SELECT 1 FROM subscriptions WHERE subscriber_id = $1 AND listing_id = $2 AND status IN ('active','past_due') AND id <> $3`, [row.subscriber_id, row.listing_id, row.id]);
  if (other.rowCount) {
    // A second checkout for a listing already subscribed (two tabs): keep the first, end the duplicate at Stripe.
    await client.query(`UPDATE subscriptions SET status = 'canceled', canceled_at = now(), stripe_subscription_id = $2, updated_at = now() WHERE id = $1`, [row.id, stripeSubscription]);
    if (stripeSubscription) after.push(async () => void (await stripeClient(ctx.config).subscriptions.cancel(stripeSubscription)));
    return;
  }
  const previousStripe = row.stripe_subscription_id;
  await client.query(
    `UPDATE subscriptions SET status = 'active', plan_id = coalesce($2::uuid, plan_id), stripe_customer_id = coalesce($3, stripe_customer_id),
        stripe_subscription_id = coalesce($4, stripe_subscription_id), stripe_checkout_session_id = $5, cancel_at_period_end = false,
        current_period_start = coalesce(current_period_start, now()), updated_at = now()
      WHERE id = $1`,
    [row.id, planId && /^[0-9a-f-]{36}$/i.test(planId) ? planId : null, customer, stripeSubscription, session.id]);
  forgetSubscription(row.id);
  if (previousStripe && stripeSubscription && previousStripe !== stripeSubscription) after.push(async () => void (await stripeClient(ctx.config).subscriptions.cancel(previousStripe)));
}

function periodOf(sub: Stripe.Subscription): { start: Date | null; end: Date | null } {
  const item = sub.items?.data?.[0] as (Stripe.SubscriptionItem & { current_period_start?: number; current_period_end?: number }) | undefined;
  const legacy = sub as unknown as { current_period_start?: number; current_period_end?: number };
  const start = item?.current_period_start ?? legacy.current_period_start;
  const end = item?.current_period_end ?? legacy.current_period_end;
  return { start: start ? new Date(start * 1000) : null, end: end ? new Date(end * 1000) : null };
}

function localStatus(status: Stripe.Subscription.Status, current: SubscriptionRow['status']): SubscriptionRow['status'] {
  if (status === 'active' || status === 'trialing') return 'active';
  if (status === 'past_due' || status === 'unpaid') return 'past_due';
  if (status === 'canceled' || status === 'incomplete_expired') return 'canceled';
  return current;
}

/** Mirrors the Stripe subscription's status, price (→ plan), period and scheduled cancellation onto our row. */
async function applySubscription(client: pg.PoolClient, sub: Stripe.Subscription, deleted: boolean): Promise<void> {
  const row = await lockRow(client, 'stripe_subscription_id', sub.id);
  // Events about a Stripe subscription we already detached (paid → free downgrade) must not touch the row.
  if (!row) return;
  if (deleted) {
    await client.query(`UPDATE subscriptions SET status = 'canceled', canceled_at = coalesce(canceled_at, now()), updated_at = now() WHERE id = $1`, [row.id]);
    forgetSubscription(row.id);
    return;
  }
  const price = sub.items?.data?.[0]?.price;
  let planId: string | null = price?.metadata?.thence_plan ?? null;
  if (!planId && price?.id) planId = (await client.query<{ id: string }>(`SELECT id FROM plans WHERE stripe_price_id = $1`, [price.id])).rows[0]?.id ?? null;
  const period = periodOf(sub);
  const status = row.status === 'pending' ? 'pending' : localStatus(sub.status, row.status);
  await client.query(
    `UPDATE subscriptions SET status = $2, plan_id = coalesce($3::uuid, plan_id), cancel_at_period_end = $4,
        current_period_start = coalesce($5, current_period_start), current_period_end = coalesce($6, current_period_end),
        canceled_at = CASE WHEN $2 = 'canceled' THEN coalesce(canceled_at, now()) ELSE canceled_at END, updated_at = now()
      WHERE id = $1`,
    [row.id, status, planId && /^[0-9a-f-]{36}$/i.test(planId) ? planId : null, !!sub.cancel_at_period_end, period.start, period.end]);
  forgetSubscription(row.id);
}

function invoiceSubscription(invoice: Stripe.Invoice): { stripeId: string | null; ours: string | null } {
  const details = invoice.parent?.subscription_details;
  const raw = details?.subscription ?? (invoice as unknown as { subscription?: string | { id: string } }).subscription ?? null;
  return { stripeId: typeof raw === 'string' ? raw : raw?.id ?? null, ours: details?.metadata?.thence_subscription ?? null };
}

/** Books a paid or failed invoice (unique by Stripe id), updates the subscription, and queues the receipt or warning mail. */
async function applyInvoice(ctx: AppContext, client: pg.PoolClient, invoice: Stripe.Invoice, paid: boolean, after: AfterCommit[]): Promise<void> {
  const { stripeId, ours } = invoiceSubscription(invoice);
  let row = stripeId ? await lockRow(client, 'stripe_subscription_id', stripeId) : null;
  if (!row && ours && /^[0-9a-f-]{36}$/i.test(ours)) row = await lockRow(client, 'id', ours);
  if (!row) return;
  const amount = paid ? invoice.amount_paid : invoice.amount_due;
  const { fee, share } = splitAmount(amount, ctx.config.stripe.platformFeePercent);
  const line = invoice.lines?.data?.[0];
  const start = line?.period?.start ?? invoice.period_start;
  const end = line?.period?.end ?? invoice.period_end;
  const paidAt = invoice.status_transitions?.paid_at ?? null;
  await client.query(
    `INSERT INTO invoices (subscription_id, listing_id, stripe_invoice_id, status, amount_cents, currency, platform_fee_cents, publisher_share_cents, period_start, period_end, paid_at)
     VALUES ($1,$2,$3,$4,$5,$6,$7,$8,$9,$10,$11)
     ON CONFLICT (stripe_invoice_id) DO UPDATE SET status = excluded.status, amount_cents = excluded.amount_cents,
       platform_fee_cents = excluded.platform_fee_cents, publisher_share_cents = excluded.publisher_share_cents, paid_at = excluded.paid_at`,
    [row.id, row.listing_id, invoice.id, paid ? 'paid' : 'failed', amount, invoice.currency, fee, share, start ? new Date(start * 1000) : null, end ? new Date(end * 1000) : null, paid && paidAt ? new Date(paidAt * 1000) : paid ? new Date() : null]);
  if (row.status !== 'canceled' && row.status !== 'pending') {
    await client.query(
      `UPDATE subscriptions SET status = $2, current_period_start = coalesce($3, current_period_start), current_period_end = coalesce($4, current_period_end), updated_at = now() WHERE id = $1`,
      [row.id, paid ? 'active' : 'past_due', paid && start ? new Date(start * 1000) : null, paid && end ? new Date(end * 1000) : null]);
    forgetSubscription(row.id);
  } else if (row.status === 'pending' && paid && start && end) {
    await client.query(`UPDATE subscriptions SET current_period_start = $2, current_period_end = $3 WHERE id = $1`, [row.id, new Date(start * 1000), new Date(end * 1000)]);
  }
  const subscriptionRowId = row.id;
  after.push(() => invoiceMail(ctx, subscriptionRowId, { number: invoice.number ?? invoice.id, amount, currency: invoice.currency, paid, start, end }));
}

const money = (cents: number, currency: string) => `${(cents / 100).toFixed(2)} ${currency.toUpperCase()}`;
const day = (seconds: number | null | undefined) => (seconds ? new Date(seconds * 1000).toISOString().slice(0, 10) : '—');

async function invoiceMail(ctx: AppContext, subscriptionId: string, inv: { number: string; amount: number; currency: string; paid: boolean; start?: number | null; end?: number | null }): Promise<void> {
  const { rows } = await ctx.pool.query<{ email: string; name: string; title: string; plan: string }>(
    `SELECT u.email, u.name, l.title, p.name AS plan FROM subscriptions s JOIN users u ON u.id = s.subscriber_id JOIN listings l ON l.id = s.listing_id JOIN plans p ON p.id = s.plan_id WHERE s.id = $1`, [subscriptionId]);
  const r = rows[0];
  if (!r) return;
  const lines = inv.paid
    ? [`Thank you for your payment. Receipt ${inv.number}:`, `${r.title} — plan ${r.plan}`, `Amount paid: ${money(inv.amount, inv.currency)}`, `Period: ${day(inv.start)} to ${day(inv.end)}`]
    : [`We could not collect the payment for ${r.title} — plan ${r.plan} (invoice ${inv.number}, ${money(inv.amount, inv.currency)}).`, 'Your API keys keep working while the payment is retried. Please check your card.'];
  const subject = inv.paid ? `Receipt ${inv.number}: ${r.title}` : `Payment failed: ${r.title}`;
  const text = [`Hello ${r.name},`, '', ...lines, '', `Your subscriptions: ${ctx.config.publicUrl}/market/subscriptions`, '', '— Thence'].join('\n');
  const esc = (s: string) => s.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
  const html = [`<p>Hello ${esc(r.name)},</p>`, ...lines.map((l) => `<p>${esc(l)}</p>`), `<p><a href="${esc(ctx.config.publicUrl)}/market/subscriptions">Your subscriptions</a></p>`, '<p>— Thence</p>'].join('\n');
  await sendMail(ctx, { to: r.email, subject, text, html });
}

/**
 * The success page's check: asks Stripe for the session and applies it if complete, so the subscriber sees the result even
 * if the webhook is still on its way. Same effect as the webhook (both are idempotent on the row).
 */
export async function syncCheckout(ctx: AppContext, user: Express.User, sessionId: string): Promise<SubscriptionView | null> {
  let session: Stripe.Checkout.Session;
  try {
    session = await stripeClient(ctx.config).checkout.sessions.retrieve(sessionId);
  } catch {
    return null;
  }
  const ours = session.metadata?.thence_subscription;
  if (!ours || !/^[0-9a-f-]{36}$/i.test(ours)) return null;
  const owner = await ctx.pool.query<{ subscriber_id: string }>(`SELECT subscriber_id FROM subscriptions WHERE id = $1`, [ours]);
  if (owner.rows[0]?.subscriber_id !== user.id) throw forbidden('This checkout belongs to another account.');
  if (session.status === 'complete') {
    const client = await ctx.pool.connect();
    const after: AfterCommit[] = [];
    try {
      await client.query('BEGIN');
      await applyCheckoutCompleted(ctx, client, session, after);
      await client.query('COMMIT');
    } catch (error) {
      await client.query('ROLLBACK').catch(() => undefined);
      throw error;
    } finally {
      client.release();
    }
    for (const task of after) await task().catch(() => undefined);
  }
  const { rows } = await ctx.pool.query<SubscriptionRow>(`SELECT * FROM subscriptions WHERE id = $1`, [ours]);
  return rows[0] && isLive(rows[0].status) ? subscriptionView(ctx, rows[0]) : rows[0] ? subscriptionView(ctx, rows[0]) : null;
}
