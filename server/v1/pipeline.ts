// The /api/v1 request pipeline, one small middleware per step: key → listing → rate limit → quota; metering on finish.
// Hot path: the key and the listing's published version come from short in-memory caches; the rate-limit store is one
// round trip; the quota reads the meter's in-memory totals (re-read from PostgreSQL every QUOTA_REFRESH_MS).
import type { NextFunction, Request, RequestHandler, Response } from 'express';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/errors.js';
import { verifyKey, type ResolvedKey } from '../services/apiKeys.js';
import { meterFor, monthStart } from '../services/metering.js';
import { publishedVersionBySlug, type PublishedVersion } from '../services/factStore.js';

export const VERSION_CACHE_MS = 2_000;

const unauthorized = (message: string) => new HttpError(401, message, 'unauthenticated', undefined, { 'WWW-Authenticate': 'Bearer realm="thence-api"' });

/** Bearer authentication (RFC 6750 §2.1); a valid key is put on res.locals.apiKey and its answer is metered. */
export function authenticateKey(ctx: AppContext): RequestHandler {
  const meter = meterFor(ctx);
  return async (req: Request, res: Response, next: NextFunction) => {
    const started = process.hrtime.bigint();
    const header = req.headers.authorization;
    if (!header) return next(unauthorized('Send your API key in the Authorization header: "Authorization: Bearer <key>".'));
    if (!header.startsWith('Bearer ')) return next(unauthorized('The Authorization header must use the Bearer scheme: "Authorization: Bearer <key>".'));
    let check;
    try {
      check = await verifyKey(ctx, header.slice(7).trim());
    } catch (error) {
      return next(error);
    }
    if (!check.ok) {
      if (check.reason === 'malformed') return next(unauthorized('This is not a Thence API key (expected thk_… as shown when the key was created).'));
      if (check.reason === 'unknown') return next(unauthorized('Unknown API key: check that it was copied whole, or create a new one.'));
      if (check.reason === 'revoked') return next(unauthorized('This API key was revoked; create a new one on the API keys page.'));
      return next(new HttpError(403, `The subscription of this key is ${check.key?.subscriptionStatus}; keys work only for active subscriptions.`, 'subscription_inactive'));
    }
    const key = check.key;
    res.locals.apiKey = key;
    res.on('finish', () => {
      if (res.locals.unmetered) return;
      const ms = Number(process.hrtime.bigint() - started) / 1e6;
      meter.record({ keyId: key.keyId, subscriptionId: key.subscriptionId, listingId: key.listingId, monthlyQuota: key.monthlyQuota }, res.statusCode, ms);
    });
    next();
  };
}

const versions = new Map<string, { at: number; version: PublishedVersion | null }>();

/** The listing's served version (cached briefly); 404 when absent, 403 when the key belongs to another listing. */
export function resolveListing(ctx: AppContext): RequestHandler {
  return async (req, res, next) => {
    const slug = req.params.slug as string;
    const key = res.locals.apiKey as ResolvedKey;
    let entry = versions.get(slug);
    const now = Date.now();
    if (!entry || now - entry.at > VERSION_CACHE_MS) {
      try {
        entry = { at: now, version: await publishedVersionBySlug(ctx.pool, slug) };
      } catch (error) {
        return next(error);
      }
      versions.set(slug, entry);
      if (versions.size > 10_000) versions.delete(versions.keys().next().value!);
    }
    if (key.listingSlug !== slug && key.listingId !== entry.version?.listingId) {
      // Refused before anything about the other listing is counted or revealed.
      res.locals.unmetered = true;
      return next(new HttpError(403, `This key belongs to a subscription on "${key.listingSlug}", not on "${slug}". Subscribe to that listing and use its key.`, 'wrong_listing'));
    }
    if (!entry.version) return next(new HttpError(404, `The knowledge base "${slug}" has no published version to query right now.`, 'not_published'));
    res.locals.version = entry.version;
    next();
  };
}

/** Refuses with 429 once the subscription's answered requests this calendar month (UTC) reach the plan's quota. */
export function enforceQuota(ctx: AppContext): RequestHandler {
  const meter = meterFor(ctx);
  return async (_req, res, next) => {
    const key = res.locals.apiKey as ResolvedKey;
    let used: number;
    try {
      used = await meter.usedThisMonth(key.subscriptionId);
    } catch (error) {
      return next(error);
    }
    if (used >= key.monthlyQuota) {
      const next1st = new Date(Date.UTC(monthStart().getUTCFullYear(), monthStart().getUTCMonth() + 1, 1));
      const retry = Math.max(1, Math.ceil((next1st.getTime() - Date.now()) / 1000));
      return next(new HttpError(429, `Monthly quota used up: the ${key.planName} plan includes ${key.monthlyQuota} requests a month and ${used} were answered. It resets on ${next1st.toISOString().slice(0, 10)} (UTC); a larger plan lifts it now.`, 'quota_exhausted', undefined, { 'Retry-After': String(retry) }));
    }
    next();
  };
}
