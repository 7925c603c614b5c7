// Usage and revenue reports from the metered counters and the booked invoices: the subscriber's (per key and day, quota
// left), the publisher's (per listing, day and subscriber; revenue per listing and month), and the admin's (everything).
import type { AppContext } from '../context.js';
import type { PublisherUsage, RevenueRow, SubscriberUsage, UsageRow } from '../../shared/market.js';
import { meterFor, monthStart } from './metering.js';

export interface UsageRange { from: Date; to: Date }

/** The last `days` days up to now (UTC day boundaries), bounded to at most a year. */
export function rangeOf(query: { days?: unknown }): UsageRange {
  const days = Math.min(366, Math.max(1, Number.isInteger(Number(query.days)) ? Number(query.days) : 30));
  const to = new Date();
  const from = new Date(Date.UTC(to.getUTCFullYear(), to.getUTCMonth(), to.getUTCDate() - days + 1));
  return { from, to };
}

interface Raw { day: Date; key_id: string | null; key_name: string | null; key_prefix: string | null; slug: string; email?: string; ok: string; client: string; server: string }

const toRow = (r: Raw, withSubscriber: boolean): UsageRow => ({
  day: r.day.toISOString().slice(0, 10), keyId: r.key_id, keyName: r.key_name, keyPrefix: r.key_prefix, listingSlug: r.slug,
  ...(withSubscriber ? { subscriberEmail: r.email } : {}),
  ok: Number(r.ok), clientErrors: Number(r.client), serverErrors: Number(r.server), total: Number(r.ok) + Number(r.client) + Number(r.server),
});

const SUMS = `sum(c.count) FILTER (WHERE c.status_class IN (2,3)) AS ok, sum(c.count) FILTER (WHERE c.status_class = 4) AS client, sum(c.count) FILTER (WHERE c.status_class = 5) AS server`;

export async function subscriberUsage(ctx: AppContext, userId: string, range: UsageRange): Promise<SubscriberUsage> {
  await meterFor(ctx).flush().catch(() => undefined);
  const { rows } = await ctx.pool.query<Raw>(
    `SELECT date_trunc('day', c.hour AT TIME ZONE 'UTC') AS day, k.id AS key_id, k.name AS key_name, k.prefix AS key_prefix, l.slug, ${SUMS}
       FROM usage_counters c JOIN api_keys k ON k.id = c.api_key_id JOIN subscriptions s ON s.id = c.subscription_id JOIN listings l ON l.id = c.listing_id
      WHERE s.subscriber_id = $1 AND c.hour >= $2 AND c.hour <= $3
      GROUP BY 1, k.id, k.name, k.prefix, l.slug ORDER BY 1, l.slug, k.name`, [userId, range.from, range.to]);
  const subs = await ctx.pool.query<{ id: string; slug: string; plan: string; quota: number }>(
    `SELECT s.id, l.slug, p.name AS plan, p.monthly_quota AS quota FROM subscriptions s JOIN listings l ON l.id = s.listing_id JOIN plans p ON p.id = s.plan_id
      WHERE s.subscriber_id = $1 AND s.status IN ('active','past_due') ORDER BY l.slug`, [userId]);
  const month = monthStart().toISOString().slice(0, 7);
  const quotas = await Promise.all(subs.rows.map(async (s) => ({ subscriptionId: s.id, listingSlug: s.slug, planName: s.plan, used: await meterFor(ctx).usedThisMonth(s.id), limit: s.quota, month })));
  return { rows: rows.map((r) => toRow(r, false)), quotas };
}

/** Per listing, day and subscriber; `publisherId` null means every listing (admin). */
export async function publisherUsage(ctx: AppContext, publisherId: string | null, range: UsageRange): Promise<PublisherUsage> {
  await meterFor(ctx).flush().catch(() => undefined);
  const params: unknown[] = [range.from, range.to];
  const own = publisherId ? `AND l.publisher_id = $3` : '';
  if (publisherId) params.push(publisherId);
  const { rows } = await ctx.pool.query<Raw>(
    `SELECT date_trunc('day', c.hour AT TIME ZONE 'UTC') AS day, NULL AS key_id, NULL AS key_name, NULL AS key_prefix, l.slug, u.email, ${SUMS}
       FROM usage_counters c JOIN subscriptions s ON s.id = c.subscription_id JOIN users u ON u.id = s.subscriber_id JOIN listings l ON l.id = c.listing_id
      WHERE c.hour >= $1 AND c.hour <= $2 ${own}
      GROUP BY 1, l.slug, u.email ORDER BY 1, l.slug, u.email`, params);
  const revenue = await ctx.pool.query<{ slug: string; month: Date; currency: string; n: string; amount: string; fee: string; share: string }>(
    `SELECT l.slug, date_trunc('month', coalesce(i.paid_at, i.created_at) AT TIME ZONE 'UTC') AS month, i.currency, count(*) AS n,
            sum(i.amount_cents) AS amount, sum(i.platform_fee_cents) AS fee, sum(i.publisher_share_cents) AS share
       FROM invoices i JOIN listings l ON l.id = i.listing_id
      WHERE i.status = 'paid' ${publisherId ? 'AND l.publisher_id = $1' : ''}
      GROUP BY 1, 2, 3 ORDER BY 2 DESC, 1`, publisherId ? [publisherId] : []);
  const revenueRows: RevenueRow[] = revenue.rows.map((r) => ({
    listingSlug: r.slug, month: r.month.toISOString().slice(0, 7), currency: r.currency, invoices: Number(r.n),
    amountCents: Number(r.amount), platformFeeCents: Number(r.fee), publisherShareCents: Number(r.share),
  }));
  return { rows: rows.map((r) => toRow(r, true)), revenue: revenueRows };
}

/** RFC 4180 CSV: fields with a comma, quote or line break are quoted, quotes doubled; CRLF line ends. */
export function toCsv(header: string[], rows: (string | number | null | undefined)[][]): string {
  const field = (v: string | number | null | undefined) => {
    const s = v === null || v === undefined ? '' : String(v);
    // A leading =, +, - or @ would be run as a formula by spreadsheets (OWASP "CSV injection"); prefix a quote.
    const safe = /^[=+\-@]/.test(s) && typeof v === 'string' ? `'${s}` : s;
    return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
  };
  return [header, ...rows].map((r) => r.map(field).join(',')).join('\r\n') + '\r\n';
}

export function publisherUsageCsv(usage: PublisherUsage): string {
  return toCsv(['day', 'listing', 'subscriber', 'answered', 'client_errors', 'server_errors', 'total'], usage.rows.map((r) => [r.day, r.listingSlug, r.subscriberEmail ?? '', r.ok, r.clientErrors, r.serverErrors, r.total]));
}
