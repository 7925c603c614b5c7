// Metering: every answered /api/v1 request is counted per key, listing, hour, status class and latency bucket.
// Counts are buffered in memory and written every FLUSH_MS with ONE statement (an UPSERT over unnest() arrays that also
// stamps the keys' last_used_at). Bound: a crash (SIGKILL, power loss) loses at most the requests answered in the last
// flush interval — plus those of a flush whose statement failed and had not been retried yet; a graceful stop flushes
// through onShutdown() so no served request is uncounted. The monthly quota reads the same counters (+ this process's
// unflushed ones): within one process it is exact; with several processes one may overshoot the quota by what the others
// answered in the last QUOTA_REFRESH_MS + FLUSH_MS (at most the plan's rate limit for that time).
import type { AppContext } from '../context.js';
import { onShutdown } from '../lifecycle.js';
import { LATENCY_BUCKETS_MS } from '../../shared/market.js';
import { sendMail } from './mail.js';

export const FLUSH_MS = 1_000;
/** How long a subscription's month total read from PostgreSQL is trusted before it is read again. */
export const QUOTA_REFRESH_MS = 2_000;

export interface MeterSubject { keyId: string; subscriptionId: string; listingId: string; monthlyQuota: number }

interface Cell { keyId: string; subscriptionId: string; listingId: string; hour: number; statusClass: number; bucket: number; n: number }

/** Start of the current calendar month, UTC: quotas reset then. */
export function monthStart(at: Date = new Date()): Date {
  return new Date(Date.UTC(at.getUTCFullYear(), at.getUTCMonth(), 1));
}

let month = { start: 0, end: 0 };

/** monthStart(new Date(now)).getTime(), kept until the month changes: the quota step asks on every request. */
export function monthStartMs(now: number = Date.now()): number {
  if (now < month.start || now >= month.end) {
    const start = monthStart(new Date(now));
    month = { start: start.getTime(), end: Date.UTC(start.getUTCFullYear(), start.getUTCMonth() + 1, 1) };
  }
  return month.start;
}

export function latencyBucket(ms: number): number {
  for (let i = 0; i < LATENCY_BUCKETS_MS.length; i++) if (ms <= LATENCY_BUCKETS_MS[i]) return i;
  return LATENCY_BUCKETS_MS.length;
}

export class Meter {
  private cells = new Map<string, Cell>();
  /** 2xx answers per subscription not yet in PostgreSQL: buffered, and in the flush now running. */
  private pendingOk = new Map<string, number>();
  private inflightOk = new Map<string, number>();
  private base = new Map<string, { month: number; used: number; at: number }>();
  private quotas = new Map<string, number>();
  private notified = new Set<string>();
  private chain: Promise<unknown> = Promise.resolve();
  private timer: NodeJS.Timeout | null = null;
  private stopped = false;
  private flushes = 0;

  constructor(private readonly ctx: AppContext, private readonly flushMs = FLUSH_MS) {}

  start(): this {
    if (!this.timer && !this.stopped) {
      this.timer = setInterval(() => void this.flush().catch((error) => console.error('metering flush failed (will retry):', (error as Error).message)), this.flushMs);
      this.timer.unref();
    }
    return this;
  }

  /** Counts one answered request. Synchronous and allocation-light: the hot path calls it on every response. */
  record(subject: MeterSubject, status: number, latencyMs: number, at = Date.now()): void {
    const hour = at - (at % 3_600_000);
    const statusClass = Math.min(5, Math.max(2, Math.floor(status / 100)));
    const bucket = latencyBucket(latencyMs);
    const id = `${subject.keyId}|${subject.listingId}|${hour}|${statusClass}|${bucket}`;
    const cell = this.cells.get(id);
    if (cell) cell.n++;
    else this.cells.set(id, { keyId: subject.keyId, subscriptionId: subject.subscriptionId, listingId: subject.listingId, hour, statusClass, bucket, n: 1 });
    if (statusClass === 2) this.pendingOk.set(subject.subscriptionId, (this.pendingOk.get(subject.subscriptionId) ?? 0) + 1);
    this.quotas.set(subject.subscriptionId, subject.monthlyQuota);
  }

