// Seed step: the demo publisher's two listings (invented scenarios), processed synchronously by the same processing service
// the worker uses, then published. Idempotent: a listing that already serves a ready version is left alone.
import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { AppContext } from '../context.js';
import { processVersion } from '../services/processing.js';
import { publishVersion } from '../services/publishing.js';
import { storeLocalFile, type StoredUpload } from '../services/uploads.js';
import { createVersion, loadVersion } from '../services/versions.js';

const DATA = path.join(path.dirname(fileURLToPath(import.meta.url)), 'data');
export const DEMO_PUBLISHER_EMAIL = 'ines.publisher@demo.thence.test';

interface DemoListing {
  slug: string;
  title: string;
  summary: string;
  descriptionMd: string;
  tags: string[];
  licence: string;
  contact: string;
  ontology: string;
  datasets: { file: string; mapping?: string }[];
}

export const DEMO_LISTINGS: DemoListing[] = [
  {
    slug: 'tidewater-port-registry',
    title: 'Tidewater port registry',
    summary: 'Vessels, berths and cargo of the (invented) Tidewater harbour, with every berth inspection the rules imply.',
    descriptionMd: [
      'The **Tidewater port registry** records which vessels docked at which berths and what they carry.',
      '',
      'The ontology is *Horn*: each fact follows by chaining rules, for example',
      '',
      '- a vessel docked at a berth **visits** it, and the berth is **visited by** the vessel;',
      '- a vessel carrying hazardous cargo is a **restricted vessel**, and a berth it visits is an **inspected berth**;',
      '- every berth is part of some quay, named or not.',
      '',
      'Data: a movement log (N-Triples) and a vessel register (CSV). All names are invented for the demo.',
    ].join('\n'),
    tags: ['logistics', 'demo', 'horn'],
    licence: 'CC BY 4.0',
    contact: 'registry@tidewater.demo.thence.test',
    ontology: 'tidewater/tidewater.ofn',
    datasets: [{ file: 'tidewater/movements.nt' }, { file: 'tidewater/vessels.csv', mapping: 'tidewater/vessels.mapping.json' }],
  },
  {
    slug: 'glacier-valley-trails',
    title: 'Glacier valley trails',
    summary: 'Trails and huts of an invented alpine valley; which trails need waymarking and which routes end at a shelter.',
    descriptionMd: [
      'Every trail of **Glacier valley** is a summer trail or a winter trail, and both kinds need waymarking — so every trail',
      'needs waymarking, even one whose season is not recorded. Finding that takes *reasoning by cases*:',
      'the ontology has disjunctions, so no single chain of rules reaches it.',
      '',
      'Likewise a hut is staffed or self-service, both are shelters, and a trail ending at a shelter is a **safe route**.',
      '',
      'Data: the trail network in Turtle. All names are invented for the demo.',
    ].join('\n'),
    tags: ['outdoors', 'demo', 'disjunction'],
    licence: 'CC0 1.0',
    contact: 'https://glacier.demo.thence.test/contact',
    ontology: 'glacier/glacier.ofn',
    datasets: [{ file: 'glacier/network.ttl' }],
  },
];

/** Creates, processes and publishes the demo listings for the demo publisher. */
export async function seedPublisherListings(ctx: AppContext, log: (line: string) => void = console.log): Promise<void> {
  const { rows: users } = await ctx.pool.query<{ id: string }>(`SELECT id FROM users WHERE email = $1`, [DEMO_PUBLISHER_EMAIL]);
  const publisher = users[0];
  if (!publisher) throw new Error(`the demo publisher ${DEMO_PUBLISHER_EMAIL} does not exist; seed the accounts first`);
  for (const demo of DEMO_LISTINGS) {
    const { rows } = await ctx.pool.query<{ id: string; published_version_id: string | null; status: string | null }>(
      `SELECT l.id, l.published_version_id, v.status FROM listings l LEFT JOIN kb_versions v ON v.id = l.published_version_id WHERE l.slug = $1`,
      [demo.slug],
    );
    if (rows[0]?.status === 'ready') {
      log(`listing ${demo.slug}: already published`);
      continue;
    }
    const listingId =
      rows[0]?.id ??
      (
        await ctx.pool.query<{ id: string }>(
          `INSERT INTO listings (publisher_id, slug, title, summary, description_md, tags, licence, contact) VALUES ($1, $2, $3, $4, $5, $6, $7, $8) RETURNING id`,
          [publisher.id, demo.slug, demo.title, demo.summary, demo.descriptionMd, demo.tags, demo.licence, demo.contact],
        )
      ).rows[0]!.id;
    const versionId = randomUUID();
    const target = { listingId, versionId, position: 0 };
    const files: StoredUpload[] = [await storeLocalFile(ctx, target, 'ontology', path.join(DATA, demo.ontology))];
    const csvMappings: Record<string, unknown> = {};
    for (const dataset of demo.datasets) {
      const stored = await storeLocalFile(ctx, target, 'dataset', path.join(DATA, dataset.file));
      files.push(stored);
      if (dataset.mapping) csvMappings[stored.originalName] = JSON.parse(await fs.promises.readFile(path.join(DATA, dataset.mapping), 'utf8'));
    }
    await createVersion(ctx, listingId, versionId, files, { mode: 'strict', csvMappings }, { note: 'seeded', enqueue: false });
    const outcome = await processVersion(ctx, versionId, { finalAttempt: true });
    const version = await loadVersion(ctx.pool, versionId);
    if (outcome !== 'ready' || !version) throw new Error(`demo listing ${demo.slug}: processing ended ${outcome}${version?.error ? ` — ${version.error}` : ''}`);
    await publishVersion(ctx, version);
    log(`listing ${demo.slug}: version ${version.number} published with ${version.fact_count} facts`);
  }
}
