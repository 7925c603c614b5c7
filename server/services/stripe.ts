// The official Stripe SDK, configured from config.stripe. With STRIPE_API_HOST set it talks to the local stand-in;
// unset, the same code talks to api.stripe.com. Configuration only: no behaviour differs between the two.
import Stripe from 'stripe';
import type { Config } from '../config.js';

const clients = new Map<string, Stripe>();

export function stripeClient(config: Config): Stripe {
  const { secretKey, host, port, protocol } = config.stripe;
  if (!secretKey) throw new Error('Payments are not configured: set STRIPE_SECRET_KEY (the start and test scripts point it at the local stand-in).');
  const cacheKey = `${secretKey}|${host}|${port}|${protocol}`;
  let client = clients.get(cacheKey);
  if (!client) {
    client = new Stripe(secretKey, {
      ...(host ? { host, port: port ?? (protocol === 'http' ? 80 : 443), protocol } : {}),
      maxNetworkRetries: 2,
      timeout: 20_000,
      telemetry: false,
    });
    clients.set(cacheKey, client);
  }
  return client;
}

/** Verifies a webhook's signature on the raw body (Stripe-Signature header) and returns the event; throws when it fails. */
export function verifyWebhook(config: Config, rawBody: Buffer | string, signature: string | undefined): Stripe.Event {
  if (!config.stripe.webhookSecret) throw new Error('STRIPE_WEBHOOK_SECRET is not set.');
  return Stripe.webhooks.constructEvent(rawBody, signature ?? '', config.stripe.webhookSecret);
}

export type { Stripe };
