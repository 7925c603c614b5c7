// The lean Express app that serves /api/v1, dispatched before the main app (server/app.ts): no helmet, session,
// passport, cookie or body parser or X-Powered-By — and the two GET query routes matched by one regular
// expression in the app's first middleware, instead of the main router's mount, the API router's header layer and
// route matching, which cost a visible share of every query's CPU. Every other /api/v1 request (OPTIONS, POST,
// the OpenAPI document, unknown paths, and any spelling the pattern below does not take: upper case, a trailing
// slash, %-escapes in the slug, HEAD) goes through the full router with the same handlers, so answers do not change.
import express, { type Request } from 'express';
import type { AppContext } from '../context.js';
import { errorHandler } from '../http/errors.js';
import { setApiHeaders, v1Routes } from './router.js';

/** The settings both apps share (req.ip and req.protocol read the same behind the same proxy). */
export const TRUST_PROXY = 'loopback';

/** `/api/v1/kbs/<slug>/facts` or `/sparql`, optional query string; the slug as listings allow it (shared/listings.ts). */
const QUERY_ROUTE = /^\/api\/v1\/kbs\/([a-z0-9]+(?:-[a-z0-9]+)*)\/(facts|sparql)(?:\?|$)/;

/** Whether a request target belongs to the query API (Express matches paths case-insensitively, so this does too). */
export function isQueryApiUrl(url: string): boolean {
  return /^\/api\/v1(?:[/?]|$)/i.test(url);
}

export function queryApiApp(ctx: AppContext): express.Express {
  const api = express();
  api.disable('x-powered-by');
  // ETags stay as in the main app: query answers are written by sendJson (no ETag), the OpenAPI document keeps its own.
  api.set('trust proxy', TRUST_PROXY);
  const routes = v1Routes(ctx);
  api.use((req: Request, res, next) => {
    const match = req.method === 'GET' ? QUERY_ROUTE.exec(req.url) : null;
    if (!match) return next();
    setApiHeaders(res);
    req.params = { slug: match[1]! };
    return (match[2] === 'facts' ? routes.facts : routes.sparql)(req, res, next);
  });
  api.use('/api/v1', routes.router);
  api.use(errorHandler);
  return api;
}
