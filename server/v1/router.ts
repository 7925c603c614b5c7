// The routes of the key-authenticated query API, served by its own lean app (server/v1/app.ts) before the main app's
// helmet, sessions and JSON parser: a query needs neither a cookie session nor CSRF. Bodies are parsed here per route.
import express, { Router, type NextFunction, type Request, type RequestHandler, type Response } from 'express';
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
  return (req, res, done) => new StepRun(steps, req, res, done).next();
}

/**
 * One request's walk through the steps. A class with a bound method rather than a closure: the server runs under tsx,
 * whose build keeps function names, so a closure named `next` would cost an Object.defineProperty on every request.
 */
class StepRun {
  private at = 0;
  readonly next: NextFunction;

  constructor(private readonly steps: RequestHandler[], private readonly req: Request, private readonly res: Response, private readonly done: NextFunction) {
    this.next = this.advance.bind(this) as NextFunction;
  }

  private advance(error?: unknown): void {
    if (error) return this.done(error); // as the router: any truthy value, 'route' and 'router' included, leaves the chain
    const step = this.steps[this.at++];
    if (!step) return this.done();
    try {
      const result = step(this.req, this.res, this.next) as unknown;
      if (result instanceof Promise) result.catch(this.done);
    } catch (thrown) {
      this.done(thrown);
    }
  }
}

/** Sets the headers every /api/v1 answer carries (see v1Routes). */
export function setApiHeaders(res: Response): void {
  for (let i = 0; i < API_HEADERS.length; i += 2) res.setHeader(API_HEADERS[i], API_HEADERS[i + 1]);
}

/** The query routes' handlers, each built once: the full router, and the two GET query routes for the hot path (server/v1/app.ts). */
export interface QueryRoutes { router: Router; facts: RequestHandler; sparql: RequestHandler }

export function v1Routes(ctx: AppContext): QueryRoutes {
  const router = Router();
  // CORS for browser applications on other sites: the key travels in the Authorization header, never in a cookie, so
  // any origin may call (Fetch standard, CORS protocol; preflight answered here without authentication).
  // The API has its own app, outside helmet (see server/v1/app.ts), so it sets the headers a JSON API needs itself:
  // nosniff, and a policy that lets no answer act as a document (common practice for JSON APIs, from memory: OWASP
  // REST Security Cheat Sheet, "Security headers"). Set with setHeader from one constant list: this runs on every query.
  router.use((req, res, next) => {
    setApiHeaders(res);
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
  const facts = chain(...pipeline, factsHandler(ctx));
  const sparql = sparqlHandler(ctx);
  const sparqlGet = chain(...pipeline, sparql);
  router.get('/kbs/:slug/facts', facts);
  router.get('/kbs/:slug/sparql', sparqlGet);
  router.post('/kbs/:slug/sparql', chain(...bodies, ...pipeline, sparql));
  router.use((req, _res, next) => next(new HttpError(req.method === 'GET' || req.method === 'POST' ? 404 : 405, `No route ${req.method} /api/v1${req.path}. See /api/v1/openapi.json.`)));
  return { router, facts, sparql: sparqlGet };
}
