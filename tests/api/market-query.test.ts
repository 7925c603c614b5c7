// The /api/v1 query API: facts lookups with pagination, SPARQL 1.1 Protocol queries answered in the SPARQL 1.1 Query
// Results JSON Format, the OpenAPI document, and every refusal (400, 401, 403, 404, 415).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import supertest from 'supertest';
import type { AddressInfo } from 'node:net';
import { createTestApp, type TestApp } from '../support/app.js';
import { createServer } from '../../server/app.js';
import { publishedListing, subscriberWithKey, type FactRow, type TestListing } from '../support/market.js';
import { revokeKey } from '../../server/services/apiKeys.js';
import { stopMeter } from '../../server/services/metering.js';

const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const FOAF = 'http://xmlns.com/foaf/0.1/';
const XMLLITERAL = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#XMLLiteral';

// The data behind the example of W3C "SPARQL 1.1 Query Results JSON Format" (Recommendation, 21 March 2013), §4 "Example"
// (from memory): two people as blank nodes r1 and r2 with homepage, name, mbox, blurb and friend.
const W3C_EXAMPLE: FactRow[] = [
  ['_:r1', `${FOAF}homepage`, 'http://work.example.org/alice/'],
  ['_:r1', `${FOAF}name`, '"Alice"'],
  ['_:r1', `${FOAF}mbox`, '""'],
  ['_:r1', 'http://example.org/blurb', `"<p xmlns=\\"http://www.w3.org/1999/xhtml\\">My name is <b>alice</b></p>"^^<${XMLLITERAL}>`],
  ['_:r1', `${FOAF}knows`, '_:r2'],
  ['_:r2', `${FOAF}homepage`, 'http://work.example.org/bob/'],
  ['_:r2', `${FOAF}name`, '"Bob"@en'],
  ['_:r2', `${FOAF}mbox`, 'mailto:bob@work.example.org'],
  ['_:r2', `${FOAF}knows`, '_:r1'],
];

// Invented demo-style facts for paging: 25 harbours typed as Port (asserted) and as Place (entailed).
const EX = 'http://thence.test/harbour#';
const PORTS: FactRow[] = Array.from({ length: 25 }, (_, i) => [
  [`${EX}h${String(i).padStart(2, '0')}`, RDF_TYPE, `${EX}Port`, true],
  [`${EX}h${String(i).padStart(2, '0')}`, RDF_TYPE, `${EX}Place`, false],
] as FactRow[]).flat();

let t: TestApp;
let listing: TestListing;
let other: TestListing;
let auth: string;
let otherAuth: string;

beforeAll(async () => {
  t = await createTestApp();
  listing = await publishedListing(t.ctx, [...W3C_EXAMPLE, ...PORTS, [`${EX}h00`, `${EX}sameNameAs`, `${EX}h00`]]);
  other = await publishedListing(t.ctx, [[`${EX}x`, RDF_TYPE, `${EX}Thing`]]);
  auth = (await subscriberWithKey(t.ctx, listing)).auth;
  otherAuth = (await subscriberWithKey(t.ctx, other)).auth;
});
afterAll(async () => {
  await stopMeter(t.ctx);
  await t.close();
});

const get = (path: string, key = auth) => supertest(t.app).get(path).set('Authorization', key);

