// The OpenAPI 3.1 description of the key-authenticated query API, served publicly at /api/v1/openapi.json.
import type { Config } from '../config.js';
import { DEFAULT_LIMIT, MAX_LIMIT } from './facts.js';
import { SUPPORTED } from './sparql.js';

const error = (description: string) => ({ description, content: { 'application/json': { schema: { $ref: '#/components/schemas/Error' } } } });
const slug = { name: 'slug', in: 'path', required: true, description: 'The listing’s short name, as in its address.', schema: { type: 'string', pattern: '^[a-z0-9-]+$' } };
const refusals = {
  '400': error('The request is not valid; the message says what and where.'),
  '401': error('No key, an unknown key or a revoked key.'),
  '403': error('The key belongs to another listing, or its subscription is not active.'),
  '404': error('The listing has no published version.'),
  '429': { ...error('Rate limit (per key, per minute) or monthly quota reached; see Retry-After.'), headers: { 'Retry-After': { schema: { type: 'integer' }, description: 'Seconds to wait.' } } },
};
const rateHeaders = {
  RateLimit: { description: 'Remaining requests and seconds to the window’s end (IETF draft-ietf-httpapi-ratelimit-headers-08).', schema: { type: 'string' } },
  'RateLimit-Policy': { description: 'The per-key limit of the plan and its window.', schema: { type: 'string' } },
};
const termParam = (name: string, text: string) => ({ name, in: 'query', required: false, description: text, schema: { type: 'string' } });

export function openApiDocument(config: Config): Record<string, unknown> {
  return {
    openapi: '3.1.0',
    info: {
      title: 'Thence query API',
      version: '1.0.0',
      description: 'Entailed facts of a published knowledge base: atomic pattern lookups and single-pattern SPARQL. Facts are as good as the ontology and data the publisher supplied; check the listing’s description before relying on them.',
    },
    servers: [{ url: `${config.publicUrl}/api/v1` }],
    security: [{ apiKey: [] }],
    paths: {
      '/kbs/{slug}/facts': {
        get: {
          summary: 'Entailed facts matching a pattern',
          description: 'Bind any of subject, predicate and object (absolute IRIs; the object may be an N-Triples literal). With all three bound, the answer says whether that fact is entailed.',
          parameters: [
            slug,
            termParam('subject', 'Subject IRI.'),
            termParam('predicate', 'Predicate IRI (rdf:type is http://www.w3.org/1999/02/22-rdf-syntax-ns#type).'),
            termParam('object', 'Object IRI, or a literal in N-Triples form such as "42"^^<http://www.w3.org/2001/XMLSchema#integer>.'),
            { name: 'limit', in: 'query', required: false, schema: { type: 'integer', minimum: 1, maximum: MAX_LIMIT, default: DEFAULT_LIMIT } },
            { name: 'cursor', in: 'query', required: false, description: 'The nextCursor of the previous page.', schema: { type: 'string' } },
          ],
          responses: {
            '200': {
              description: 'A page of facts, or the entailment answer when all three positions are bound.',
              headers: rateHeaders,
              content: { 'application/json': { schema: { oneOf: [{ $ref: '#/components/schemas/FactPage' }, { $ref: '#/components/schemas/EntailmentAnswer' }] } } },
            },
            ...refusals,
          },
        },
      },
      '/kbs/{slug}/sparql': {
        get: {
          summary: 'SPARQL 1.1 Protocol query (GET)',
          description: SUPPORTED,
          parameters: [slug, { name: 'query', in: 'query', required: true, schema: { type: 'string' } }],
          responses: { '200': { description: 'SPARQL 1.1 Query Results JSON.', headers: rateHeaders, content: { 'application/sparql-results+json': { schema: { $ref: '#/components/schemas/SparqlResults' } } } }, ...refusals },
        },
        post: {
          summary: 'SPARQL 1.1 Protocol query (POST)',
          description: SUPPORTED,
          parameters: [slug],
          requestBody: {
            required: true,
            content: {
              'application/sparql-query': { schema: { type: 'string' } },
              'application/x-www-form-urlencoded': { schema: { type: 'object', properties: { query: { type: 'string' } }, required: ['query'] } },
            },
          },
          responses: { '200': { description: 'SPARQL 1.1 Query Results JSON.', headers: rateHeaders, content: { 'application/sparql-results+json': { schema: { $ref: '#/components/schemas/SparqlResults' } } } }, ...refusals, '415': error('Unsupported request body type.') },
        },
      },
      '/openapi.json': { get: { summary: 'This description', security: [], responses: { '200': { description: 'OpenAPI 3.1 document.' } } } },
    },
    components: {
      securitySchemes: { apiKey: { type: 'http', scheme: 'bearer', description: 'A key created on the API keys page: Authorization: Bearer thk_…' } },
      schemas: {
        Fact: { type: 'object', required: ['subject', 'predicate', 'object', 'asserted'], properties: { subject: { type: 'string' }, predicate: { type: 'string' }, object: { type: 'string', description: 'IRI, or a literal in N-Triples form (starts with ").' }, asserted: { type: 'boolean', description: 'Stated in the data (true) or entailed only (false).' } } },
        FactPage: { type: 'object', required: ['kb', 'facts', 'nextCursor'], properties: { kb: { $ref: '#/components/schemas/KbRef' }, pattern: { type: 'object' }, facts: { type: 'array', items: { $ref: '#/components/schemas/Fact' } }, nextCursor: { type: ['string', 'null'] } } },
        EntailmentAnswer: { type: 'object', required: ['kb', 'fact', 'entailed'], properties: { kb: { $ref: '#/components/schemas/KbRef' }, fact: { type: 'object' }, entailed: { type: 'boolean' }, asserted: { type: 'boolean' } } },
        KbRef: { type: 'object', properties: { slug: { type: 'string' }, version: { type: 'integer' } } },
        SparqlResults: {
          type: 'object',
          description: 'W3C SPARQL 1.1 Query Results JSON Format: head.vars with results.bindings (SELECT), or boolean (ASK).',
          properties: { head: { type: 'object', properties: { vars: { type: 'array', items: { type: 'string' } } } }, results: { type: 'object', properties: { bindings: { type: 'array', items: { type: 'object' } } } }, boolean: { type: 'boolean' } },
        },
        Error: { type: 'object', required: ['error'], properties: { error: { type: 'object', required: ['code', 'message'], properties: { code: { type: 'string' }, message: { type: 'string' }, fields: { type: 'object', additionalProperties: { type: 'array', items: { type: 'string' } } } } } } },
      },
    },
  };
}