  /** What usedThisMonth would answer when it needs no read (the total read within QUOTA_REFRESH_MS this month), else null. */
  usedThisMonthIfFresh(subscriptionId: string): number | null {
    const base = this.base.get(subscriptionId);
    const now = Date.now();
    if (!base || base.month !== monthStartMs(now) || now - base.at > QUOTA_REFRESH_MS) return null;
    return base.used + (this.inflightOk.get(subscriptionId) ?? 0) + (this.pendingOk.get(subscriptionId) ?? 0);
  }

  /** 2xx answers of the subscription this calendar month, across all processes (as of the last read) plus this one's unflushed. */
  async usedThisMonth(subscriptionId: string): Promise<number> {
    const month = monthStart().getTime();
    let base = this.base.get(subscriptionId);
    if (!base || base.month !== month || Date.now() - base.at > QUOTA_REFRESH_MS) {
      // Serialised with flushes so a read never counts a flush twice or misses one.
      base = await this.serial(async () => {
        const { rows } = await this.ctx.pool.query<{ n: string | null }>(
          `SELECT sum(count) AS n FROM usage_counters WHERE subscription_id = $1 AND hour >= $2 AND status_class = 2`, [subscriptionId, new Date(month)]);
        const fresh = { month, used: Number(rows[0].n ?? 0), at: Date.now() };
        this.base.set(subscriptionId, fresh);
        return fresh;
      });
    }
    return base.used + (this.inflightOk.get(subscriptionId) ?? 0) + (this.pendingOk.get(subscriptionId) ?? 0);
  }

  /** Writes the buffered counts in one statement. On failure they go back into the buffer for the next flush. */
  flush(): Promise<void> {
    return this.serial(() => this.flushNow());
  }

  private async flushNow(): Promise<void> {
    if (this.cells.size === 0) return;
    const cells = [...this.cells.values()];
    this.cells = new Map();
    this.inflightOk = this.pendingOk;
    this.pendingOk = new Map();
    const lastUsed = new Map<string, number>();
    for (const c of cells) lastUsed.set(c.keyId, Math.max(lastUsed.get(c.keyId) ?? 0, c.hour));
    try {
      await this.ctx.pool.query(
        `WITH counted AS (
           INSERT INTO usage_counters (api_key_id, subscription_id, listing_id, hour, status_class, latency_bucket, count)
           SELECT * FROM unnest($1::uuid[], $2::uuid[], $3::uuid[], $4::timestamptz[], $5::smallint[], $6::smallint[], $7::bigint[])
           ON CONFLICT (api_key_id, hour, status_class, latency_bucket, listing_id) DO UPDATE SET count = usage_counters.count + excluded.count
           RETURNING 1
         )
         UPDATE api_keys SET last_used_at = greatest(last_used_at, now()) WHERE id = ANY($8::uuid[])`,
        [cells.map((c) => c.keyId), cells.map((c) => c.subscriptionId), cells.map((c) => c.listingId), cells.map((c) => new Date(c.hour)),
          cells.map((c) => c.statusClass), cells.map((c) => c.bucket), cells.map((c) => c.n), [...lastUsed.keys()]]);
    } catch (error) {
      for (const c of cells) {
        const id = `${c.keyId}|${c.listingId}|${c.hour}|${c.statusClass}|${c.bucket}`;
        const cell = this.cells.get(id);
        if (cell) cell.n += c.n;
        else this.cells.set(id, c);
      }
      for (const [sub, n] of this.inflightOk) this.pendingOk.set(sub, (this.pendingOk.get(sub) ?? 0) + n);
      this.inflightOk = new Map();
      throw error;
    }
    const flushed = this.inflightOk;
    this.inflightOk = new Map();
    for (const [sub, n] of flushed) {
      const base = this.base.get(sub);
      if (base) base.used += n;
    }
    if (++this.flushes % 60 === 0) await this.ctx.pool.query(`DELETE FROM rate_limit_buckets WHERE reset_at < now() - interval '5 minutes'`).catch(() => undefined);
    await this.notifyQuotas([...flushed.keys()]);
  }

