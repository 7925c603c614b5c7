// A listening app wired to its own Stripe stand-in (ephemeral ports on loopback): the SDK is pointed at the stand-in by
// configuration only, and the app's webhook endpoint is registered through the SDK, as one would on Stripe.
import http from 'node:http';
import type { Express } from 'express';
import { createTestApp, type TestApp } from './app.js';
import { startStripeStandIn, type StripeStandIn } from '../../server/fakes/stripe.js';
import { stripeClient } from '../../server/services/stripe.js';
import { HANDLED_EVENTS } from '../../server/services/billing.js';
import { stopMeter } from '../../server/services/metering.js';

export interface PaymentsHarness extends TestApp {
  standIn: StripeStandIn;
  baseUrl: string;
  webhookSecret: string;
  close(): Promise<void>;
}

export async function startPaymentsHarness(): Promise<PaymentsHarness> {
  const secretKey = 'sk_test_thence_harness';
  const webhookSecret = 'whsec_thence_harness';
  const standIn = await startStripeStandIn({ port: 0, secretKey, webhookSecret, webhookUrl: null, stateFile: null });
  let handler: Express | null = null;
  const server = http.createServer((req, res) => (handler ? handler(req, res) : res.writeHead(503).end()));
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const baseUrl = `http://127.0.0.1:${(server.address() as { port: number }).port}`;
  const port = Number(new URL(standIn.url).port);
  const t = await createTestApp({ publicUrl: baseUrl, stripe: { secretKey, webhookSecret, host: '127.0.0.1', port, protocol: 'http' } });
  handler = t.app;
  const endpoint = await stripeClient(t.ctx.config).webhookEndpoints.create({ url: `${baseUrl}/api/webhooks/stripe`, enabled_events: [...HANDLED_EVENTS] });
  return {
    ...t,
    standIn,
    baseUrl,
    webhookSecret,
    close: async () => {
      await stripeClient(t.ctx.config).webhookEndpoints.del(endpoint.id).catch(() => undefined);
      await stopMeter(t.ctx);
      await new Promise<void>((resolve) => server.close(() => resolve()));
      server.closeAllConnections?.();
      await t.close();
      await standIn.close();
    },
  };
}