describe('GET /api/v1/kbs/:slug/facts', () => {
  it('pages through a pattern with an opaque cursor, each fact once', async () => {
    const seen: string[] = [];
    let cursor: string | null = null;
    let pages = 0;
    do {
      const res: supertest.Response = await get(`/api/v1/kbs/${listing.slug}/facts?predicate=${encodeURIComponent(RDF_TYPE)}&object=${encodeURIComponent(EX + 'Place')}&limit=10${cursor ? `&cursor=${cursor}` : ''}`).expect(200);
      expect(res.body.kb).toEqual({ slug: listing.slug, version: 1 });
      for (const f of res.body.facts) {
        expect(f).toMatchObject({ predicate: RDF_TYPE, object: `${EX}Place`, asserted: false });
        seen.push(f.subject);
      }
      cursor = res.body.nextCursor;
      pages++;
    } while (cursor);
    expect(pages).toBe(3);
    expect(seen).toHaveLength(25);
    expect(new Set(seen).size).toBe(25);
  });

  it('answers whether a fact is entailed when all three are bound', async () => {
    const q = (o: string) => `/api/v1/kbs/${listing.slug}/facts?subject=${encodeURIComponent(EX + 'h03')}&predicate=${encodeURIComponent(RDF_TYPE)}&object=${encodeURIComponent(o)}`;
    expect((await get(q(`${EX}Place`)).expect(200)).body).toMatchObject({ entailed: true, asserted: false });
    expect((await get(q(`${EX}Port`)).expect(200)).body).toMatchObject({ entailed: true, asserted: true });
    expect((await get(q(`${EX}Ship`)).expect(200)).body).toMatchObject({ entailed: false });
  });

  it('matches a literal object given in N-Triples form (language tag case-insensitive, RDF 1.1 §3.3)', async () => {
    const res = await get(`/api/v1/kbs/${listing.slug}/facts?object=${encodeURIComponent('"Bob"@EN')}`).expect(200);
    expect(res.body.facts).toEqual([{ subject: '_:r2', predicate: `${FOAF}name`, object: '"Bob"@en', asserted: true }]);
  });

  it('refuses bad parameters with 400 naming the field', async () => {
    const bad = await get(`/api/v1/kbs/${listing.slug}/facts?subject=not%20an%20iri&limit=5000&colour=red`).expect(400);
    expect(bad.body.error.fields).toHaveProperty('subject');
    expect(bad.body.error.fields).toHaveProperty('colour');
    const limit = await get(`/api/v1/kbs/${listing.slug}/facts?limit=0`).expect(400);
    expect(limit.body.error.fields).toHaveProperty('limit');
    const cursor = await get(`/api/v1/kbs/${listing.slug}/facts?cursor=bm9wZQ`).expect(400);
    expect(cursor.body.error.fields).toHaveProperty('cursor');
  });
});

describe('authentication and authorisation', () => {
  it('401 without a key, with another scheme, with a malformed, unknown or revoked key', async () => {
    const path = `/api/v1/kbs/${listing.slug}/facts`;
    const none = await supertest(t.app).get(path).expect(401);
    expect(none.headers['www-authenticate']).toMatch(/^Bearer/); // RFC 6750 §3
    expect(none.body.error.code).toBe('unauthenticated');
    await supertest(t.app).get(path).set('Authorization', 'Basic Zm9vOmJhcg==').expect(401);
    await get(path, 'Bearer nonsense').expect(401);
    const forged = auth.slice(0, -4) + (auth.endsWith('AAAA') ? 'BBBB' : 'AAAA');
    expect((await get(path, forged).expect(401)).body.error.message).toMatch(/Unknown API key/);
    const extra = await subscriberWithKey(t.ctx, listing);
    // Twice: the second answer comes from the verdict kept for a key string already checked (server/services/apiKeys.ts),
    // which the revocation must drop at once in this process (server/marketplace.md, "API keys").
    await get(path, extra.auth).expect(200);
    await get(path, extra.auth).expect(200);
    await revokeKey(t.ctx, extra.user.id, extra.key.id);
    expect((await get(path, extra.auth).expect(401)).body.error.message).toMatch(/revoked/);
  });

  it('403 for a key of one subscriber on another listing', async () => {
    const res = await get(`/api/v1/kbs/${listing.slug}/facts`, otherAuth).expect(403);
    expect(res.body.error.code).toBe('wrong_listing');
    await get(`/api/v1/kbs/${other.slug}/facts`, otherAuth).expect(200);
  });

  it('404 when the key’s own listing has no published version', async () => {
    await t.ctx.pool.query(`UPDATE listings SET published_version_id = NULL WHERE id = $1`, [other.id]);
    await new Promise((r) => setTimeout(r, 2100)); // the published-version cache holds for 2 s
    const res = await get(`/api/v1/kbs/${other.slug}/facts`, otherAuth).expect(404);
    expect(res.body.error.code).toBe('not_published');
  });
});

