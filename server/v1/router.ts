// The key-authenticated query API. Mounted among the early routes (before sessions and the JSON parser): a query needs
// neither a cookie session nor CSRF, and skipping them keeps the hot path short. Bodies are parsed here per route.
import express, { Router } from 'express';
import type { AppContext } from '../context.js';
import { HttpError } from '../http/errors.js';
import { apiRateLimiter } from '../services/rateLimit.js';
import { authenticateKey, enforceQuota, resolveListing } from './pipeline.js';
import { factsHandler } from './facts.js';
import { sparqlHandler } from './sparql.js';
import { openApiDocument } from './openapi.js';

export function v1Router(ctx: AppContext): Router {
  const router = Router();
  // CORS for browser applications on other sites: the key travels in the Authorization header, never in a cookie, so
  // any origin may call (Fetch standard, CORS protocol; preflight answered here without authentication).
  router.use((req, res, next) => {
    res.set('Access-Control-Allow-Origin', '*');
    res.set('Access-Control-Expose-Headers', 'RateLimit, RateLimit-Policy, Retry-After');
    if (req.method !== 'OPTIONS') return next();
    res.set('Access-Control-Allow-Methods', 'GET, POST');
    res.set('Access-Control-Allow-Headers', 'Authorization, Content-Type, Accept');
    res.set('Access-Control-Max-Age', '600');
    res.status(204).end();
  });
  const document = JSON.stringify(openApiDocument(ctx.config));
  router.get('/openapi.json', (_req, res) => {
    res.type('application/json').send(document);
  });
  const pipeline = [authenticateKey(ctx), resolveListing(ctx), apiRateLimiter(ctx.pool), enforceQuota(ctx)];
  const bodies = [express.text({ type: 'application/sparql-query', limit: '64kb' }), express.urlencoded({ extended: false, limit: '64kb' })];
  router.get('/kbs/:slug/facts', ...pipeline, factsHandler(ctx));
  router.get('/kbs/:slug/sparql', ...pipeline, sparqlHandler(ctx));
  router.post('/kbs/:slug/sparql', ...bodies, ...pipeline, sparqlHandler(ctx));
  router.use((req, _res, next) => next(new HttpError(req.method === 'GET' || req.method === 'POST' ? 404 : 405, `No route ${req.method} /api/v1${req.path}. See /api/v1/openapi.json.`)));
  return router;
}
