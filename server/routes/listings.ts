// Public catalogue routes (no sign-in): GET /api/listings and GET /api/listings/:slug — published listings only.
import { Router, type NextFunction, type Request, type Response } from 'express';
import type { AppContext } from '../context.js';
import { publicRoute } from '../auth/guards.js';
import { notFound } from '../http/errors.js';
import { catalogue, publicListing } from '../services/listings.js';

type Handler = (req: Request, res: Response) => Promise<void>;
const wrap = (handler: Handler) => (req: Request, res: Response, next: NextFunction) => void handler(req, res).catch(next);

export function listingsRouter(ctx: AppContext): Router {
  const router = Router();

  router.get('/', publicRoute, wrap(async (req, res) => {
    const q = typeof req.query.q === 'string' ? req.query.q.slice(0, 100) : undefined;
    const tag = typeof req.query.tag === 'string' ? req.query.tag.slice(0, 32) : undefined;
    res.json({ listings: await catalogue(ctx, { q, tag }) });
  }));

  router.get('/:slug', publicRoute, wrap(async (req, res) => {
    const listing = await publicListing(ctx, String(req.params.slug));
    if (!listing) throw notFound('No published listing has that address.');
    res.json({ listing });
  }));

  return router;
}
