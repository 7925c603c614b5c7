// The lean Express app that serves /api/v1, dispatched before the main app (server/app.ts): no helmet, session,
// passport, cookie or body parser or X-Powered-By. The two GET query routes are matched by one regular expression in
// the app's own `handle`, before its router: their handlers get the request exactly as Express would hand it to them
// (the app's request and response prototypes, res.locals, req.params, originalUrl and baseUrl), without the router's
// per-request dispatch — its closures, URL parsing and layer walk were a visible share of every query's CPU. Every other
// /api/v1 request (OPTIONS, POST, the OpenAPI document, unknown paths, and any spelling the pattern below does not take:
// upper case, a trailing slash, %-escapes in the slug, HEAD) goes through the router with the same handlers, so answers
// do not change.
import express, { type NextFunction, type Request, type Response } from 'express';
import { IncomingMessage, ServerResponse, type ServerOptions } from 'node:http';
import type { AppContext } from '../context.js';
import { errorHandler, HttpError } from '../http/errors.js';
import { setApiHeaders, v1Routes } from './router.js';

/** The settings both apps share (req.ip and req.protocol read the same behind the same proxy). */
export const TRUST_PROXY = 'loopback';

/** `/api/v1/kbs/<slug>/facts` or `/sparql`, optional query string; the slug as listings allow it (shared/listings.ts). */
const QUERY_ROUTE = /^\/api\/v1\/kbs\/([a-z0-9]+(?:-[a-z0-9]+)*)\/(facts|sparql)(?:\?|$)/;

/** Whether a request target belongs to the query API (Express matches paths case-insensitively, so this does too). */
export function isQueryApiUrl(url: string): boolean {
  return /^\/api\/v1(?:[/?]|$)/i.test(url);
}

type Handle = (req: IncomingMessage, res: ServerResponse, callback?: (error?: unknown) => void) => void;

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
  api.use('/api/v1', routes.router);
  api.use(errorHandler);
  const app = api as unknown as { handle: Handle; request: object; response: object };
  const full = app.handle.bind(api);
  app.handle = (incoming, outgoing, callback) => {
    const match = incoming.method === 'GET' ? QUERY_ROUTE.exec(incoming.url!) : null;
    if (!match) return full(incoming, outgoing, callback);
    // What app.handle and the router set before a handler runs (express/lib/application.js, router/index.js).
    const req = incoming as Request, res = outgoing as Response;
    req.res = res;
    res.req = req;
    Object.setPrototypeOf(req, app.request);
    Object.setPrototypeOf(res, app.response);
    if (!res.locals) res.locals = Object.create(null);
    req.originalUrl = req.url;
    req.baseUrl = '';
    req.params = { slug: match[1]! };
    setApiHeaders(res);
    (match[2] === 'facts' ? routes.facts : routes.sparql)(req, res, afterRoute(req, res));
  };
  return api;
}

/**
 * Where a query route's next() leads: an error goes to the API's error handler, as it would after the router. The
 * route's last step always answers, so next() without an error does not happen; if it did, it would be the router's
 * unmatched-path answer.
 */
function afterRoute(req: Request, res: Response): NextFunction {
  return (error?: unknown) => errorHandler(error || new HttpError(404, `No route ${req.method} ${req.path}. See /api/v1/openapi.json.`), req, res, noop);
}

const noop: NextFunction = () => undefined;
