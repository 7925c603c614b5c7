// The lean Express app that serves /api/v1, dispatched before the main app (server/app.ts): no helmet, session,
// passport, cookie or body parser or X-Powered-By — and the two GET query routes matched by one regular
// expression in the app's first middleware, instead of the main router's mount, the API router's header layer and
// route matching, which cost a visible share of every query's CPU. Every other /api/v1 request (OPTIONS, POST,
// the OpenAPI document, unknown paths, and any spelling the pattern below does not take: upper case, a trailing
// slash, %-escapes in the slug, HEAD) goes through the full router with the same handlers, so answers do not change.
import express, { type Request } from 'express';
import { IncomingMessage, ServerResponse, type ServerOptions } from 'node:http';
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

/**
 * Options for http.createServer that build every request and response with the query API app's Express prototypes
 * already in place, so the Object.setPrototypeOf of app.handle finds the prototype it sets and changes nothing.
 * Switching the prototype of each fresh request and response made V8 keep (promote) most of what every request
 * allocated, and GC and the slower property access on the switched objects cost more CPU than the rest of Express
 * (bare Express: 0.07 → 0.02 ms per request, see server/marketplace.md). Requests for the main app are switched to its
 * prototypes by its own handle, as before. Node's IncomingMessage and ServerResponse are plain constructor functions,
 * called here on the new object as Node's own subclasses do; should a Node release make them classes, the defaults stay.
 */
export function apiServerOptions(api: express.Express): Pick<ServerOptions, 'IncomingMessage' | 'ServerResponse'> {
  if (/^class\b/.test(Function.prototype.toString.call(IncomingMessage)) || /^class\b/.test(Function.prototype.toString.call(ServerResponse))) return {};
  const app = api as unknown as { request: object; response: object };
  const ApiRequest = function (this: IncomingMessage, socket: unknown) {
    (IncomingMessage as unknown as (this: unknown, socket: unknown) => void).call(this, socket);
  };
  ApiRequest.prototype = app.request;
  const ApiResponse = function (this: ServerResponse, req: unknown, options: unknown) {
    (ServerResponse as unknown as (this: unknown, req: unknown, options: unknown) => void).call(this, req, options);
  };
  ApiResponse.prototype = app.response;
  return { IncomingMessage: ApiRequest as unknown as typeof IncomingMessage, ServerResponse: ApiResponse as unknown as typeof ServerResponse };
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
