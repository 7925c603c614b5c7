// Publisher API: roles, ownership, listing validation, uploads (limits, types, sniffing, CSV mappings, notice), originals, cancel.
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, guestAgent, signedInAgent, type TestApp } from '../support/app.js';
import { renderDescription } from '../../server/services/listings.js';
import { stopQueue } from '../../server/jobs/queue.js';

// A queue of this file's own that no worker serves: uploads here stay queued (processing is tested in publisher-processing).
process.env.THENCE_KB_QUEUE = `kb-listings-test-${Date.now().toString(36)}`;

let t: TestApp;
let alice: Awaited<ReturnType<typeof signedInAgent>>;
let bob: Awaited<ReturnType<typeof signedInAgent>>;
let slugCounter = 0;
const slug = (label: string) => `${label}-${Date.now().toString(36)}-${slugCounter++}`;

// A small OWL 2 functional-syntax ontology (grammar: OWL 2 Structural Specification §3.7 and §9); invented vocabulary.
const ONTOLOGY = `Prefix(:=<http://example.org/orchard#>)
Ontology(<http://example.org/orchard>
  SubClassOf(:Apple :Fruit)
)
`;
const DATASET = '<http://example.org/orchard#a1> <http://www.w3.org/1999/02/22-rdf-syntax-ns#type> <http://example.org/orchard#Apple> .\n';

function listingBody(label: string) {
  return { title: `Orchard ${label}`, slug: slug(label), summary: 'Fruit varieties of a demo orchard.', descriptionMd: '# Orchard', tags: ['demo'], licence: 'CC BY 4.0', contact: 'orchard@example.test' };
}

async function newListing(agent = alice, label = 'l'): Promise<{ id: string; slug: string }> {
  const res = await agent.post('/api/publisher/listings').send(listingBody(label));
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.listing;
}

function upload(agent: typeof alice, listingId: string) {
  return agent.post(`/api/publisher/listings/${listingId}/versions`);
}

beforeAll(async () => {
  t = await createTestApp();
  alice = await signedInAgent(t, { roles: ['publisher'] });
  bob = await signedInAgent(t, { roles: ['publisher'] });
});
afterAll(async () => {
  await stopQueue(t.ctx, 2000);
  await t.close();
});

describe('roles and ownership', () => {
  it('refuses signed-out visitors (401) and subscribers (403)', async () => {
    const guest = await guestAgent(t.app);
    expect((await guest.get('/api/publisher/listings')).status).toBe(401);
    const subscriber = await signedInAgent(t, { roles: ['subscriber'] });
    const res = await subscriber.get('/api/publisher/listings');
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('forbidden');
    expect((await subscriber.post('/api/publisher/listings').send(listingBody('sub'))).status).toBe(403);
  });

  it("answers 404 for another publisher's listing, for every route", async () => {
    const listing = await newListing(alice, 'own');
    expect((await bob.get(`/api/publisher/listings/${listing.id}`)).status).toBe(404);
    expect((await bob.patch(`/api/publisher/listings/${listing.id}`).send({ title: 'Taken over' })).status).toBe(404);
    expect((await bob.delete(`/api/publisher/listings/${listing.id}`)).status).toBe(404);
    const up = await upload(bob, listing.id).field('notice', 'true').attach('ontology', Buffer.from(ONTOLOGY), 'o.ofn');
    expect(up.status).toBe(404);
    const mine = await bob.get('/api/publisher/listings');
    expect(mine.body.listings.map((l: { id: string }) => l.id)).not.toContain(listing.id);
    // Alice's version is equally hidden from Bob.
    const v = await upload(alice, listing.id).field('notice', 'true').attach('ontology', Buffer.from(ONTOLOGY), 'o.ofn');
    expect(v.status, JSON.stringify(v.body)).toBe(201);
    for (const path of ['', '/status', '/facts', '/program']) expect((await bob.get(`/api/publisher/versions/${v.body.version.id}${path}`)).status).toBe(404);
    expect((await bob.post(`/api/publisher/versions/${v.body.version.id}/publish`)).status).toBe(404);
  });

  it('lets an admin see every listing', async () => {
    const listing = await newListing(alice, 'adm');
    const admin = await signedInAgent(t, { roles: ['admin'] });
    expect((await admin.get(`/api/publisher/listings/${listing.id}`)).status).toBe(200);
  });
});

