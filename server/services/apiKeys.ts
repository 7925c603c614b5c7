// API keys: `thk_<12 lookup characters>_<secret>`. The prefix finds the row; only the SHA-256 of the whole key is stored,
// so a key is shown once, at creation. The hot path keeps resolved keys in memory for a few seconds (KEY_CACHE_MS):
// a revocation or plan change is seen at once by this process and within that time by the others.
import crypto from 'node:crypto';
import type { AppContext } from '../context.js';
import { conflict, notFound } from '../http/errors.js';
import type { ApiKeyView, CreatedApiKey } from '../../shared/market.js';
import { isLive, ownedSubscription } from './subscriptions.js';

export const KEY_CACHE_MS = 5_000;
const PREFIX_ALPHABET = 'abcdefghijkmnpqrstuvwxyz23456789';
const KEY_SHAPE = /^(thk_[a-z2-9]{12})_([A-Za-z0-9_-]{32})$/;

/** What a request learns about its key: enough to rate-limit, check the quota and meter without another query. */
export interface ResolvedKey {
  keyId: string;
  prefix: string;
  secretSha256: Buffer;
  revoked: boolean;
  subscriptionId: string;
  subscriptionStatus: string;
  subscriberId: string;
  listingId: string;
  listingSlug: string;
  planName: string;
  monthlyQuota: number;
  ratePerMinute: number;
}

interface KeyRow { id: string; subscription_id: string; name: string; prefix: string; created_at: Date; last_used_at: Date | null; revoked_at: Date | null; slug: string }

function toView(row: KeyRow): ApiKeyView {
  return {
    id: row.id, subscriptionId: row.subscription_id, listingSlug: row.slug, name: row.name, prefix: row.prefix,
    createdAt: row.created_at.toISOString(), lastUsedAt: row.last_used_at?.toISOString() ?? null, revokedAt: row.revoked_at?.toISOString() ?? null,
  };
}

const sha256 = (text: string) => crypto.createHash('sha256').update(text).digest();

function randomPrefix(): string {
  let out = '';
  for (const b of crypto.randomBytes(12)) out += PREFIX_ALPHABET[b % PREFIX_ALPHABET.length];
  return `thk_${out}`;
}

export async function createKey(ctx: AppContext, userId: string, subscriptionId: string, name: string): Promise<CreatedApiKey> {
  const sub = await ownedSubscription(ctx, userId, subscriptionId);
  if (!isLive(sub.status)) throw conflict(`Keys can only be created for a live subscription; this one is ${sub.status}.`);
  const count = await ctx.pool.query<{ n: number }>(`SELECT count(*)::int AS n FROM api_keys WHERE subscription_id = $1 AND revoked_at IS NULL`, [sub.id]);
  if (count.rows[0].n >= 20) throw conflict('A subscription can hold at most 20 active keys; revoke one first.');
  const prefix = randomPrefix();
  const secret = `${prefix}_${crypto.randomBytes(24).toString('base64url')}`;
  const { rows } = await ctx.pool.query<KeyRow>(
    `INSERT INTO api_keys (subscription_id, name, prefix, secret_sha256) VALUES ($1,$2,$3,$4)
     RETURNING *, (SELECT slug FROM listings WHERE id = $5) AS slug`,
    [sub.id, name, prefix, sha256(secret).toString('hex'), sub.listing_id]);
  return { ...toView(rows[0]), secret };
}

export async function listKeys(ctx: AppContext, userId: string): Promise<ApiKeyView[]> {
  const { rows } = await ctx.pool.query<KeyRow>(
    `SELECT k.*, l.slug FROM api_keys k JOIN subscriptions s ON s.id = k.subscription_id JOIN listings l ON l.id = s.listing_id
      WHERE s.subscriber_id = $1 ORDER BY k.revoked_at NULLS FIRST, k.created_at DESC`, [userId]);
  return rows.map(toView);
}

export async function revokeKey(ctx: AppContext, userId: string, keyId: string): Promise<ApiKeyView> {
  if (!/^[0-9a-f-]{36}$/i.test(keyId)) throw notFound('No such key.');
  const { rows } = await ctx.pool.query<KeyRow>(
    `UPDATE api_keys k SET revoked_at = coalesce(k.revoked_at, now()) FROM subscriptions s, listings l
      WHERE k.id = $1 AND s.id = k.subscription_id AND s.subscriber_id = $2 AND l.id = s.listing_id RETURNING k.*, l.slug`, [keyId, userId]);
  if (!rows[0]) throw notFound('No such key.');
  cache.delete(rows[0].prefix);
  return toView(rows[0]);
}

