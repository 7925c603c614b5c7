// Route guards: every route states who may call it. 401 when signed out, 403 (JSON) when the role is missing.
import type { RequestHandler } from 'express';
import type { Role } from '../../shared/roles.js';
import type { SessionUser } from '../../shared/auth.js';
import { forbidden, unauthenticated } from '../http/errors.js';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    /** req.user is exactly what GET /api/auth/me sends the client (shared/auth.ts), so the two cannot drift apart. */
    // eslint-disable-next-line @typescript-eslint/no-empty-object-type
    interface User extends SessionUser {}
  }
}

/** Anyone may call this route (stated explicitly so every route names its audience). */
export const publicRoute: RequestHandler = (_req, _res, next) => next();

export const requireAuth: RequestHandler = (req, _res, next) => {
  next(req.user ? undefined : unauthenticated());
};

/** Passes when the signed-in user holds at least one of the given roles. */
export function requireRole(...roles: Role[]): RequestHandler {
  return (req, _res, next) => {
    if (!req.user) return next(unauthenticated());
    if (!roles.some((role) => req.user!.roles.includes(role))) {
      return next(forbidden(`This needs the ${roles.join(' or ')} role.`));
    }
    next();
  };
}

export function hasRole(user: Express.User | undefined, role: Role): boolean {
  return !!user && user.roles.includes(role);
}
