// Per-key rate limiting for /api/v1 with express-rate-limit and a PostgreSQL-backed Store, so the limit holds across
// several server processes. Fixed windows of one minute per key, counted by one UPSERT that either starts a new window
// or counts into the current one and returns the count and the window's end.
//
// Leases: for larger limits a process reserves a small batch of hit numbers per round trip (LEASE_SHARE of the limit,
// at most MAX_LEASE) and hands them out locally; with a limit under 1/LEASE_SHARE every request is one round trip.
// Each admitted request still holds a distinct number ≤ limit across all processes, so admissions never exceed the
// limit; the price is that numbers reserved but unused by one process are lost to the others, so with P processes a
// key may be refused up to (P − 1) × (lease − 1) requests early in a window.
// Headers: IETF draft-8 `RateLimit-Policy` / `RateLimit` (draft-ietf-httpapi-ratelimit-headers-08) and `Retry-After` on 429.
import { rateLimit, type Options, type Store, type ClientRateLimitInfo } from 'express-rate-limit';
import type { RequestHandler } from 'express';
import type pg from 'pg';
import { HttpError } from '../http/errors.js';
import type { ResolvedKey } from './apiKeys.js';

export const WINDOW_MS = 60_000;
export const LEASE_SHARE = 0.01;
export const MAX_LEASE = 500;

const INCREMENT_SQL = `INSERT INTO rate_limit_buckets AS b (key, hits, reset_at) VALUES ($1, $3, now() + $2 * interval '1 millisecond')
  ON CONFLICT (key) DO UPDATE SET
    hits = CASE WHEN b.reset_at <= now() THEN $3 ELSE b.hits + $3 END,
    reset_at = CASE WHEN b.reset_at <= now() THEN excluded.reset_at ELSE b.reset_at END
  RETURNING hits, reset_at`;

/** How many hit numbers one round trip reserves for a key with this per-window limit. */
export function leaseSize(limit: number | undefined): number {
  if (!limit || !Number.isFinite(limit)) return 1;
  return Math.max(1, Math.min(MAX_LEASE, Math.floor(limit * LEASE_SHARE)));
}

/** resetTime is one Date per lease, handed to every request it admits (express-rate-limit only reads it). */
interface Lease { next: number; end: number; resetAt: number; resetTime: Date; claiming: Promise<void> | null }

export class PostgresRateLimitStore implements Store {
  windowMs = WINDOW_MS;
  readonly localKeys = false;
  readonly prefix: string;
  private readonly leases = new Map<string, Lease>();

  /** `limitFor` tells the store a key's current limit (to size its leases); unknown keys count one by one. */
  constructor(private readonly pool: pg.Pool, private readonly limitFor: (key: string) => number | undefined = () => undefined, prefix = 'v1:') {
    this.prefix = prefix;
  }

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  private async claim(key: string, count: number): Promise<{ hits: number; resetAt: number }> {
    // A named statement: PostgreSQL parses and plans it once per connection, not on every request.
    const { rows } = await this.pool.query<{ hits: number; reset_at: Date }>({ name: 'thence-rate-limit-claim', text: INCREMENT_SQL, values: [this.prefix + key, this.windowMs, count] });
    return { hits: rows[0].hits, resetAt: rows[0].reset_at.getTime() };
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    const batch = leaseSize(this.limitFor(key));
    if (batch === 1) {
      const { hits, resetAt } = await this.claim(key, 1);
      return { totalHits: hits, resetTime: new Date(resetAt) };
    }
    for (;;) {
      const lease = this.leases.get(key);
      if (lease && lease.next <= lease.end && lease.resetAt > Date.now()) return { totalHits: lease.next++, resetTime: lease.resetTime };
      if (lease?.claiming) {
        await lease.claiming;
        continue;
      }
      const holder: Lease = lease ?? { next: 1, end: 0, resetAt: 0, resetTime: new Date(0), claiming: null };
      holder.claiming = this.claim(key, batch).then(
        ({ hits, resetAt }) => {
          this.leases.set(key, { next: hits - batch + 1, end: hits, resetAt, resetTime: new Date(resetAt), claiming: null });
        },
        (error) => {
          holder.claiming = null;
          throw error;
        },
      );
      this.leases.set(key, holder);
      await holder.claiming;
      if (this.leases.size > 10_000) this.prune();
    }
  }

  private prune(): void {
    const now = Date.now();
    for (const [key, lease] of this.leases) if (!lease.claiming && lease.resetAt <= now) this.leases.delete(key);
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const { rows } = await this.pool.query<{ hits: number; reset_at: Date }>(`SELECT hits, reset_at FROM rate_limit_buckets WHERE key = $1 AND reset_at > now()`, [this.prefix + key]);
    return rows[0] ? { totalHits: rows[0].hits, resetTime: rows[0].reset_at } : undefined;
  }

  async decrement(key: string): Promise<void> {
    await this.pool.query(`UPDATE rate_limit_buckets SET hits = greatest(0, hits - 1) WHERE key = $1`, [this.prefix + key]);
  }

  async resetKey(key: string): Promise<void> {
    this.leases.delete(key);
    await this.pool.query(`DELETE FROM rate_limit_buckets WHERE key = $1`, [this.prefix + key]);
  }
}

/** The limiter for key-authenticated requests: reads the resolved key (res.locals.apiKey) for its identity and plan limit. */
export function apiRateLimiter(pool: pg.Pool): RequestHandler {
  // The plan limit of each key seen recently, for the store's lease size (set by keyGenerator, read by increment).
  const limits = new Map<string, number>();
  const names = new Map<number, string>();
  return rateLimit({
    windowMs: WINDOW_MS,
    limit: (_req, res) => (res.locals.apiKey as ResolvedKey).ratePerMinute,
    keyGenerator: (_req, res) => {
      const key = res.locals.apiKey as ResolvedKey;
      if (limits.get(key.keyId) !== key.ratePerMinute) {
        if (limits.size > 50_000) limits.clear();
        limits.set(key.keyId, key.ratePerMinute);
      }
      return key.keyId;
    },
    identifier: (_req, res) => {
      const rate = (res.locals.apiKey as ResolvedKey).ratePerMinute;
      let name = names.get(rate);
      if (name === undefined) {
        if (names.size > 1_000) names.clear();
        names.set(rate, (name = `per-key-${rate}-per-minute`));
      }
      return name;
    },
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    store: new PostgresRateLimitStore(pool, (key) => limits.get(key)),
    // The store is shared by design; the IP-based checks do not apply to a key-based limiter.
    validate: { ip: false, trustProxy: false, xForwardedForHeader: false, singleCount: true },
    handler: (_req, res, next) => {
      const key = res.locals.apiKey as ResolvedKey;
      next(new HttpError(429, `Rate limit reached: the ${key.planName} plan allows ${key.ratePerMinute} requests a minute per key. Retry after ${res.getHeader('Retry-After')} s.`, 'rate_limited'));
    },
  });
}