interface CacheEntry { at: number; key: ResolvedKey | null }
const cache = new Map<string, CacheEntry>();

/**
 * The verdicts of whole key strings whose SHA-256 matched their row, so a key seen again is not hashed again. Each
 * holds the row's cache entry and counts only while that entry is still the cached one and fresh: a revocation, plan
 * change or reload replaces or drops the entry (revokeKey, forgetSubscription, KEY_CACHE_MS), and the verdict with it.
 * Only matching keys are kept (a wrong key adds nothing), and the map is bounded. A wrong key is looked up by its
 * string hash here, then hashed and compared in constant time as before.
 */
const verdicts = new Map<string, { prefix: string; entry: CacheEntry; check: KeyCheck }>();
export const MAX_VERDICTS = 10_000;

/** Drops cached keys of a subscription (plan change, cancellation) so this process sees the change at once. */
export function forgetSubscription(subscriptionId: string): void {
  for (const [prefix, entry] of cache) if (entry.key?.subscriptionId === subscriptionId) cache.delete(prefix);
}

async function loadKey(ctx: AppContext, prefix: string): Promise<ResolvedKey | null> {
  const { rows } = await ctx.pool.query(
    `SELECT k.id, k.prefix, k.secret_sha256, k.revoked_at IS NOT NULL AS revoked, s.id AS subscription_id, s.status, s.subscriber_id,
            l.id AS listing_id, l.slug, p.name AS plan_name, p.monthly_quota, p.rate_per_minute
       FROM api_keys k JOIN subscriptions s ON s.id = k.subscription_id JOIN plans p ON p.id = s.plan_id JOIN listings l ON l.id = s.listing_id
      WHERE k.prefix = $1`, [prefix]);
  const r = rows[0];
  if (!r) return null;
  return {
    keyId: r.id, prefix: r.prefix, secretSha256: Buffer.from(r.secret_sha256, 'hex'), revoked: r.revoked, subscriptionId: r.subscription_id,
    subscriptionStatus: r.status, subscriberId: r.subscriber_id, listingId: r.listing_id, listingSlug: r.slug, planName: r.plan_name,
    monthlyQuota: r.monthly_quota, ratePerMinute: r.rate_per_minute,
  };
}

export type KeyCheck = { ok: true; key: ResolvedKey } | { ok: false; reason: 'malformed' | 'unknown' | 'revoked' | 'inactive'; key?: ResolvedKey };

/** Resolves and verifies a presented key (constant-time comparison of the hashes). One query at most per KEY_CACHE_MS. */
export async function verifyKey(ctx: AppContext, presented: string): Promise<KeyCheck> {
  const cached = verifyCachedKey(presented);
  if (cached) return cached;
  const prefix = KEY_SHAPE.exec(presented)![1];
  const entry = { at: Date.now(), key: await loadKey(ctx, prefix) };
  cache.set(prefix, entry);
  if (cache.size > 50_000) cache.delete(cache.keys().next().value!);
  return check(presented, entry.key);
}

/**
 * The same verdict as verifyKey when it needs no query (malformed key, or its row cached within KEY_CACHE_MS), else
 * null. Synchronous so the hot path spends no promise and no microtask turn on a key it already knows.
 */
export function verifyCachedKey(presented: string): KeyCheck | null {
  const now = Date.now();
  const known = verdicts.get(presented);
  if (known && cache.get(known.prefix) === known.entry && now - known.entry.at <= KEY_CACHE_MS) return known.check;
  const match = KEY_SHAPE.exec(presented);
  if (!match) return { ok: false, reason: 'malformed' };
  const entry = cache.get(match[1]);
  if (!entry || now - entry.at > KEY_CACHE_MS) return null;
  const verdict = check(presented, entry.key);
  if (verdict.ok || verdict.reason !== 'unknown') {
    if (verdicts.size >= MAX_VERDICTS) verdicts.clear();
    verdicts.set(presented, { prefix: match[1], entry, check: verdict });
  }
  return verdict;
}

function check(presented: string, key: ResolvedKey | null): KeyCheck {
  if (!key || !crypto.timingSafeEqual(sha256(presented), key.secretSha256)) return { ok: false, reason: 'unknown' };
  if (key.revoked) return { ok: false, reason: 'revoked', key };
  if (!isLive(key.subscriptionStatus)) return { ok: false, reason: 'inactive', key };
  return { ok: true, key };
}
