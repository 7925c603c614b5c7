// CSRF protection for cookie-authenticated writes (double-submit cookie bound to the session, via csrf-csrf).
import type { RequestHandler } from 'express';
import { doubleCsrf } from 'csrf-csrf';
import type { Config } from '../config.js';

/** Paths not authenticated by cookie: API keys (Bearer) and signed webhooks need no CSRF token. */
const EXEMPT = [/^\/api\/v1\//, /^\/api\/webhooks\//];

export function createCsrf(config: Config): { protect: RequestHandler; issue: RequestHandler } {
  const { doubleCsrfProtection, generateCsrfToken } = doubleCsrf({
    getSecret: () => config.sessionSecret,
    getSessionIdentifier: (req) => req.sessionID ?? '',
    cookieName: config.cookieSecure ? '__Host-thence.csrf' : 'thence.csrf',
    cookieOptions: { sameSite: 'lax', secure: config.cookieSecure, httpOnly: true, path: '/' },
    getCsrfTokenFromRequest: (req) => req.headers['x-csrf-token'] as string | undefined,
  });
  const protect: RequestHandler = (req, res, next) => {
    if (EXEMPT.some((pattern) => pattern.test(req.path))) return next();
    doubleCsrfProtection(req, res, next);
  };
  /** GET /api/csrf → { token }: the client sends it back in the X-CSRF-Token header on every write. */
  const issue: RequestHandler = (req, res) => {
    // The token is bound to the session id; an anonymous session is only kept (and its cookie sent) once it holds
    // something, so mark it, or the next request would get a new id and the token would never match.
    const session = req.session as typeof req.session & { csrfIssuedAt?: number };
    if (session && !req.user) session.csrfIssuedAt ??= Date.now();
    res.json({ token: generateCsrfToken(req, res, { overwrite: false }) });
  };
  return { protect, issue };
}