  /** Mails the subscriber once per month at 80 % and at 100 % of the quota (quota_notices makes it once across processes). */
  private async notifyQuotas(subscriptions: string[]): Promise<void> {
    const month = monthStart();
    for (const sub of subscriptions) {
      const limit = this.quotas.get(sub);
      const used = this.base.get(sub)?.used;
      if (!limit || used === undefined) continue;
      const reached = ([80, 100] as const).filter((t) => used >= (limit * t) / 100 && !this.notified.has(`${sub}|${month.getTime()}|${t}`));
      let highest: 80 | 100 | null = null;
      for (const threshold of reached) {
        this.notified.add(`${sub}|${month.getTime()}|${threshold}`);
        const { rowCount } = await this.ctx.pool.query(`INSERT INTO quota_notices (subscription_id, month, threshold) VALUES ($1, $2, $3) ON CONFLICT DO NOTHING`, [sub, month, threshold]);
        if (rowCount) highest = threshold;
      }
      // One mail per flush: jumping past both thresholds at once sends only the 100 % notice.
      if (highest) await this.quotaMail(sub, highest, used, limit).catch((error) => console.error('quota mail failed:', (error as Error).message));
    }
  }

  private async quotaMail(subscriptionId: string, threshold: 80 | 100, used: number, limit: number): Promise<void> {
    const { rows } = await this.ctx.pool.query<{ email: string; name: string; title: string; plan: string }>(
      `SELECT u.email, u.name, l.title, p.name AS plan FROM subscriptions s JOIN users u ON u.id = s.subscriber_id JOIN listings l ON l.id = s.listing_id JOIN plans p ON p.id = s.plan_id WHERE s.id = $1`, [subscriptionId]);
    const r = rows[0];
    if (!r) return;
    const head = threshold === 100
      ? `You have used your whole monthly quota of ${limit.toLocaleString('en')} requests for ${r.title} (plan ${r.plan}). Further queries are refused until the 1st of next month (UTC) unless you change to a larger plan.`
      : `You have used ${used.toLocaleString('en')} of your ${limit.toLocaleString('en')} monthly requests (${threshold} %) for ${r.title} (plan ${r.plan}).`;
    const link = `${this.ctx.config.publicUrl}/market/usage`;
    await sendMail(this.ctx, {
      to: r.email,
      subject: threshold === 100 ? `Quota used up: ${r.title}` : `${threshold} % of your quota used: ${r.title}`,
      text: `Hello ${r.name},\n\n${head}\n\nYour usage: ${link}\n\n— Thence`,
      html: `<p>Hello ${r.name.replace(/[&<>"']/g, '')},</p><p>${head}</p><p><a href="${link}">Your usage</a></p><p>— Thence</p>`,
    });
  }

  private serial<T>(task: () => Promise<T>): Promise<T> {
    const run = this.chain.then(task, task);
    this.chain = run.catch(() => undefined);
    return run;
  }

  /** Stops the timer and writes what is buffered (graceful shutdown). */
  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
    await this.flush();
  }
}

const meters = new WeakMap<AppContext, Meter>();

/** The context's meter, started on first use; its final flush runs on graceful shutdown. */
export function meterFor(ctx: AppContext): Meter {
  let meter = meters.get(ctx);
  if (!meter) {
    meter = new Meter(ctx).start();
    meters.set(ctx, meter);
    const m = meter;
    onShutdown(() => m.stop());
  }
  return meter;
}

/** Stops and flushes a context's meter (tests close contexts without running the process's shutdown hooks). */
export async function stopMeter(ctx: AppContext): Promise<void> {
  await meters.get(ctx)?.stop();
  meters.delete(ctx);
}
