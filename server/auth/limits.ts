// Rate limits on sign-in and on routes that send mail (express-rate-limit, in-memory per app instance).
// A limited request gets 429 in the one JSON error shape, with RateLimit-* headers (IETF draft-8) and Retry-After.
import type { Request, RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import { HttpError } from '../http/errors.js';

const emailOf = (req: Request): string => String((req.body as { email?: unknown } | undefined)?.email ?? '').trim().toLowerCase();

function limiter(windowMs: number, limit: number, key: (req: Request) => string, message: string, skipSuccessfulRequests = false): RequestHandler {
  return rateLimit({
    windowMs,
    limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    skipSuccessfulRequests,
    keyGenerator: key,
    handler: (_req, _res, next) => next(new HttpError(429, message, 'rate_limited')),
  });
}

/**
 * Sign-in: 10 failed attempts per 15 minutes per address and client IP (OWASP Authentication Cheat Sheet,
 * common practice). Successful sign-ins do not count, so the owner is not locked out by their own typos.
 */
export function signInLimiter(): RequestHandler {
  return limiter(15 * 60 * 1000, 10, (req) => `${ipKeyGenerator(req.ip ?? '')}|${emailOf(req)}`, 'Too many sign-in attempts for this address; wait 15 minutes and try again.', true);
}

/** Routes that send mail to an address: 5 per hour per address and client IP, so nobody floods an inbox. */
export function mailLimiter(): RequestHandler {
  return limiter(60 * 60 * 1000, 5, (req) => `${ipKeyGenerator(req.ip ?? '')}|${req.user?.email ?? emailOf(req)}`, 'Too many mails asked for this address; wait an hour and try again.');
}

/** Sign-ups: 30 per hour per client IP, enough for a classroom behind one address, too few for a script. */
export function signUpLimiter(): RequestHandler {
  return limiter(60 * 60 * 1000, 30, (req) => ipKeyGenerator(req.ip ?? ''), 'Too many sign-ups from this address; try again in an hour.');
}