describe('/api/v1/kbs/:slug/sparql (SPARQL 1.1 Protocol §2.1)', () => {
  const sparql = `/api/v1/kbs/`;
  it('SELECT answers as in the W3C JSON results example (§4): bnode, uri, literal with xml:lang, typed literal', async () => {
    const query = `PREFIX foaf: <${FOAF}> SELECT ?x ?name WHERE { ?x foaf:name ?name }`;
    const res = await get(`${sparql}${listing.slug}/sparql?query=${encodeURIComponent(query)}`).expect(200);
    expect(res.headers['content-type']).toMatch(/^application\/sparql-results\+json/);
    expect(res.body.head).toEqual({ vars: ['x', 'name'] });
    // The binding objects below are those of the W3C example for the same terms.
    expect(res.body.results.bindings).toEqual(expect.arrayContaining([
      { x: { type: 'bnode', value: 'r1' }, name: { type: 'literal', value: 'Alice' } },
      { x: { type: 'bnode', value: 'r2' }, name: { type: 'literal', value: 'Bob', 'xml:lang': 'en' } },
    ]));
    expect(res.body.results.bindings).toHaveLength(2);
    const blurb = await supertest(t.app).post(`${sparql}${listing.slug}/sparql`).set('Authorization', auth).set('Content-Type', 'application/sparql-query')
      .send('SELECT ?blurb WHERE { ?x <http://example.org/blurb> ?blurb }').expect(200);
    expect(blurb.body.results.bindings).toEqual([{ blurb: { type: 'literal', datatype: XMLLITERAL, value: '<p xmlns="http://www.w3.org/1999/xhtml">My name is <b>alice</b></p>' } }]);
    const hpage = await supertest(t.app).post(`${sparql}${listing.slug}/sparql`).set('Authorization', auth).type('form')
      .send({ query: `SELECT * WHERE { ?x <${FOAF}mbox> ?mbox }` }).expect(200);
    expect(hpage.body.head.vars).toEqual(['x', 'mbox']);
    expect(hpage.body.results.bindings).toEqual(expect.arrayContaining([
      { x: { type: 'bnode', value: 'r1' }, mbox: { type: 'literal', value: '' } },
      { x: { type: 'bnode', value: 'r2' }, mbox: { type: 'uri', value: 'mailto:bob@work.example.org' } },
    ]));
  });

  it('ASK answers {"head": {}, "boolean": …} (§3.3 of the JSON format, from memory)', async () => {
    const ask = (q: string) => get(`${sparql}${listing.slug}/sparql?query=${encodeURIComponent(q)}`).expect(200);
    expect((await ask(`ASK { <${EX}h07> a <${EX}Place> }`)).body).toEqual({ head: {}, boolean: true });
    expect((await ask(`ASK { <${EX}h07> a <${EX}Ship> }`)).body).toEqual({ head: {}, boolean: false });
    expect((await ask(`ASK { ?x <${FOAF}knows> [] }`)).body.boolean).toBe(true);
  });

  it('LIMIT and OFFSET page a SELECT in the fact store’s stable order', async () => {
    const q = (limit: number, offset: number) => `SELECT ?h WHERE { ?h a <${EX}Port> } LIMIT ${limit} OFFSET ${offset}`;
    const all = (await get(`${sparql}${listing.slug}/sparql?query=${encodeURIComponent(q(100, 0))}`).expect(200)).body.results.bindings;
    expect(all).toHaveLength(25);
    const page = (await get(`${sparql}${listing.slug}/sparql?query=${encodeURIComponent(q(5, 10))}`).expect(200)).body.results.bindings;
    expect(page).toEqual(all.slice(10, 15));
  });

  it('a variable used twice keeps only facts where both positions agree', async () => {
    const res = await get(`${sparql}${listing.slug}/sparql?query=${encodeURIComponent(`SELECT ?x WHERE { ?x <${EX}sameNameAs> ?x }`)}`).expect(200);
    expect(res.body.results.bindings).toEqual([{ x: { type: 'uri', value: `${EX}h00` } }]);
    const none = await get(`${sparql}${listing.slug}/sparql?query=${encodeURIComponent(`SELECT ?x WHERE { ?x <${FOAF}knows> ?x }`)}`).expect(200);
    expect(none.body.results.bindings).toEqual([]);
  });

  it('refuses other query shapes with 400 that says what is supported', async () => {
    const refused = [
      `SELECT ?x WHERE { ?x a <${EX}Port> . ?x a <${EX}Place> }`,
      `SELECT ?x WHERE { ?x a <${EX}Port> FILTER(?x != <${EX}h00>) }`,
      `SELECT ?x WHERE { OPTIONAL { ?x a <${EX}Port> } }`,
      `CONSTRUCT { ?x a <${EX}Harbour> } WHERE { ?x a <${EX}Port> }`,
      `SELECT ?x WHERE { ?x <${EX}a>/<${EX}b> ?y }`,
      `SELECT (COUNT(?x) AS ?n) WHERE { ?x a <${EX}Port> }`,
      `SELECT ?x WHERE { ?x a <${EX}Port> } ORDER BY ?x`,
      `SELECT DISTINCT ?p WHERE { ?s ?p ?o }`,
      `INSERT DATA { <${EX}a> a <${EX}b> }`,
    ];
    for (const query of refused) {
      const res = await get(`${sparql}${listing.slug}/sparql?query=${encodeURIComponent(query)}`);
      expect(res.status, query).toBe(400);
      expect(res.body.error.message, query).toMatch(/Supported: ASK or SELECT/);
    }
    const syntax = await get(`${sparql}${listing.slug}/sparql?query=${encodeURIComponent('SELEKT ?x WHERE { ?x ?y ?z }')}`).expect(400);
    expect(syntax.body.error.code).toBe('malformed_query');
    await get(`${sparql}${listing.slug}/sparql`).expect(400);
    const media = await supertest(t.app).post(`${sparql}${listing.slug}/sparql`).set('Authorization', auth).set('Content-Type', 'text/plain').send('ASK {}').expect(415);
    expect(media.body.error.message).toMatch(/application\/sparql-query/);
  });

  it('more than 10,000 solutions without LIMIT is refused rather than cut short', async () => {
    const big = await publishedListing(t.ctx, Array.from({ length: 10_001 }, (_, i) => [`${EX}n${i}`, RDF_TYPE, `${EX}Node`] as FactRow));
    const key = await subscriberWithKey(t.ctx, big);
    const res = await get(`${sparql}${big.slug}/sparql?query=${encodeURIComponent(`SELECT ?n WHERE { ?n a <${EX}Node> }`)}`, key.auth).expect(400);
    expect(res.body.error.code).toBe('too_many_solutions');
    const limited = await get(`${sparql}${big.slug}/sparql?query=${encodeURIComponent(`SELECT ?n WHERE { ?n a <${EX}Node> } LIMIT 3 OFFSET 9999`)}`, key.auth).expect(200);
    expect(limited.body.results.bindings).toHaveLength(2);
  });
});

