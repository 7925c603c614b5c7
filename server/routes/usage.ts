// /api/market/usage: the subscriber's usage, the publisher's usage and revenue (JSON and CSV), and the admin's view of all.
import { Router } from 'express';
import type { AppContext } from '../context.js';
import { requireAuth, requireRole } from '../auth/guards.js';
import { publisherUsage, publisherUsageCsv, rangeOf, subscriberUsage } from '../services/usage.js';

export function usageRouter(ctx: AppContext): Router {
  const router = Router();

  router.get('/mine', requireAuth, async (req, res) => {
    res.json(await subscriberUsage(ctx, req.user!.id, rangeOf(req.query)));
  });

  router.get('/publisher', requireRole('publisher', 'admin'), async (req, res) => {
    res.json(await publisherUsage(ctx, req.user!.id, rangeOf(req.query)));
  });

  router.get('/publisher.csv', requireRole('publisher', 'admin'), async (req, res) => {
    const usage = await publisherUsage(ctx, req.user!.id, rangeOf(req.query));
    res.type('text/csv; charset=utf-8').attachment('thence-usage.csv').send(publisherUsageCsv(usage));
  });

  router.get('/all', requireRole('admin'), async (req, res) => {
    res.json(await publisherUsage(ctx, null, rangeOf(req.query)));
  });

  router.get('/all.csv', requireRole('admin'), async (req, res) => {
    const usage = await publisherUsage(ctx, null, rangeOf(req.query));
    res.type('text/csv; charset=utf-8').attachment('thence-usage-all.csv').send(publisherUsageCsv(usage));
  });

  return router;
}
