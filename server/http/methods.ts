// 405 for a known path asked with a method it does not serve: walks the app's router stack (Express 5 / router 2)
// to find every route matching the path and answers with their methods in the Allow header (RFC 9110 §15.5.6).
import type { Express, RequestHandler } from 'express';
import { HttpError } from './errors.js';

interface RouteLike { methods: Record<string, boolean>; _methods?: () => string[] }
interface LayerLike {
  route?: RouteLike;
  handle: { stack?: LayerLike[] };
  match(path: string): false | { path: string };
}

/** Collects the methods of every route in `stack` whose pattern matches `path` (descending into mounted routers). */
function collectMethods(stack: LayerLike[], path: string, into: Set<string>): void {
  for (const layer of stack) {
    const matched = layer.match(path);
    if (!matched) continue;
    if (layer.route) {
      for (const method of Object.keys(layer.route.methods)) if (method !== '_all') into.add(method.toUpperCase());
      if (layer.route.methods.get) into.add('HEAD');
    } else if (Array.isArray(layer.handle.stack)) {
      const rest = path.slice(matched.path.length);
      collectMethods(layer.handle.stack, rest.startsWith('/') ? rest : `/${rest}`, into);
    }
  }
}

/** Mount after every router: requests that reach it matched no route, so a path with routes means a wrong method. */
export function methodNotAllowed(app: Express): RequestHandler {
  return (req, _res, next) => {
    const stack = (app as unknown as { router: { stack: LayerLike[] } }).router.stack;
    const allowed = new Set<string>();
    collectMethods(stack, req.originalUrl.split('?')[0], allowed);
    if (allowed.size === 0 || allowed.has(req.method)) return next();
    const list = [...allowed].sort().join(', ');
    next(new HttpError(405, `${req.method} is not allowed on ${req.originalUrl.split('?')[0]}; it answers ${list}.`, 'method_not_allowed', undefined, { Allow: list }));
  };
}
