// Per-key rate limiting for /api/v1 with express-rate-limit and a PostgreSQL-backed Store, so the limit holds across
// several server processes. Fixed windows of one minute per key; one round trip per request (an UPSERT that either
// starts a new window or counts into the current one and returns the count and the window's end).
// Headers: IETF draft-8 `RateLimit-Policy` / `RateLimit` (draft-ietf-httpapi-ratelimit-headers-08) and `Retry-After` on 429.
import { rateLimit, type Options, type Store, type ClientRateLimitInfo } from 'express-rate-limit';
import type { RequestHandler } from 'express';
import type pg from 'pg';
import { HttpError } from '../http/errors.js';
import type { ResolvedKey } from './apiKeys.js';

export const WINDOW_MS = 60_000;

const INCREMENT_SQL = `INSERT INTO rate_limit_buckets AS b (key, hits, reset_at) VALUES ($1, 1, now() + $2 * interval '1 millisecond')
  ON CONFLICT (key) DO UPDATE SET
    hits = CASE WHEN b.reset_at <= now() THEN 1 ELSE b.hits + 1 END,
    reset_at = CASE WHEN b.reset_at <= now() THEN excluded.reset_at ELSE b.reset_at END
  RETURNING hits, reset_at`;

export class PostgresRateLimitStore implements Store {
  windowMs = WINDOW_MS;
  readonly localKeys = false;
  readonly prefix: string;

  constructor(private readonly pool: pg.Pool, prefix = 'v1:') {
    this.prefix = prefix;
  }

  init(options: Options): void {
    this.windowMs = options.windowMs;
  }

  async increment(key: string): Promise<ClientRateLimitInfo> {
    // A named statement: PostgreSQL parses and plans it once per connection, not on every request.
    const { rows } = await this.pool.query<{ hits: number; reset_at: Date }>({ name: 'thence-rate-limit-increment', text: INCREMENT_SQL, values: [this.prefix + key, this.windowMs] });
    return { totalHits: rows[0].hits, resetTime: rows[0].reset_at };
  }

  async get(key: string): Promise<ClientRateLimitInfo | undefined> {
    const { rows } = await this.pool.query<{ hits: number; reset_at: Date }>(`SELECT hits, reset_at FROM rate_limit_buckets WHERE key = $1 AND reset_at > now()`, [this.prefix + key]);
    return rows[0] ? { totalHits: rows[0].hits, resetTime: rows[0].reset_at } : undefined;
  }

  async decrement(key: string): Promise<void> {
    await this.pool.query(`UPDATE rate_limit_buckets SET hits = greatest(0, hits - 1) WHERE key = $1`, [this.prefix + key]);
  }

  async resetKey(key: string): Promise<void> {
    await this.pool.query(`DELETE FROM rate_limit_buckets WHERE key = $1`, [this.prefix + key]);
  }
}

/** The limiter for key-authenticated requests: reads the resolved key (res.locals.apiKey) for its identity and plan limit. */
export function apiRateLimiter(pool: pg.Pool): RequestHandler {
  return rateLimit({
    windowMs: WINDOW_MS,
    limit: (_req, res) => (res.locals.apiKey as ResolvedKey).ratePerMinute,
    keyGenerator: (_req, res) => (res.locals.apiKey as ResolvedKey).keyId,
    identifier: (_req, res) => `per-key-${(res.locals.apiKey as ResolvedKey).ratePerMinute}-per-minute`,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    store: new PostgresRateLimitStore(pool),
    // The store is shared by design; the IP-based checks do not apply to a key-based limiter.
    validate: { ip: false, trustProxy: false, xForwardedForHeader: false, singleCount: true },
    handler: (_req, res, next) => {
      const key = res.locals.apiKey as ResolvedKey;
      next(new HttpError(429, `Rate limit reached: the ${key.planName} plan allows ${key.ratePerMinute} requests a minute per key. Retry after ${res.getHeader('Retry-After')} s.`, 'rate_limited'));
    },
  });
}
