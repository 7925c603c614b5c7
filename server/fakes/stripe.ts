// The local Stripe stand-in: a stateful HTTP server on 127.0.0.1:STRIPE_STANDIN_PORT speaking Stripe's REST API for the
// calls Thence makes (products, prices, customers, checkout sessions, subscriptions, invoices, events, webhook endpoints),
// a hosted-checkout page, and a small control surface under /_standin/ for tests (renewals, failed payments).
// Subscription price changes take effect at once without proration (proration_behavior is accepted and ignored).
import express, { type Request, type Response, type NextFunction } from 'express';
import type { Server } from 'node:http';
import fs from 'node:fs';
import path from 'node:path';
import { checkoutPage, StripeBilling } from './stripeBilling.js';
import { bool, decodeForm, integer, list, metadataOf, newId, now, paramInvalid, paramMissing, publicView, StripeAccount, StripeStandInError, text, type Obj } from './stripeState.js';

export interface StripeStandIn { close(): Promise<void>; url: string; account: StripeAccount; billing: StripeBilling }

type Handler = (params: Record<string, string>, body: Record<string, unknown>, query: Record<string, unknown>) => Promise<unknown> | unknown;

export async function startStripeStandIn(options: { port?: number; secretKey?: string; webhookSecret?: string; webhookUrl?: string | null; stateFile?: string | null } = {}): Promise<StripeStandIn> {
  const port = options.port ?? Number(process.env.STRIPE_STANDIN_PORT ?? 8712);
  const secretKey = options.secretKey ?? process.env.STRIPE_SECRET_KEY ?? 'sk_test_thence_local';
  const webhookSecret = options.webhookSecret ?? process.env.STRIPE_WEBHOOK_SECRET ?? 'whsec_thence_local';
  // Without a registered endpoint, events go to THENCE_WEBHOOK_URL or the app's public URL (set by `npm start`).
  const defaultWebhookUrl = options.webhookUrl !== undefined ? options.webhookUrl : process.env.THENCE_WEBHOOK_URL ?? (process.env.PUBLIC_URL ? `${process.env.PUBLIC_URL.replace(/\/$/, '')}/api/webhooks/stripe` : null);
  let origin = `http://127.0.0.1:${port}`;
  const account = new StripeAccount();
  // State file: the demo keeps its products, prices and subscriptions across restarts (the test run starts from an empty folder).
  const stateFile = options.stateFile !== undefined ? options.stateFile : path.join(process.env.THENCE_DATA_DIR ?? '.data', 'stripe-standin.json');
  if (stateFile && fs.existsSync(stateFile)) {
    try {
      account.restore(fs.readFileSync(stateFile, 'utf8'));
    } catch (error) {
      console.error(`stripe stand-in: ignoring unreadable state file ${stateFile}: ${(error as Error).message}`);
    }
  }
  let saveTimer: NodeJS.Timeout | null = null;
  const save = () => {
    if (!stateFile || saveTimer) return;
    saveTimer = setTimeout(() => {
      saveTimer = null;
      fs.mkdirSync(path.dirname(stateFile), { recursive: true });
      fs.writeFileSync(`${stateFile}.tmp`, account.snapshot());
      fs.renameSync(`${stateFile}.tmp`, stateFile);
    }, 200);
  };
  const billing = new StripeBilling(account, webhookSecret, defaultWebhookUrl);
  const app = express();
  app.disable('x-powered-by');
  app.use((req, res, next) => {
    if (req.method !== 'GET') res.on('finish', save);
    next();
  });
  app.use(express.text({ type: () => true, limit: '1mb' }));

  const api = express.Router();
  api.use((req, _res, next) => {
    const auth = req.get('authorization') ?? '';
    const key = auth.startsWith('Bearer ') ? auth.slice(7) : auth.startsWith('Basic ') ? Buffer.from(auth.slice(6), 'base64').toString().replace(/:$/, '') : '';
    if (!key) return next(new StripeStandInError(401, 'You did not provide an API key. You need to provide your API key in the Authorization header, using Bearer auth (e.g. \'Authorization: Bearer YOUR_SECRET_KEY\').', 'invalid_request_error'));
    if (key !== secretKey) return next(new StripeStandInError(401, `Invalid API Key provided: ${key.slice(0, 8)}${'*'.repeat(Math.max(0, key.length - 12))}${key.slice(-4)}`, 'invalid_request_error', 'api_key_invalid'));
    next();
  });

  const route = (method: 'get' | 'post' | 'delete', path: string, handler: Handler) => {
    api[method](path, async (req: Request, res: Response, next: NextFunction) => {
      try {
        const body = method === 'post' ? decodeForm(typeof req.body === 'string' ? req.body : '') : {};
        const query = decodeForm(new URL(req.originalUrl, origin).search.slice(1));
        const idem = method === 'post' ? req.get('idempotency-key') : undefined;
        const slot = idem ? `${req.path}|${idem}` : null;
        const fingerprint = typeof req.body === 'string' ? req.body : '';
        if (slot) {
          const seen = account.idempotent.get(slot);
          if (seen) {
            if (seen.fingerprint !== fingerprint) throw new StripeStandInError(400, `Keys for idempotent requests can only be used with the same parameters they were first used with. Try using a key other than '${idem}' if you meant to execute a different request.`, 'idempotency_error');
            res.set('Idempotent-Replayed', 'true');
            return res.status(seen.status).json(seen.body);
          }
        }
        const result = await handler(req.params as Record<string, string>, body, query);
        const out = result && typeof result === 'object' && 'object' in result && (result as Obj).object !== 'list' ? publicView(result as Obj) : result;
        if (slot) account.idempotent.set(slot, { fingerprint, status: 200, body: out });
        res.set('Request-Id', newId('req')).json(out);
      } catch (error) {
        next(error);
      }
    });
  };

  // Products and prices: what saving a paid plan creates.
  route('post', '/products', (_p, b) => account.put({ id: newId('prod'), object: 'product', created: now(), active: true, name: text(b.name, 'name')!, description: text(b.description, 'description', false) ?? null, metadata: metadataOf(b.metadata), default_price: null, livemode: false, updated: now() }));
  route('get', '/products', (_p, _b, q) => list(account.all('product'), q, '/v1/products'));
  route('get', '/products/:id', (p) => account.get('product', p.id));
  route('post', '/products/:id', (p, b) => {
    const product = account.get('product', p.id);
    if (b.name !== undefined) product.name = text(b.name, 'name');
    if (b.description !== undefined) product.description = b.description || null;
    if (b.active !== undefined) product.active = bool(b.active);
    if (b.metadata !== undefined) product.metadata = { ...(product.metadata as object), ...metadataOf(b.metadata) };
    product.updated = now();
    return product;
  });
  route('post', '/prices', (_p, b) => {
    const product = account.get('product', text(b.product, 'product')!);
    const currency = text(b.currency, 'currency')!.toLowerCase();
    if (!/^[a-z]{3}$/.test(currency)) throw paramInvalid('currency', `Invalid currency: ${currency}.`);
    const recurring = b.recurring as Record<string, unknown> | undefined;
    if (recurring && !['day', 'week', 'month', 'year'].includes(String(recurring.interval))) throw paramInvalid('recurring[interval]', 'Invalid recurring[interval]: must be one of day, month, week, or year');
    return account.put({ id: newId('price'), object: 'price', created: now(), active: true, currency, unit_amount: integer(b.unit_amount, 'unit_amount')!, product: product.id, type: recurring ? 'recurring' : 'one_time', recurring: recurring ? { interval: recurring.interval, interval_count: Number(recurring.interval_count ?? 1), usage_type: 'licensed' } : null, metadata: metadataOf(b.metadata), nickname: b.nickname ?? null, billing_scheme: 'per_unit', livemode: false });
  });
  route('get', '/prices', (_p, _b, q) => list(account.all('price').filter((x) => !q.product || x.product === q.product), q, '/v1/prices'));
  route('get', '/prices/:id', (p) => account.get('price', p.id));
  route('post', '/prices/:id', (p, b) => {
    const price = account.get('price', p.id);
    if (b.active !== undefined) price.active = bool(b.active);
    if (b.metadata !== undefined) price.metadata = { ...(price.metadata as object), ...metadataOf(b.metadata) };
    return price;
  });

  route('post', '/customers', (_p, b) => account.put({ id: newId('cus'), object: 'customer', created: now(), email: text(b.email, 'email', false) ?? null, name: text(b.name, 'name', false) ?? null, metadata: metadataOf(b.metadata), livemode: false }));
  route('get', '/customers', (_p, _b, q) => list(account.all('customer').filter((c) => !q.email || c.email === q.email), q, '/v1/customers'));
  route('get', '/customers/:id', (p) => account.get('customer', p.id));

  // Checkout in subscription mode: one recurring price; the hosted page completes it.
  route('post', '/checkout/sessions', (_p, b) => {
    const mode = text(b.mode, 'mode')!;
    if (mode !== 'subscription') throw paramInvalid('mode', 'This stand-in supports Checkout in subscription mode only.');
    const successUrl = text(b.success_url, 'success_url')!;
    const items = b.line_items as Record<string, unknown>[] | undefined;
    if (!Array.isArray(items) || items.length === 0) throw paramMissing('line_items');
    if (items.length !== 1) throw paramInvalid('line_items', 'This stand-in accepts exactly one line item.');
    const price = account.get('price', text(items[0].price, 'line_items[0][price]')!);
    if (!price.active) throw paramInvalid('line_items[0][price]', `The price specified is inactive. This field only accepts active prices.`);
    if (price.type !== 'recurring') throw paramInvalid('line_items[0][price]', 'In subscription mode, you must provide at least one recurring price.');
    if (b.customer) account.get('customer', String(b.customer));
    const quantity = integer(items[0].quantity, 'line_items[0][quantity]', false) ?? 1;
    const id = newId('cs_test');
    const subscriptionData = (b.subscription_data as Record<string, unknown> | undefined) ?? {};
    return account.put({
      id, object: 'checkout.session', created: now(), expires_at: now() + 24 * 3600, mode, status: 'open', payment_status: 'unpaid',
      url: `${origin}/checkout/${id}`, success_url: successUrl, cancel_url: text(b.cancel_url, 'cancel_url', false) ?? null,
      customer: b.customer || null, customer_email: text(b.customer_email, 'customer_email', false) ?? null, client_reference_id: text(b.client_reference_id, 'client_reference_id', false) ?? null,
      metadata: metadataOf(b.metadata), subscription: null, invoice: null, currency: price.currency, amount_subtotal: (price.unit_amount as number) * quantity, amount_total: (price.unit_amount as number) * quantity, livemode: false,
      _line_items: [{ price: price.id, quantity }], _subscription_metadata: metadataOf(subscriptionData.metadata, 'subscription_data[metadata]'),
    });
  });
  route('get', '/checkout/sessions', (_p, _b, q) => list(account.all('checkout.session'), q, '/v1/checkout/sessions'));
  route('get', '/checkout/sessions/:id', (p) => account.get('checkout.session', p.id, 'checkout.session'));
  route('post', '/checkout/sessions/:id/expire', (p) => {
    const s = account.get('checkout.session', p.id, 'checkout.session');
    if (s.status !== 'open') throw new StripeStandInError(400, `Only Checkout Sessions with a status in ["open"] can be expired.`);
    s.status = 'expired';
    return s;
  });

  route('get', '/subscriptions', (_p, _b, q) => list(account.all('subscription').filter((s) => (!q.customer || s.customer === q.customer) && (q.status === 'all' ? true : q.status ? s.status === q.status : s.status !== 'canceled')), q, '/v1/subscriptions'));
  route('get', '/subscriptions/:id', (p) => account.get('subscription', p.id));
  route('post', '/subscriptions/:id', async (p, b) => {
    const sub = account.get('subscription', p.id);
    if (sub.status === 'canceled') throw new StripeStandInError(400, 'A canceled subscription can only update its cancellation_details and metadata.');
    const previous: Record<string, unknown> = {};
    const item = (sub.items as { data: Obj[] }).data[0];
    const items = b.items as Record<string, unknown>[] | undefined;
    if (Array.isArray(items) && items.length) {
      if (items[0].id && items[0].id !== item.id) throw new StripeStandInError(404, `No such subscription item: '${String(items[0].id)}'`, 'invalid_request_error', 'resource_missing', 'items[0][id]');
      if (items[0].price) {
        const price = account.get('price', String(items[0].price));
        if (!price.active) throw paramInvalid('items[0][price]', 'The price specified is inactive.');
        previous.items = structuredClone(sub.items);
        item.price = publicView(price);
      }
    }
    const cancel = bool(b.cancel_at_period_end);
    if (cancel !== undefined && cancel !== sub.cancel_at_period_end) {
      previous.cancel_at_period_end = sub.cancel_at_period_end;
      sub.cancel_at_period_end = cancel;
      sub.cancel_at = cancel ? item.current_period_end : null;
      sub.canceled_at = cancel ? now() : null;
    }
    if (b.metadata !== undefined) sub.metadata = { ...(sub.metadata as object), ...metadataOf(b.metadata) };
    if (Object.keys(previous).length) await billing.updated(sub, previous);
    return sub;
  });
  route('delete', '/subscriptions/:id', async (p) => {
    const sub = account.get('subscription', p.id);
    if (sub.status === 'canceled') throw new StripeStandInError(400, `No such subscription: '${p.id}' is already canceled.`, 'invalid_request_error', 'resource_missing');
    return billing.cancel(sub);
  });

  route('get', '/invoices', (_p, _b, q) => list(account.all('invoice').filter((i) => (!q.customer || i.customer === q.customer) && (!q.subscription || (i.parent as { subscription_details: { subscription: string } }).subscription_details.subscription === q.subscription)), q, '/v1/invoices'));
  route('get', '/invoices/:id', (p) => account.get('invoice', p.id));
  route('get', '/events', (_p, _b, q) => list(account.all('event').filter((e) => !q.type || e.type === q.type), q, '/v1/events'));
  route('get', '/events/:id', (p) => account.get('event', p.id));

  route('post', '/webhook_endpoints', (_p, b) => {
    const url = text(b.url, 'url')!;
    if (!/^https?:\/\//.test(url)) throw paramInvalid('url', 'Invalid URL: must be an http(s) URL.');
    const events = b.enabled_events as string[] | undefined;
    if (!Array.isArray(events) || !events.length) throw paramMissing('enabled_events');
    const endpoint = account.put({ id: newId('we'), object: 'webhook_endpoint', created: now(), url, enabled_events: events, status: 'enabled', metadata: metadataOf(b.metadata), description: b.description ?? null, api_version: null, livemode: false });
    // The signing secret is shown once, on creation (as on Stripe); every endpoint here shares the configured one.
    return { ...publicView(endpoint), secret: webhookSecret };
  });
  route('get', '/webhook_endpoints', (_p, _b, q) => list(account.all('webhook_endpoint'), q, '/v1/webhook_endpoints'));
  route('delete', '/webhook_endpoints/:id', (p) => {
    const endpoint = account.get('webhook_endpoint', p.id, 'webhook endpoint');
    account.objects.get('webhook_endpoint')!.delete(endpoint.id);
    return { id: endpoint.id, object: 'webhook_endpoint', deleted: true };
  });

  api.use((req, _res, next) => next(new StripeStandInError(404, `Unrecognized request URL (${req.method}: /v1${req.path}). Please see https://stripe.com/docs or we can help at https://support.stripe.com/.`)));
  app.use('/v1', api);

  // Hosted checkout: the page, the confirm form's target and the cancel link.
  app.get('/checkout/:id', (req, res, next) => {
    try {
      res.type('html').send(checkoutPage(account.get('checkout.session', req.params.id, 'checkout session'), account));
    } catch (error) {
      next(error);
    }
  });
  app.post('/checkout/:id/confirm', async (req, res, next) => {
    const form = decodeForm(typeof req.body === 'string' ? req.body : '');
    try {
      const { redirect } = await billing.completeCheckout(req.params.id, String(form.card ?? ''), typeof form.email === 'string' ? form.email : undefined);
      res.redirect(303, redirect);
    } catch (error) {
      if (error instanceof StripeStandInError && error.type === 'card_error') {
        return res.status(402).type('html').send(checkoutPage(account.get('checkout.session', req.params.id), account, error.message));
      }
      next(error);
    }
  });
  app.get('/checkout/:id/cancel', (req, res, next) => {
    try {
      const session = account.get('checkout.session', req.params.id, 'checkout session');
      res.redirect(303, String(session.cancel_url ?? session.success_url));
    } catch (error) {
      next(error);
    }
  });

  // Test controls: not part of Stripe's API; they play the passage of time (renewal) and card failures.
  const control = express.Router();
  control.use(express.json());
  control.get('/health', (_req, res) => res.json({ ok: true }));
  control.post('/subscriptions/:id/renew', async (req, res, next) => billing.renew(req.params.id, false).then((invoice) => res.json(publicView(invoice)), next));
  control.post('/subscriptions/:id/fail-payment', async (req, res, next) => billing.renew(req.params.id, true).then((invoice) => res.json(publicView(invoice)), next));
  control.post('/checkout/:id/complete', async (req, res, next) => {
    const form = decodeForm(typeof req.body === 'string' ? req.body : '');
    billing.completeCheckout(req.params.id, String(form.card ?? '4242424242424242'), typeof form.email === 'string' ? form.email : undefined).then((r) => res.json(r), next);
  });
  control.get('/deliveries', (_req, res) => res.json({ deliveries: billing.deliveries }));
  app.use('/_standin', control);

  app.use((error: unknown, _req: Request, res: Response, _next: NextFunction) => {
    if (error instanceof StripeStandInError) return res.status(error.status).json(error.toBody());
    console.error('stripe stand-in:', error);
    res.status(500).json({ error: { type: 'api_error', message: 'The stand-in failed: ' + (error as Error).message } });
  });

  const server: Server = await new Promise((resolve, reject) => {
    // Express 5 passes a listen error to this callback (and the server has no address then).
    const s = app.listen(port, '127.0.0.1', (error?: Error) => (error ? reject(new Error(`Stripe stand-in cannot listen on 127.0.0.1:${port}: ${error.message}`)) : resolve(s)));
  });
  const actualPort = (server.address() as { port: number }).port;
  origin = `http://127.0.0.1:${actualPort}`;
  return {
    url: `http://127.0.0.1:${actualPort}`,
    account,
    billing,
    close: () =>
      new Promise<void>((resolve) => {
        if (saveTimer) {
          clearTimeout(saveTimer);
          saveTimer = null;
          if (stateFile) fs.writeFileSync(stateFile, account.snapshot());
        }
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  };
}
