// /api/market plans: public plan lists per published listing; publishers manage the plans of their own listings.
import { Router } from 'express';
import type { AppContext } from '../context.js';
import { publicRoute, requireRole } from '../auth/guards.js';
import { parseBody } from '../http/validate.js';
import { notFound } from '../http/errors.js';
import { planInputSchema } from '../../shared/market.js';
import { archivePlan, createPlan, listingPlans, publicPlans, updatePlan } from '../services/plans.js';

export function plansRouter(ctx: AppContext): Router {
  const router = Router();

  router.get('/listings/:slug/plans', publicRoute, async (req, res) => {
    const plans = await publicPlans(ctx, req.params.slug as string);
    if (!plans) throw notFound('No published listing has this name.');
    res.json({ plans });
  });

  router.get('/publisher/listings/:listingId/plans', requireRole('publisher', 'admin'), async (req, res) => {
    res.json({ plans: await listingPlans(ctx, req.user!, req.params.listingId as string) });
  });

  router.post('/publisher/listings/:listingId/plans', requireRole('publisher', 'admin'), async (req, res) => {
    const input = parseBody(planInputSchema, req.body, 'plan');
    res.status(201).json({ plan: await createPlan(ctx, req.user!, req.params.listingId as string, input) });
  });

  router.put('/publisher/plans/:planId', requireRole('publisher', 'admin'), async (req, res) => {
    const input = parseBody(planInputSchema, req.body, 'plan');
    res.json({ plan: await updatePlan(ctx, req.user!, req.params.planId as string, input) });
  });

  router.delete('/publisher/plans/:planId', requireRole('publisher', 'admin'), async (req, res) => {
    res.json({ plan: await archivePlan(ctx, req.user!, req.params.planId as string) });
  });

  return router;
}
