// /api/market/subscriptions: subscribe (free at once, paid through checkout), change plan, cancel, resume, checkout sync.
import { Router } from 'express';
import type { AppContext } from '../context.js';
import { requireAuth } from '../auth/guards.js';
import { parseBody } from '../http/validate.js';
import { notFound } from '../http/errors.js';
import { cancelSchema, changePlanSchema, subscribeSchema } from '../../shared/market.js';
import { cancelSubscription, changePlan, mySubscriptions, resumeSubscription, subscribe } from '../services/subscriptions.js';
import { syncCheckout } from '../services/billing.js';

export function subscriptionsRouter(ctx: AppContext): Router {
  const router = Router();

  router.get('/', requireAuth, async (req, res) => {
    res.json({ subscriptions: await mySubscriptions(ctx, req.user!.id) });
  });

  router.post('/', requireAuth, async (req, res) => {
    const { planId } = parseBody(subscribeSchema, req.body, 'subscription');
    const result = await subscribe(ctx, req.user!, planId);
    res.status(result.subscription ? 201 : 200).json(result);
  });

  router.post('/checkout/:sessionId/sync', requireAuth, async (req, res) => {
    const subscription = await syncCheckout(ctx, req.user!, req.params.sessionId as string);
    if (!subscription) throw notFound('No checkout of yours has this id.');
    res.json({ subscription });
  });

  router.put('/:id/plan', requireAuth, async (req, res) => {
    const { planId } = parseBody(changePlanSchema, req.body, 'plan change');
    res.json(await changePlan(ctx, req.user!, req.params.id as string, planId));
  });

  router.post('/:id/cancel', requireAuth, async (req, res) => {
    const { when } = parseBody(cancelSchema, req.body, 'cancellation');
    res.json({ subscription: await cancelSubscription(ctx, req.user!, req.params.id as string, when) });
  });

  router.post('/:id/resume', requireAuth, async (req, res) => {
    res.json({ subscription: await resumeSubscription(ctx, req.user!, req.params.id as string) });
  });

  return router;
}
