// From upload to published, through the real queue, worker and reasoner: facts stored exactly as entailed, atomic
// publishing and roll-back, inconsistency, diagnostics, approximate mode, cancellation and mail.
import fs from 'node:fs';
import path from 'node:path';
import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, guestAgent, signedInAgent, type TestApp } from '../support/app.js';
import { startJobs, type RunningJobs } from '../../server/jobs/index.js';
import { stopQueue } from '../../server/jobs/queue.js';
import { factTablesExist, lookupFacts } from '../../server/services/factStore.js';
import { reason } from '../../reasoner/index.js';
import { writeHarbourDataset } from '../bench/harbour-data.js';
import { waitForMail } from '../support/mail.js';

// A queue of this file's own, so no other test process's worker takes these jobs.
process.env.THENCE_KB_QUEUE = `kb-process-test-${randomUUID().slice(0, 8)}`;

const SEED = path.resolve('server/seed/data');
const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const G = 'https://demo.thence.test/glacier#';
let t: TestApp;
let jobs: RunningJobs;
let alice: Awaited<ReturnType<typeof signedInAgent>>;
let n = 0;

async function newListing(label: string): Promise<{ id: string; slug: string }> {
  const res = await alice.post('/api/publisher/listings').send({ title: `Processing ${label}`, slug: `proc-${label}-${Date.now().toString(36)}-${n++}`, summary: 'A listing made by the processing test.', licence: 'CC0 1.0', contact: 'test@example.test' });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.listing;
}

function upload(listingId: string, files: { ontology: [Buffer | string, string]; datasets?: [Buffer | string, string][]; mode?: string }) {
  let req = alice.post(`/api/publisher/listings/${listingId}/versions`).field('notice', 'true').field('mode', files.mode ?? 'strict');
  const buf = (b: Buffer | string) => (typeof b === 'string' && fs.existsSync(b) ? fs.readFileSync(b) : Buffer.from(b));
  req = req.attach('ontology', buf(files.ontology[0]), files.ontology[1]);
  for (const [data, name] of files.datasets ?? []) req = req.attach('datasets', buf(data), name);
  return req;
}

