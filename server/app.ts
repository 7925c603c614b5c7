// The Express app factory, separate from listen() so tests drive it with supertest.
import express from 'express';
import session from 'express-session';
import connectPgSimple from 'connect-pg-simple';
import helmet from 'helmet';
import cookieParser from 'cookie-parser';
import fs from 'node:fs';
import path from 'node:path';
import http, { type IncomingMessage, type ServerResponse } from 'node:http';
import type { AppContext } from './context.js';
import { setupPassport } from './auth/passport.js';
import { createCsrf } from './http/csrf.js';
import { errorHandler, HttpError, notFoundHandler } from './http/errors.js';
import { mountEarlyRoutes, mountRoutes } from './routes/index.js';
import { apiServerOptions, isQueryApiUrl, queryApiApp, TRUST_PROXY } from './v1/app.js';
import { methodNotAllowed } from './http/methods.js';

const queryApis = new WeakMap<express.Express, express.Express>();

export function createApp(ctx: AppContext): express.Express {
  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', TRUST_PROXY);
  const api = queryApiApp(ctx);
  queryApis.set(app, api);
  dispatchQueryApi(app, api);
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          'default-src': ["'self'"],
          // Element Plus sets inline style attributes at run time.
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:'],
          'font-src': ["'self'"],
          'connect-src': ["'self'"],
          'form-action': ["'self'", ...formTargets(ctx)],
          'upgrade-insecure-requests': ctx.config.cookieSecure ? [] : null,
        },
      },
    }),
  );

  mountEarlyRoutes(app, ctx);

  app.use(express.json({ limit: '1mb' }));
  app.use(express.urlencoded({ extended: false, limit: '1mb' }));
  // csrf-csrf reads its double-submit cookie from req.cookies.
  app.use(cookieParser());

  const PgStore = connectPgSimple(session);
  app.use(
    session({
      name: ctx.config.cookieSecure ? '__Host-thence.sid' : 'thence.sid',
      secret: ctx.config.sessionSecret,
      store: new PgStore({ pool: ctx.pool, tableName: 'session', createTableIfMissing: false }),
      resave: false,
      saveUninitialized: false,
      rolling: true,
      cookie: { httpOnly: true, sameSite: 'lax', secure: ctx.config.cookieSecure, maxAge: 14 * 24 * 3600 * 1000 },
    }),
  );
  const passport = setupPassport(ctx);
  app.use(passport.initialize());
  app.use(passport.session());

  const csrf = createCsrf(ctx.config);
  app.get('/api/csrf', csrf.issue);
  app.use('/api', csrf.protect);

  mountRoutes(app, ctx);

  app.use('/api', methodNotAllowed(app));
  app.use('/api', notFoundHandler);
  serveClient(app, ctx);
  app.use(notFoundHandler);
  app.use(errorHandler);
  return app;
}

/** The HTTP server for an app from createApp: as app.listen makes it, with requests built for the query API (apiServerOptions). */
export function createServer(app: express.Express): http.Server {
  const api = queryApis.get(app);
  return http.createServer(api ? apiServerOptions(api) : {}, app);
}

type Handle = (req: IncomingMessage, res: ServerResponse, callback?: (error?: unknown) => void) => void;

/**
 * Sends /api/v1 requests to the query API's own app before the main app sees them: an Express app, called by the HTTP
 * server, runs its `handle`, so replacing it here dispatches without the main app's own layers (its final handler,
 * prototype switch and router), which every query would otherwise pay for before reaching its first step.
 */
function dispatchQueryApi(app: express.Express, api: express.Express): void {
  const target = app as unknown as { handle: Handle };
  const main = target.handle.bind(app);
  const query = (api as unknown as { handle: Handle }).handle.bind(api);
  target.handle = (req, res, callback) => (isQueryApiUrl(req.url ?? '/') ? query(req, res, callback) : main(req, res, callback));
}

function formTargets(ctx: AppContext): string[] {
  const targets: string[] = [];
  if (ctx.config.google.issuer) targets.push(new URL(ctx.config.google.issuer).origin);
  else targets.push('https://accounts.google.com');
  return targets;
}

/** Serves the built client with history-mode fallback; only GET and HEAD reach it. */
function serveClient(app: express.Express, ctx: AppContext): void {
  const dist = path.resolve(ctx.config.clientDist);
  const index = path.join(dist, 'index.html');
  app.use(express.static(dist, { index: false, maxAge: '1h' }));
  app.use((req, res, next) => {
    if (req.method !== 'GET' && req.method !== 'HEAD') return next(new HttpError(405, `${req.method} is not allowed on ${req.path}.`));
    if (!fs.existsSync(index)) return next(new HttpError(404, 'The client is not built; run `npm run build`.'));
    res.sendFile(index);
  });
}
