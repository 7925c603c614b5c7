// The /api/v1 request pipeline, one small middleware per step: key → listing → rate limit → quota; metering on finish.
// Hot path: the key and the listing's published version come from short in-memory caches; the rate-limit store is one
// round trip; the quota reads the meter's in-memory totals (re-read from PostgreSQL every QUOTA_REFRESH_MS).
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/errors.js';
import { verifyCachedKey, verifyKey, type KeyCheck, type ResolvedKey } from '../services/apiKeys.js';
import { meterFor, monthStart } from '../services/metering.js';
import { publishedVersionBySlug, type PublishedVersion } from '../services/factStore.js';

export const VERSION_CACHE_MS = 2_000;

const unauthorized = (message: string) => new HttpError(401, message, 'unauthenticated', undefined, { 'WWW-Authenticate': 'Bearer realm="thence-api"' });

/** Bearer authentication (RFC 6750 §2.1); a valid key is put on res.locals.apiKey and its answer is metered. */
export function authenticateKey(ctx: AppContext): RequestHandler {
  const meter = meterFor(ctx);
  // One listener function for every response (no closure per request): it reads what admit() left on res.locals.
  function onFinish(this: Response): void {
    const locals = this.locals;
    if (locals.unmetered) return;
    const key = locals.apiKey as ResolvedKey;
    meter.record(key, this.statusCode, Number(process.hrtime.bigint() - (locals.started as bigint)) / 1e6);
  }
  const admit = (check: KeyCheck, res: Response, next: NextFunction, started: bigint) => {
    if (!check.ok) {
      if (check.reason === 'malformed') return next(unauthorized('This is not a Thence API key (expected thk_… as shown when the key was created).'));
      if (check.reason === 'unknown') return next(unauthorized('Unknown API key: check that it was copied whole, or create a new one.'));
      if (check.reason === 'revoked') return next(unauthorized('This API key was revoked; create a new one on the API keys page.'));
      return next(new HttpError(403, `The subscription of this key is ${check.key?.subscriptionStatus}; keys work only for active subscriptions.`, 'subscription_inactive'));
    }
    res.locals.apiKey = check.key;
    res.locals.started = started;
    res.on('finish', onFinish);
    next();
  };
  return (req: Request, res: Response, next: NextFunction) => {
    const started = process.hrtime.bigint();
    const header = req.headers.authorization;
    if (!header) return next(unauthorized('Send your API key in the Authorization header: "Authorization: Bearer <key>".'));
    if (!header.startsWith('Bearer ')) return next(unauthorized('The Authorization header must use the Bearer scheme: "Authorization: Bearer <key>".'));
    const presented = header.slice(7).trim();
    // A key seen within KEY_CACHE_MS is checked synchronously: no promise, no microtask turn on the hot path.
    const cached = verifyCachedKey(presented);
    if (cached) return admit(cached, res, next, started);
    verifyKey(ctx, presented).then((check) => admit(check, res, next, started), next);
  };
}

const versions = new Map<string, { at: number; version: PublishedVersion | null }>();

/** The listing's served version (cached briefly); 404 when absent, 403 when the key belongs to another listing. */
export function resolveListing(ctx: AppContext): RequestHandler {
  const decide = (slug: string, version: PublishedVersion | null, res: Response, next: NextFunction) => {
    const key = res.locals.apiKey as ResolvedKey;
    if (key.listingSlug !== slug && key.listingId !== version?.listingId) {
      // Refused before anything about the other listing is counted or revealed.
      res.locals.unmetered = true;
      return next(new HttpError(403, `This key belongs to a subscription on "${key.listingSlug}", not on "${slug}". Subscribe to that listing and use its key.`, 'wrong_listing'));
    }
    if (!version) return next(new HttpError(404, `The knowledge base "${slug}" has no published version to query right now.`, 'not_published'));
    res.locals.version = version;
    next();
  };
  return (req, res, next) => {
    const slug = req.params.slug as string;
    const entry = versions.get(slug);
    const now = Date.now();
    if (entry && now - entry.at <= VERSION_CACHE_MS) return decide(slug, entry.version, res, next);
    publishedVersionBySlug(ctx.pool, slug).then((version) => {
      versions.set(slug, { at: now, version });
      if (versions.size > 10_000) versions.delete(versions.keys().next().value!);
      decide(slug, version, res, next);
    }, next);
  };
}

/** Refuses with 429 once the subscription's answered requests this calendar month (UTC) reach the plan's quota. */
export function enforceQuota(ctx: AppContext): RequestHandler {
  const meter = meterFor(ctx);
  const decide = (used: number, res: Response, next: NextFunction) => {
    const key = res.locals.apiKey as ResolvedKey;
    if (used >= key.monthlyQuota) {
      const next1st = new Date(Date.UTC(monthStart().getUTCFullYear(), monthStart().getUTCMonth() + 1, 1));
      const retry = Math.max(1, Math.ceil((next1st.getTime() - Date.now()) / 1000));
      return next(new HttpError(429, `Monthly quota used up: the ${key.planName} plan includes ${key.monthlyQuota} requests a month and ${used} were answered. It resets on ${next1st.toISOString().slice(0, 10)} (UTC); a larger plan lifts it now.`, 'quota_exhausted', undefined, { 'Retry-After': String(retry) }));
    }
    next();
  };
  return (_req, res, next) => {
    const subscriptionId = (res.locals.apiKey as ResolvedKey).subscriptionId;
    // The month total is usually fresh in memory (read at most every QUOTA_REFRESH_MS): then no promise is made.
    const known = meter.usedThisMonthIfFresh(subscriptionId);
    if (known !== null) return decide(known, res, next);
    meter.usedThisMonth(subscriptionId).then((used) => decide(used, res, next), next);
  };
}