describe('listings', () => {
  it('validates per field and refuses a taken slug', async () => {
    const bad = await alice.post('/api/publisher/listings').send({ title: 'x', slug: 'Not A Slug!', summary: '', licence: '', contact: '' });
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields)).toEqual(expect.arrayContaining(['title', 'slug', 'summary', 'licence', 'contact']));
    const body = listingBody('dup');
    expect((await alice.post('/api/publisher/listings').send(body)).status).toBe(201);
    const again = await bob.post('/api/publisher/listings').send(body);
    expect(again.status).toBe(409);
    expect(again.body.error.fields.slug).toBeTruthy();
  });

  it('updates fields but not the slug, and keeps unpublished listings out of the public catalogue', async () => {
    const listing = await newListing(alice, 'upd');
    const res = await alice.patch(`/api/publisher/listings/${listing.id}`).send({ title: 'Orchard renamed', tags: ['fruit', 'demo'] });
    expect(res.status).toBe(200);
    expect(res.body.listing.title).toBe('Orchard renamed');
    expect(res.body.listing.slug).toBe(listing.slug);
    // Fields left out of a PATCH keep their values.
    const again = await alice.patch(`/api/publisher/listings/${listing.id}`).send({ summary: 'Fruit varieties, renamed orchard.' });
    expect(again.body.listing).toMatchObject({ title: 'Orchard renamed', tags: ['fruit', 'demo'], descriptionMd: '# Orchard', summary: 'Fruit varieties, renamed orchard.' });
    const guest = await guestAgent(t.app);
    const cat = await guest.get('/api/listings');
    expect(cat.status).toBe(200);
    expect(cat.body.listings.map((l: { slug: string }) => l.slug)).not.toContain(listing.slug);
    expect((await guest.get(`/api/listings/${listing.slug}`)).status).toBe(404);
  });

  it('renders descriptions from Markdown and strips scripts, handlers and javascript: links', () => {
    const html = renderDescription('# Title\n\n**bold** <script>alert(1)</script> <img src=x onerror="alert(2)"> [x](javascript:alert(3)) [ok](https://example.org)');
    expect(html).toContain('<h1>Title</h1>');
    expect(html).toContain('<strong>bold</strong>');
    expect(html).not.toMatch(/<script|onerror|javascript:|<img/i);
    expect(html).toContain('href="https://example.org"');
  });
});