async function waitFor(versionId: string, done: (status: string) => boolean, timeoutMs = 60_000): Promise<{ status: string; [k: string]: unknown }> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await alice.get(`/api/publisher/versions/${versionId}/status`);
    expect(res.status).toBe(200);
    if (done(res.body.version.status)) return res.body.version;
    if (Date.now() > deadline) throw new Error(`version ${versionId} still ${res.body.version.status}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}
const terminal = (s: string) => !['queued', 'processing'].includes(s);

async function allFacts(versionId: string): Promise<string[]> {
  const out: string[] = [];
  let cursor: string | undefined;
  for (;;) {
    const res = await alice.get(`/api/publisher/versions/${versionId}/facts`).query({ limit: 500, ...(cursor ? { cursor } : {}) });
    expect(res.status).toBe(200);
    out.push(...res.body.facts.map((f: { subject: string; predicate: string; object: string; asserted: boolean }) => `${f.subject} ${f.predicate} ${f.object} ${f.asserted}`));
    if (!res.body.nextCursor) return out.sort();
    cursor = res.body.nextCursor;
  }
}

beforeAll(async () => {
  t = await createTestApp();
  jobs = await startJobs(t.ctx);
  alice = await signedInAgent(t, { roles: ['publisher'] });
});
afterAll(async () => {
  await jobs.stop();
  await stopQueue(t.ctx, 5000);
  await t.close();
});

describe('processing and publishing', () => {
  let listing: { id: string; slug: string };
  let v1: string;

  it('processes an upload to ready and stores exactly the facts the reasoner entails', async () => {
    listing = await newListing('glacier');
    const res = await upload(listing.id, { ontology: [path.join(SEED, 'glacier/glacier.ofn'), 'glacier.ofn'], datasets: [[path.join(SEED, 'glacier/network.ttl'), 'network.ttl']] });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    v1 = res.body.version.id;
    const done = await waitFor(v1, terminal);
    expect(done.status).toBe('ready');
    // Reference: the same reasoner run directly, without queue or database — the store must neither lose nor invent facts.
    const expected: string[] = [];
    const direct = await reason({ ontology: { path: path.join(SEED, 'glacier/glacier.ofn') }, datasets: [{ path: path.join(SEED, 'glacier/network.ttl') }] }, { write: (s, p, o, a) => void expected.push(`${s} ${p} ${o} ${a}`) });
    expect(direct.status).toBe('ok');
    expect(await allFacts(v1)).toEqual(expected.sort());
    // Reasoning by cases (Description Logic Handbook, ch. 2, semantics of ⊔ — from memory): Trail ⊑ Summer ⊔ Winter and both ⊑ NeedsWaymarking
    // give ridge-walk (a Trail by the domain of endsAt) NeedsWaymarking, entailed, not asserted.
    const facts = await lookupFacts(t.ctx.pool, (await t.ctx.pool.query(`SELECT store_key FROM kb_versions WHERE id = $1`, [v1])).rows[0].store_key, { subject: `${G}ridge-walk`, predicate: RDF_TYPE, object: `${G}NeedsWaymarking` }, { limit: 5 });
    expect(facts.facts).toEqual([{ subject: `${G}ridge-walk`, predicate: RDF_TYPE, object: `${G}NeedsWaymarking`, asserted: false }]);
    const detail = (await alice.get(`/api/publisher/versions/${v1}`)).body;
    expect(detail.version.profile.verdict).toBe('alchiq');
    expect(detail.version.rewriting.rules).toBeGreaterThan(0);
    expect(detail.version.counts.facts).toBe(expected.length);
    expect(detail.version.counts.classes.find((c: { iri: string }) => c.iri === `${G}NeedsWaymarking`).entailed).toBeGreaterThanOrEqual(4);
    expect(detail.log.map((l: { message: string }) => l.message).join('\n')).toMatch(/Ready: \d+ facts/);
    // The publisher is told by mail (through the local SMTP catcher).
    const mail = await waitForMail(alice.user.email, /version 1 is ready to publish/);
    expect(mail.text).toContain(`/publisher/versions/${v1}`);
    const program = await alice.get(`/api/publisher/versions/${v1}/program`);
    expect(program.status).toBe(200);
    expect(program.text).toContain('→');
  });

  it('publishes atomically, keeps serving the old version while a new one runs, rolls back and deletes', async () => {
    const guest = await guestAgent(t.app);
    expect((await guest.get(`/api/listings/${listing.slug}`)).status).toBe(404);
    expect((await alice.post(`/api/publisher/versions/${v1}/publish`)).status).toBe(200);
    let pub = await guest.get(`/api/listings/${listing.slug}`);
    expect(pub.status).toBe(200);
    expect(pub.body.listing.publishedVersion).toBe(1);
    expect(pub.body.listing.vocabulary.classes.map((c: { iri: string }) => c.iri)).toContain(`${G}Shelter`);
    expect(pub.body.listing.examples[0].command).toContain(`/api/v1/kbs/${listing.slug}/facts`);
    const cat = await guest.get('/api/listings');
    const entry = cat.body.listings.find((l: { slug: string }) => l.slug === listing.slug);
    expect(entry).toMatchObject({ publishedVersion: 1, factCount: pub.body.listing.factCount });

    const extra = `<${G}scree-path> <${G}endsAt> <${G}lake-shelter> .\n`;
    const res = await upload(listing.id, { ontology: [path.join(SEED, 'glacier/glacier.ofn'), 'glacier.ofn'], datasets: [[path.join(SEED, 'glacier/network.ttl'), 'network.ttl'], [extra, 'more.nt']] });
    const v2 = res.body.version.id as string;
    // While version 2 is processing (or waiting), version 1 is still the one served.
    expect((await guest.get(`/api/listings/${listing.slug}`)).body.listing.publishedVersion).toBe(1);
    expect((await waitFor(v2, terminal)).status).toBe('ready');
    expect((await guest.get(`/api/listings/${listing.slug}`)).body.listing.publishedVersion).toBe(1);
    expect((await alice.post(`/api/publisher/versions/${v2}/publish`)).status).toBe(200);
    pub = await guest.get(`/api/listings/${listing.slug}`);
    expect(pub.body.listing.publishedVersion).toBe(2);
    expect(pub.body.listing.factCount).toBeGreaterThan(entry.factCount);
    // The served version cannot be deleted; roll back to 1, then delete 2 with its facts.
    expect((await alice.delete(`/api/publisher/versions/${v2}`)).status).toBe(409);
    expect((await alice.post(`/api/publisher/versions/${v1}/publish`)).status).toBe(200);
    expect((await guest.get(`/api/listings/${listing.slug}`)).body.listing.publishedVersion).toBe(1);
    const key2 = (await t.ctx.pool.query(`SELECT store_key FROM kb_versions WHERE id = $1`, [v2])).rows[0].store_key;
    expect(await factTablesExist(t.ctx.pool, key2)).toBe(true);
    expect((await alice.delete(`/api/publisher/versions/${v2}`)).status).toBe(204);
    expect(await factTablesExist(t.ctx.pool, key2)).toBe(false);
    expect((await alice.get(`/api/publisher/versions/${v2}`)).status).toBe(404);
  });

  it('downloads the rule program, unpublishes, and deletes the listing with its facts and files', async () => {
    const download = await alice.get(`/api/publisher/versions/${v1}/program?download`);
    expect(download.status).toBe(200);
    expect(download.headers['content-disposition']).toMatch(/^attachment; filename="?proc-glacier-[a-z0-9-]+-v1-rules\.txt"?$/);
    const guest = await guestAgent(t.app);
    expect((await alice.post(`/api/publisher/listings/${listing.id}/unpublish`)).status).toBe(200);
    expect((await guest.get(`/api/listings/${listing.slug}`)).status).toBe(404);
    expect((await guest.get('/api/listings')).body.listings.map((l: { slug: string }) => l.slug)).not.toContain(listing.slug);
    const key1 = (await t.ctx.pool.query(`SELECT store_key FROM kb_versions WHERE id = $1`, [v1])).rows[0].store_key;
    const folder = path.join(t.ctx.config.uploadDir, listing.id);
    expect(fs.existsSync(folder)).toBe(true);
    expect((await alice.delete(`/api/publisher/listings/${listing.id}`)).status).toBe(204);
    expect(await factTablesExist(t.ctx.pool, key1)).toBe(false);
    expect(fs.existsSync(folder)).toBe(false);
    expect((await alice.get(`/api/publisher/listings/${listing.id}`)).status).toBe(404);
  });

  it('reports an inconsistent knowledge base with the clash and refuses to publish it', async () => {
    const l = await newListing('clash');
    // DisjointClasses (OWL 2 Direct Semantics §2.3.1, Table 6): no individual may be in both classes.
    const onto = 'Prefix(:=<http://example.org/clash#>)\nOntology(\n  DisjointClasses(:Ferry :Freighter)\n)\n';
    const data = '<http://example.org/clash#m> <http://www.w3.org/1999/02/22-rdf-syntax-ns#type> <http://example.org/clash#Ferry> .\n<http://example.org/clash#m> <http://www.w3.org/1999/02/22-rdf-syntax-ns#type> <http://example.org/clash#Freighter> .\n';
    const res = await upload(l.id, { ontology: [onto, 'clash.ofn'], datasets: [[data, 'clash.nt']] });
    const done = await waitFor(res.body.version.id, terminal);
    expect(done.status).toBe('inconsistent');
    const detail = (await alice.get(`/api/publisher/versions/${res.body.version.id}`)).body.version;
    expect(detail.explanation.facts.join(' ')).toContain('http://example.org/clash#m');
    expect(detail.explanation.axioms.map((a: { text: string }) => a.text).join(' ')).toContain('DisjointClasses');
    const pub = await alice.post(`/api/publisher/versions/${res.body.version.id}/publish`);
    expect(pub.status).toBe(409);
    expect(pub.body.error.message).toMatch(/inconsistent/);
    expect(await factTablesExist(t.ctx.pool, (await t.ctx.pool.query(`SELECT store_key FROM kb_versions WHERE id = $1`, [res.body.version.id])).rows[0].store_key)).toBe(false);
  });

  it('shows the diagnostics of a malformed ontology with its line', async () => {
    const l = await newListing('broken');
    const onto = 'Prefix(:=<http://example.org/b#>)\nOntology(\n  SubClassOf(:A :B)\n  SubClassOf(:C\n)\n';
    const res = await upload(l.id, { ontology: [onto, 'broken.ofn'] });
    expect(res.status).toBe(201);
    const done = await waitFor(res.body.version.id, terminal);
    expect(done.status).toBe('failed');
    expect((await waitForMail(alice.user.email, /Processing broken: version 1 failed/)).text).toContain('could not be made ready');
    const detail = (await alice.get(`/api/publisher/versions/${res.body.version.id}`)).body.version;
    const error = detail.diagnostics.find((d: { severity: string }) => d.severity === 'error');
    // Positions name the file as the publisher uploaded it, never the server's storage path.
    expect(error.position).toMatch(/^broken\.ofn:\d+(:\d+)?$/);
    expect(JSON.stringify(detail)).not.toContain(t.ctx.config.uploadDir);
    expect(error.message.length).toBeGreaterThan(5);
  });

  it('fails strict mode outside ALCHIQ and succeeds again in approximate mode with the axiom set aside', async () => {
    const l = await newListing('outside');
    // Transitive roles are outside ALCHIQ (ALCHIQ has role hierarchies, inverses and qualified counting, not transitivity; Baader et al. 2003, ch. 2 — from memory).
    const onto = 'Prefix(:=<http://example.org/o#>)\nOntology(\n  TransitiveObjectProperty(:upstreamOf)\n  SubClassOf(:Weir :Structure)\n)\n';
    const data = '<http://example.org/o#w1> <http://www.w3.org/1999/02/22-rdf-syntax-ns#type> <http://example.org/o#Weir> .\n';
    const res = await upload(l.id, { ontology: [onto, 'o.ofn'], datasets: [[data, 'd.nt']] });
    const done = await waitFor(res.body.version.id, terminal);
    expect(done.status).toBe('failed');
    const detail = (await alice.get(`/api/publisher/versions/${res.body.version.id}`)).body.version;
    expect(detail.profile.counts.outside).toBe(1);
    expect(detail.stage).toBe('profile');
    expect(detail.profile.entries.find((e: { classification: string }) => e.classification === 'outside').position).toMatch(/^o\.ofn:3:\d+$/);
    const rerun = await alice.post(`/api/publisher/versions/${res.body.version.id}/rerun`).send({ mode: 'approximate' });
    expect(rerun.status).toBe(201);
    expect(rerun.body.version.number).toBe(2);
    expect((await waitFor(rerun.body.version.id, terminal)).status).toBe('ready');
    const again = (await alice.get(`/api/publisher/versions/${rerun.body.version.id}`)).body.version;
    expect(again.mode).toBe('approximate');
    expect(again.profile.dropped.length).toBe(1);
    expect(await allFacts(rerun.body.version.id)).toContain(`http://example.org/o#w1 ${RDF_TYPE} http://example.org/o#Structure false`);
  });

  it('cancels a running version; nothing of it is stored', async () => {
    const l = await newListing('cancel');
    const file = path.join(t.ctx.config.dataDir, `cancel-${randomUUID()}.nt`);
    fs.mkdirSync(path.dirname(file), { recursive: true });
    await writeHarbourDataset(file, 60_000);
    const res = await upload(l.id, { ontology: [path.join(SEED, 'tidewater/tidewater.ofn'), 'tidewater.ofn'], datasets: [[file, 'harbour.nt']] });
    fs.rmSync(file, { force: true });
    const id = res.body.version.id as string;
    await waitFor(id, (s) => s === 'processing' || terminal(s));
    expect((await alice.post(`/api/publisher/versions/${id}/cancel`)).status).toBe(200);
    const done = await waitFor(id, terminal);
    expect(done.status).toBe('cancelled');
    // Cancelled at once by the running job, not left to fail and retry.
    const log = (await alice.get(`/api/publisher/versions/${id}`)).body.log.map((l: { message: string }) => l.message).join('\n');
    expect(log).toContain('Cancelled; no facts were stored.');
    expect(log).not.toMatch(/will be retried/);
    const key = (await t.ctx.pool.query(`SELECT store_key FROM kb_versions WHERE id = $1`, [id])).rows[0].store_key;
    expect(await factTablesExist(t.ctx.pool, key)).toBe(false);
  }, 90_000);
});
