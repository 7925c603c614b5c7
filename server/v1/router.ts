// The key-authenticated query API. Mounted first (before helmet, sessions and the JSON parser): a query needs neither
// a cookie session nor CSRF, and skipping them keeps the hot path short. Bodies are parsed here per route.
import express, { Router, type RequestHandler } from 'express';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/errors.js';
import { apiRateLimiter } from '../services/rateLimit.js';
import { authenticateKey, enforceQuota, resolveListing } from './pipeline.js';
import { factsHandler } from './facts.js';
import { sparqlHandler } from './sparql.js';
import { openApiDocument } from './openapi.js';

const API_HEADERS = [
  'Access-Control-Allow-Origin', '*',
  'Access-Control-Expose-Headers', 'RateLimit, RateLimit-Policy, Retry-After',
  'X-Content-Type-Options', 'nosniff',
  'Content-Security-Policy', "default-src 'none'; frame-ancestors 'none'",
  'Referrer-Policy', 'no-referrer',
] as const;

/**
 * The steps of a route as one handler: each step gets the same (req, res, next) contract as under the router (next()
 * runs the following step, next(error) leaves for the error handler, a rejected promise counts as next(error)), without
 * a router layer, path match and dispatch per step — the steps run on every query.
 */
export function chain(...steps: RequestHandler[]): RequestHandler {
  return (req, res, done) => {
    let at = 0;
    const next = (error?: unknown): void => {
      if (error) return done(error); // as the router: any truthy value, 'route' and 'router' included, leaves the chain
      const step = steps[at++];
      if (!step) return done();
      try {
        const result = step(req, res, next) as unknown;
        if (result instanceof Promise) result.catch(done);
      } catch (thrown) {
        done(thrown);
      }
    };
    next();
  };
}

export function v1Router(ctx: AppContext): Router {
  const router = Router();
  // CORS for browser applications on other sites: the key travels in the Authorization header, never in a cookie, so
  // any origin may call (Fetch standard, CORS protocol; preflight answered here without authentication).
  // The router is mounted before helmet (see server/routes/index.ts), so it sets the headers a JSON API needs itself:
  // nosniff, and a policy that lets no answer act as a document (common practice for JSON APIs, from memory: OWASP
  // REST Security Cheat Sheet, "Security headers"). Set with setHeader from one constant list: this runs on every query.
  router.use((req, res, next) => {
    for (let i = 0; i < API_HEADERS.length; i += 2) res.setHeader(API_HEADERS[i], API_HEADERS[i + 1]);
    if (req.method !== 'OPTIONS') return next();
    res.setHeader('Access-Control-Allow-Methods', 'GET, POST');
    res.setHeader('Access-Control-Allow-Headers', 'Authorization, Content-Type, Accept');
    res.setHeader('Access-Control-Max-Age', '600');
    res.status(204).end();
  });
  const document = JSON.stringify(openApiDocument(ctx.config));
  router.get('/openapi.json', (_req, res) => {
    res.type('application/json').send(document);
  });
  const pipeline = [authenticateKey(ctx), resolveListing(ctx), apiRateLimiter(ctx.pool), enforceQuota(ctx)];
  const bodies = [express.text({ type: 'application/sparql-query', limit: '64kb' }), express.urlencoded({ extended: false, limit: '64kb' })];
  router.get('/kbs/:slug/facts', chain(...pipeline, factsHandler(ctx)));
  router.get('/kbs/:slug/sparql', chain(...pipeline, sparqlHandler(ctx)));
  router.post('/kbs/:slug/sparql', chain(...bodies, ...pipeline, sparqlHandler(ctx)));
  router.use((req, _res, next) => next(new HttpError(req.method === 'GET' || req.method === 'POST' ? 404 : 405, `No route ${req.method} /api/v1${req.path}. See /api/v1/openapi.json.`)));
  return router;
}
