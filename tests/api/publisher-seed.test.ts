// The demo seed: two published listings for the demo publisher — one Horn, one that needs reasoning by cases — idempotent.
import { afterAll, beforeAll, expect, it } from 'vitest';
import { createTestApp, guestAgent, type TestApp } from '../support/app.js';
import { seedAccounts } from '../../server/seed/index.js';
import { DEMO_LISTINGS, seedPublisherListings } from '../../server/seed/publisher.js';
import { lookupFacts, publishedVersionBySlug } from '../../server/services/factStore.js';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t.close();
});

const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';

it('seeds, processes and publishes both demo listings, and a second run changes nothing', async () => {
  await seedAccounts(t.ctx, () => {});
  await seedPublisherListings(t.ctx, () => {});
  const first = await Promise.all(DEMO_LISTINGS.map((l) => publishedVersionBySlug(t.ctx.pool, l.slug)));
  await seedPublisherListings(t.ctx, () => {});
  const second = await Promise.all(DEMO_LISTINGS.map((l) => publishedVersionBySlug(t.ctx.pool, l.slug)));
  expect(second).toEqual(first);
  for (const version of first) expect(version?.factCount).toBeGreaterThan(10);

  const guest = await guestAgent(t.app);
  const catalogue = (await guest.get('/api/listings')).body.listings.map((l: { slug: string }) => l.slug);
  expect(catalogue).toEqual(expect.arrayContaining(DEMO_LISTINGS.map((l) => l.slug)));

  const verdicts = await t.ctx.pool.query(`SELECT l.slug, v.profile->>'verdict' AS verdict FROM listings l JOIN kb_versions v ON v.id = l.published_version_id WHERE l.slug = ANY($1)`, [DEMO_LISTINGS.map((l) => l.slug)]);
  expect(Object.fromEntries(verdicts.rows.map((r) => [r.slug, r.verdict]))).toEqual({ 'tidewater-port-registry': 'horn', 'glacier-valley-trails': 'alchiq' });

  // Horn: a vessel carrying hazardous cargo is restricted, and the berth it docks at is inspected (chained rules).
  const tide = first[0]!;
  const inspected = await lookupFacts(t.ctx.pool, tide.storeKey, { predicate: RDF_TYPE, object: 'https://demo.thence.test/tidewater#InspectedBerth' }, { limit: 10 });
  expect(inspected.facts.map((f) => f.subject)).toContain('https://demo.thence.test/tidewater#berth-3');
  // By cases: edelweiss-hut is a Hut, hence staffed or self-service, each a Shelter (Baader et al. 2003, ch. 2 — from memory).
  const glacier = first[1]!;
  const shelter = await lookupFacts(t.ctx.pool, glacier.storeKey, { subject: 'https://demo.thence.test/glacier#edelweiss-hut', predicate: RDF_TYPE, object: 'https://demo.thence.test/glacier#Shelter' }, { limit: 1 });
  expect(shelter.facts).toEqual([{ subject: 'https://demo.thence.test/glacier#edelweiss-hut', predicate: RDF_TYPE, object: 'https://demo.thence.test/glacier#Shelter', asserted: false }]);
}, 120_000);