describe('uploads', () => {
  it('stores a valid upload, records sha256 and serves the original back', async () => {
    const listing = await newListing(alice, 'up');
    const res = await upload(alice, listing.id)
      .field('notice', 'true')
      .field('mode', 'strict')
      .attach('ontology', Buffer.from(ONTOLOGY), 'orchard.ofn')
      .attach('datasets', Buffer.from(DATASET), 'trees.nt');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.version.number).toBe(1);
    const detail = await alice.get(`/api/publisher/versions/${res.body.version.id}`);
    expect(detail.status).toBe(200);
    const files = detail.body.version.files as { id: string; originalName: string; sha256: string; sizeBytes: number; format: string }[];
    const onto = files.find((f) => f.originalName === 'orchard.ofn')!;
    // Reference: node's own SHA-256 of the bytes sent (FIPS 180-4).
    expect(onto.sha256).toBe(createHash('sha256').update(ONTOLOGY).digest('hex'));
    expect(onto.sizeBytes).toBe(Buffer.byteLength(ONTOLOGY));
    expect(onto.format).toBe('ofn');
    expect(files.find((f) => f.originalName === 'trees.nt')!.format).toBe('ntriples');
    const original = await alice.get(`/api/publisher/versions/${res.body.version.id}/files/${onto.id}`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(original.status).toBe(200);
    expect((original.body as Buffer).toString()).toBe(ONTOLOGY);
    const second = await upload(alice, listing.id).field('notice', 'true').attach('ontology', Buffer.from(ONTOLOGY), 'orchard.ofn');
    expect(second.body.version.number).toBe(2);
  });

  it('refuses an upload without the notice confirmed', async () => {
    const listing = await newListing(alice, 'notice');
    const res = await upload(alice, listing.id).attach('ontology', Buffer.from(ONTOLOGY), 'o.ofn');
    expect(res.status).toBe(400);
    expect(res.body.error.fields.notice).toBeTruthy();
    expect((await alice.get(`/api/publisher/listings/${listing.id}`)).body.versions).toEqual([]);
  });

  it('refuses an ontology over 20 MB with 413 naming the file', async () => {
    const listing = await newListing(alice, 'big');
    const big = Buffer.alloc(20 * 1024 * 1024 + 10, ' ');
    big.write('Prefix(:=<http://example.org/x#>)\n');
    const res = await upload(alice, listing.id).field('notice', 'true').attach('ontology', big, 'huge.ofn');
    expect(res.status).toBe(413);
    expect(res.body.error.message).toContain('huge.ofn');
  });

  it('refuses wrong extensions and content that does not match (415)', async () => {
    const listing = await newListing(alice, 'type');
    const wrongExt = await upload(alice, listing.id).field('notice', 'true').attach('ontology', Buffer.from(ONTOLOGY), 'o.docx');
    expect(wrongExt.status).toBe(415);
    expect(wrongExt.body.error.message).toContain('o.docx');
    const notOfn = await upload(alice, listing.id).field('notice', 'true').attach('ontology', Buffer.from('hello world, not an ontology'), 'o.ofn');
    expect(notOfn.status).toBe(415);
    const binary = await upload(alice, listing.id).field('notice', 'true').attach('ontology', Buffer.from(ONTOLOGY)).attach('datasets', Buffer.from([0x50, 0x4b, 0x03, 0x04, 0, 0, 0]), 'data.nt');
    expect([400, 415]).toContain(binary.status);
    const notNt = await upload(alice, listing.id).field('notice', 'true').attach('ontology', Buffer.from(ONTOLOGY), 'o.ofn').attach('datasets', Buffer.from('subject predicate object'), 'd.nt');
    expect(notNt.status).toBe(415);
    expect(notNt.body.error.message).toContain('d.nt');
    const empty = await upload(alice, listing.id).field('notice', 'true').attach('ontology', Buffer.alloc(0), 'o.ofn');
    expect(empty.status).toBe(400);
    expect((await alice.get(`/api/publisher/listings/${listing.id}`)).body.versions).toEqual([]);
  });

  it('needs exactly one ontology and a valid column mapping for each CSV', async () => {
    const listing = await newListing(alice, 'csv');
    const none = await upload(alice, listing.id).field('notice', 'true').attach('datasets', Buffer.from(DATASET), 'd.nt');
    expect(none.status).toBe(400);
    expect(none.body.error.fields.ontology).toBeTruthy();
    const csv = Buffer.from('tree,variety\nhttp://example.org/orchard#t1,Apple\n');
    const noMap = await upload(alice, listing.id).field('notice', 'true').attach('ontology', Buffer.from(ONTOLOGY), 'o.ofn').attach('datasets', csv, 'trees.csv');
    expect(noMap.status).toBe(400);
    expect(noMap.body.error.message).toContain('trees.csv');
    const badCol = await upload(alice, listing.id)
      .field('notice', 'true')
      .field('csvMappings', JSON.stringify({ 'trees.csv': { subjectColumn: 'tree', base: 'http://example.org/orchard#', columns: { colour: { kind: 'type' } } } }))
      .attach('ontology', Buffer.from(ONTOLOGY), 'o.ofn')
      .attach('datasets', csv, 'trees.csv');
    expect(badCol.status).toBe(400);
    expect(badCol.body.error.message).toContain('colour');
    const notJson = await upload(alice, listing.id).field('notice', 'true').field('csvMappings', '{nope').attach('ontology', Buffer.from(ONTOLOGY), 'o.ofn');
    expect(notJson.status).toBe(400);
    const good = await upload(alice, listing.id)
      .field('notice', 'true')
      .field('csvMappings', JSON.stringify({ 'trees.csv': { subjectColumn: 'tree', base: 'http://example.org/orchard#', columns: { variety: { kind: 'type' } } } }))
      .attach('ontology', Buffer.from(ONTOLOGY), 'o.ofn')
      .attach('datasets', csv, 'trees.csv');
    expect(good.status, JSON.stringify(good.body)).toBe(201);
  });

  it('refuses more than ten datasets', async () => {
    const listing = await newListing(alice, 'many');
    let req = upload(alice, listing.id).field('notice', 'true').attach('ontology', Buffer.from(ONTOLOGY), 'o.ofn');
    for (let i = 0; i < 11; i++) req = req.attach('datasets', Buffer.from(DATASET), `d${i}.nt`);
    const res = await req;
    expect(res.status).toBe(400);
    expect(res.body.error.message).toMatch(/at most 10/);
  });

  it('cancels a queued version and refuses to publish it', async () => {
    const listing = await newListing(alice, 'cancel');
    // Nobody works on this file's queue, so the job is still queued and pg-boss can withdraw it.
    const v = await upload(alice, listing.id).field('notice', 'true').attach('ontology', Buffer.from(ONTOLOGY), 'o.ofn');
    const res = await alice.post(`/api/publisher/versions/${v.body.version.id}/cancel`);
    expect(res.status).toBe(200);
    expect(res.body.version.status).toBe('cancelled');
    const job = await t.ctx.pool.query(`SELECT j.state FROM pgboss.job j JOIN kb_versions v ON j.id::text = v.job_id WHERE v.id = $1`, [v.body.version.id]);
    expect(job.rows[0].state).toBe('cancelled');
    expect((await alice.post(`/api/publisher/versions/${v.body.version.id}/cancel`)).status).toBe(409);
    const publish = await alice.post(`/api/publisher/versions/${v.body.version.id}/publish`);
    expect(publish.status).toBe(409);
    const facts = await alice.get(`/api/publisher/versions/${v.body.version.id}/facts`);
    expect(facts.status).toBe(409);
    // A cancelled version can be deleted, files and all.
    expect((await alice.delete(`/api/publisher/versions/${v.body.version.id}`)).status).toBe(204);
  });
});