describe('GET /api/v1/openapi.json', () => {
  it('is public and describes the endpoints as OpenAPI 3.1 with bearer security', async () => {
    const res = await supertest(t.app).get('/api/v1/openapi.json').expect(200);
    expect(res.body.openapi).toBe('3.1.0');
    expect(Object.keys(res.body.paths)).toEqual(expect.arrayContaining(['/kbs/{slug}/facts', '/kbs/{slug}/sparql']));
    expect(res.body.components.securitySchemes.apiKey).toEqual(expect.objectContaining({ type: 'http', scheme: 'bearer' }));
    for (const status of ['400', '401', '403', '404', '429']) expect(res.body.paths['/kbs/{slug}/facts'].get.responses).toHaveProperty(status);
    // Every local $ref resolves (OpenAPI 3.1 §4.8.23, Reference Object — from memory).
    const refs: string[] = [];
    const walk = (node: unknown): void => {
      if (Array.isArray(node)) node.forEach(walk);
      else if (node && typeof node === 'object') for (const [k, v] of Object.entries(node)) k === '$ref' ? refs.push(v as string) : walk(v);
    };
    walk(res.body);
    expect(refs.length).toBeGreaterThan(5);
    for (const ref of refs) {
      const target = ref.replace(/^#\//, '').split('/').reduce<unknown>((at, part) => (at as Record<string, unknown> | undefined)?.[part], res.body);
      expect(target, ref).toBeDefined();
    }
  });
  it('answers CORS preflights so browser applications on other sites can call with a Bearer key', async () => {
    const pre = await supertest(t.app).options(`/api/v1/kbs/${listing.slug}/sparql`).set('Origin', 'https://app.example.test').set('Access-Control-Request-Method', 'POST').set('Access-Control-Request-Headers', 'authorization, content-type').expect(204);
    expect(pre.headers['access-control-allow-origin']).toBe('*');
    expect(pre.headers['access-control-allow-headers']).toMatch(/Authorization/);
    const res = await get(`/api/v1/kbs/${listing.slug}/facts?limit=1`).set('Origin', 'https://app.example.test').expect(200);
    expect(res.headers['access-control-expose-headers']).toMatch(/RateLimit/);
  });
  it('sends the security headers of a JSON API on answers, refusals and the OpenAPI document, and no cookie', async () => {
    // Checks, each from its standard: CORS `Access-Control-Allow-Origin: *` (WHATWG Fetch, "CORS protocol"); `nosniff`
    // (WHATWG Fetch, "X-Content-Type-Options" header); `default-src 'none'` and `frame-ancestors 'none'` (W3C CSP Level 3,
    // §6.1.1 and §6.4.2); `no-referrer` (W3C Referrer Policy §3); that a JSON API sends these is common practice (from
    // memory: OWASP REST Security Cheat Sheet, "Security headers").
    const answers = [
      await get(`/api/v1/kbs/${listing.slug}/facts?limit=1`).expect(200),
      await get(`/api/v1/kbs/${listing.slug}/facts?subject=_:r1&predicate=${encodeURIComponent(`${FOAF}name`)}&object=${encodeURIComponent('"Alice"')}`).expect(200),
      await get(`/api/v1/kbs/${listing.slug}/facts?limit=0`).expect(400),
      await supertest(t.app).get(`/api/v1/kbs/${listing.slug}/facts`).expect(401),
      await get(`/api/v1/kbs/${other.slug}/facts`).expect(403),
      await supertest(t.app).get('/api/v1/openapi.json').expect(200),
      await supertest(t.app).get('/api/v1/nothing').expect(404),
    ];
    for (const res of answers) {
      const where = `${res.status} ${res.text.slice(0, 60)}`;
      expect(res.headers['access-control-allow-origin'], where).toBe('*');
      expect(res.headers['x-content-type-options'], where).toBe('nosniff');
      const csp = (res.headers['content-security-policy'] as string).split(';').map((d) => d.trim());
      expect(csp, where).toContain("default-src 'none'");
      expect(csp, where).toContain("frame-ancestors 'none'");
      expect(res.headers['referrer-policy'], where).toBe('no-referrer');
      expect(res.headers['content-type'], where).toMatch(/^application\/json/);
      expect(res.headers['set-cookie'], where).toBeUndefined();
      // A body of known length is framed by Content-Length, not chunked (RFC 9112 §6.1–6.2; RFC 9110 §8.6).
      expect(Number(res.headers['content-length']), where).toBe(Buffer.byteLength(res.text));
      expect(res.headers['transfer-encoding'], where).toBeUndefined();
    }
    expect(answers[1]!.body.entailed).toBe(true);
  });
  it('unknown /api/v1 paths answer JSON 404', async () => {
    const res = await supertest(t.app).get('/api/v1/nothing').expect(404);
    expect(res.body.error.code).toBe('not_found');
  });
});

describe('the production HTTP server (createServer)', () => {
  it('answers every kind of request as the app does under supertest, API and main app alike', async () => {
    // createServer builds requests with the query API's prototypes (server/v1/app.ts, apiServerOptions); the main app
    // switches them to its own. Same status, body and headers (less the ones that change per request) either way.
    const server = createServer(t.app);
    await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
    const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
    try {
      const lookup = `subject=_:r1&predicate=${encodeURIComponent(`${FOAF}name`)}&object=${encodeURIComponent('"Alice"')}`;
      const requests: [method: 'get' | 'options', path: string, key?: string][] = [
        ['get', `/api/v1/kbs/${listing.slug}/facts?${lookup}`, auth],
        ['get', `/api/v1/kbs/${listing.slug}/facts?predicate=${encodeURIComponent(RDF_TYPE)}&limit=2`, auth],
        ['get', `/api/v1/kbs/${listing.slug}/facts?limit=0`, auth],
        ['get', `/api/v1/kbs/${listing.slug}/facts`],
        ['get', `/api/v1/kbs/${other.slug}/facts`, auth],
        ['get', `/api/v1/kbs/${listing.slug}/sparql?query=${encodeURIComponent(`ASK { <${EX}h00> a <${EX}Port> }`)}`, auth],
        ['get', `/api/v1/kbs/${listing.slug.toUpperCase()}/facts?limit=1`, auth],
        ['options', `/api/v1/kbs/${listing.slug}/sparql`],
        ['get', '/api/v1/openapi.json'],
        ['get', '/api/v1/nothing'],
        ['get', '/api/auth/me'],
        ['get', '/api/listings'],
        ['get', '/api/nothing'],
      ];
      const varying = new Set(['date', 'ratelimit', 'set-cookie', 'etag', 'connection', 'keep-alive']);
      const view = (res: supertest.Response) => ({
        status: res.status,
        body: res.text,
        headers: Object.fromEntries(Object.entries(res.headers).filter(([name]) => !varying.has(name))),
      });
      for (const [method, path, key] of requests) {
        const send = (target: Parameters<typeof supertest>[0]) => {
          const test = supertest(target)[method](path);
          return key ? test.set('Authorization', key) : test;
        };
        const viaApp = view(await send(t.app));
        const viaServer = view(await send(url));
        expect(viaServer, `${method} ${path}`).toEqual(viaApp);
      }
    } finally {
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    }
  });
});
