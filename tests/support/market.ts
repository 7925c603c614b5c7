// Marketplace fixtures for API tests, built through the real code paths: a listing whose version is loaded by the fact
// store's FactLoader and published, plans saved by the plans service, subscriptions and keys made by their services.
import { randomUUID } from 'node:crypto';
import type { AppContext } from '../../server/context.js';
import { FactLoader } from '../../server/services/factStore.js';
import { createPlan } from '../../server/services/plans.js';
import { subscribe } from '../../server/services/subscriptions.js';
import { createKey } from '../../server/services/apiKeys.js';
import type { PlanInput, PlanView } from '../../shared/market.js';
import { createTestUser, type TestUser } from './app.js';

export type FactRow = [subject: string, predicate: string, object: string, asserted?: boolean];

export interface TestListing { id: string; slug: string; title: string; storeKey: number; publisher: TestUser }

export const asUser = (u: TestUser): Express.User => ({ id: u.id, email: u.email, name: u.name, roles: u.roles, emailVerified: true, hasPassword: true, google: false });

/** A published listing with exactly these facts in its served version. */
export async function publishedListing(ctx: AppContext, facts: FactRow[], options: { publisher?: TestUser; title?: string } = {}): Promise<TestListing> {
  const publisher = options.publisher ?? (await createTestUser(ctx, { roles: ['publisher'] }));
  const slug = `kb-${randomUUID().slice(0, 12)}`;
  const title = options.title ?? `Test knowledge base ${slug}`;
  const listing = (await ctx.pool.query<{ id: string }>(`INSERT INTO listings (publisher_id, slug, title) VALUES ($1, $2, $3) RETURNING id`, [publisher.id, slug, title])).rows[0];
  const version = (await ctx.pool.query<{ id: string; store_key: number }>(
    `INSERT INTO kb_versions (listing_id, number, status) VALUES ($1, 1, 'processing') RETURNING id, store_key`, [listing.id])).rows[0];
  const loader = await FactLoader.open(ctx.pool, version.store_key);
  for (const [s, p, o, asserted] of facts) await loader.write(s, p, o, asserted ?? true);
  await loader.finish();
  await loader.commit(async (client) => {
    await client.query(`UPDATE kb_versions SET status = 'ready', fact_count = $2, finished_at = now() WHERE id = $1`, [version.id, facts.length]);
    await client.query(`UPDATE listings SET published_version_id = $2 WHERE id = $1`, [listing.id, version.id]);
  });
  return { id: listing.id, slug, title, storeKey: version.store_key, publisher };
}

export const FREE_PLAN: PlanInput = { name: 'Explorer', description: '', kind: 'free', priceCents: 0, currency: 'eur', monthlyQuota: 1000, ratePerMinute: 600 };
export const PAID_PLAN: PlanInput = { name: 'Production', description: '', kind: 'paid', priceCents: 1900, currency: 'eur', monthlyQuota: 100_000, ratePerMinute: 6000 };

export async function planOn(ctx: AppContext, listing: TestListing, input: Partial<PlanInput> = {}): Promise<PlanView> {
  return createPlan(ctx, asUser(listing.publisher), listing.id, { ...FREE_PLAN, ...input });
}

/** A subscriber on a free plan of the listing with one key; returns the key's secret. */
export async function subscriberWithKey(ctx: AppContext, listing: TestListing, plan: Partial<PlanInput> = {}, subscriber?: TestUser) {
  const p = await planOn(ctx, listing, plan);
  const user = subscriber ?? (await createTestUser(ctx, { roles: ['subscriber'] }));
  const result = await subscribe(ctx, asUser(user), p.id);
  if (!result.subscription) throw new Error('expected a free plan to subscribe at once');
  const key = await createKey(ctx, user.id, result.subscription.id, 'test key');
  return { user, plan: p, subscription: result.subscription, key, secret: key.secret, auth: `Bearer ${key.secret}` };
}
