// Billing side of the Stripe stand-in: checkout completion, renewals, failed payments, and signed webhook delivery.
// Events are signed with the official SDK's test-header helper, so the app verifies them exactly as it verifies Stripe's.
import Stripe from 'stripe';
import { addMonth, newId, now, publicView, StripeAccount, StripeStandInError, type Obj } from './stripeState.js';

const API_VERSION = Stripe.API_VERSION;
const signer = Stripe.webhooks;

export interface Delivery { eventId: string; type: string; url: string; status: number | null; error?: string }

export class StripeBilling {
  readonly deliveries: Delivery[] = [];
  constructor(
    private readonly account: StripeAccount,
    private readonly webhookSecret: string,
    private readonly defaultWebhookUrl: string | null,
  ) {}

  /** Pays the checkout session with a test card: creates customer, subscription and a paid first invoice, then tells the app. */
  async completeCheckout(sessionId: string, card: string, email?: string): Promise<{ redirect: string }> {
    const session = this.account.get('checkout.session', sessionId, 'checkout session');
    if (session.status !== 'open') throw new StripeStandInError(400, `This Checkout Session is ${String(session.status)}; it can no longer be paid.`, 'invalid_request_error', 'checkout_session_not_open');
    const digits = card.replace(/\s+/g, '');
    // Stripe's documented test cards: 4242… succeeds, 4000 0000 0000 0002 is declined (generic_decline).
    if (digits === '4000000000000002') throw new StripeStandInError(402, 'Your card was declined.', 'card_error', 'card_declined', 'card');
    if (!/^\d{12,19}$/.test(digits)) throw new StripeStandInError(402, 'Your card number is incomplete.', 'card_error', 'incorrect_number', 'card');
    const t = now();
    let customerId = session.customer as string | null;
    if (!customerId) {
      const customer = this.account.put({ id: newId('cus'), object: 'customer', created: t, email: email || session.customer_email || null, name: null, metadata: {}, livemode: false });
      customerId = customer.id;
      await this.emit('customer.created', customer);
    }
    const lineItems = session._line_items as { price: string; quantity: number }[];
    const price = this.account.get('price', lineItems[0].price);
    const subscriptionMetadata = (session._subscription_metadata as Record<string, string>) ?? {};
    const subscription = this.account.put({
      id: newId('sub'), object: 'subscription', created: t, start_date: t, status: 'active', customer: customerId,
      currency: price.currency, cancel_at_period_end: false, canceled_at: null, ended_at: null, cancel_at: null,
      metadata: subscriptionMetadata, latest_invoice: null, livemode: false, collection_method: 'charge_automatically',
      items: { object: 'list', data: [] as Obj[], has_more: false, url: '' },
    });
    const item: Obj = { id: newId('si'), object: 'subscription_item', created: t, price: publicView(price), quantity: lineItems[0].quantity, subscription: subscription.id, current_period_start: t, current_period_end: addMonth(t), metadata: {} };
    (subscription.items as { data: Obj[]; url: string }).data.push(item);
    (subscription.items as { url: string }).url = `/v1/subscription_items?subscription=${subscription.id}`;
    const invoice = this.invoice(subscription, 'subscription_create', true);
    Object.assign(session, { status: 'complete', payment_status: 'paid', customer: customerId, subscription: subscription.id, invoice: invoice.id });
    await this.emit('customer.subscription.created', subscription);
    await this.emit('checkout.session.completed', session);
    await this.emit(invoice.status === 'paid' ? 'invoice.paid' : 'invoice.payment_failed', invoice);
    return { redirect: String(session.success_url).replace('{CHECKOUT_SESSION_ID}', session.id) };
  }

  /** Ends the current period: a new period and a paid (or, when `fail`, an unpaid) invoice; past_due on failure. */
  async renew(subscriptionId: string, fail: boolean): Promise<Obj> {
    const subscription = this.account.get('subscription', subscriptionId);
    if (subscription.status === 'canceled') throw new StripeStandInError(400, 'A canceled subscription is not renewed.');
    const item = (subscription.items as { data: Obj[] }).data[0];
    if (subscription.cancel_at_period_end) return this.cancel(subscription, true);
    const previous = { status: subscription.status };
    item.current_period_start = item.current_period_end;
    item.current_period_end = addMonth(item.current_period_start as number);
    const invoice = this.invoice(subscription, 'subscription_cycle', !fail);
    subscription.status = fail ? 'past_due' : 'active';
    await this.emit(fail ? 'invoice.payment_failed' : 'invoice.paid', invoice);
    await this.emit('customer.subscription.updated', subscription, previous);
    return invoice;
  }

  /** Cancels now: status canceled and the `customer.subscription.deleted` event. */
  async cancel(subscription: Obj, atPeriodEnd = false): Promise<Obj> {
    const t = now();
    Object.assign(subscription, { status: 'canceled', canceled_at: subscription.canceled_at ?? t, ended_at: atPeriodEnd ? ((subscription.items as { data: Obj[] }).data[0].current_period_end as number) : t });
    await this.emit('customer.subscription.deleted', subscription);
    return subscription;
  }

  async updated(subscription: Obj, previous: Record<string, unknown>): Promise<void> {
    await this.emit('customer.subscription.updated', subscription, previous);
  }

  private invoice(subscription: Obj, reason: string, paid: boolean): Obj {
    const item = (subscription.items as { data: Obj[] }).data[0];
    const price = item.price as { id: string; unit_amount: number; currency: string; product: string };
    const amount = price.unit_amount * (item.quantity as number);
    const t = now();
    const customer = this.account.get('customer', subscription.customer as string);
    const invoice = this.account.put({
      id: newId('in'), object: 'invoice', created: t, customer: customer.id, customer_email: customer.email ?? null,
      status: paid ? 'paid' : 'open', paid, billing_reason: reason, currency: price.currency, collection_method: 'charge_automatically',
      amount_due: amount, amount_paid: paid ? amount : 0, amount_remaining: paid ? 0 : amount, total: amount, subtotal: amount,
      attempt_count: 1, attempted: true, livemode: false, number: `THN-${String(this.account.all('invoice').length + 1).padStart(4, '0')}`,
      period_start: item.current_period_start, period_end: item.current_period_end,
      status_transitions: { finalized_at: t, paid_at: paid ? t : null },
      parent: { type: 'subscription_details', quote_details: null, subscription_details: { subscription: subscription.id, metadata: subscription.metadata } },
      lines: { object: 'list', has_more: false, url: '', data: [{ id: newId('il'), object: 'line_item', amount, currency: price.currency, quantity: item.quantity, period: { start: item.current_period_start, end: item.current_period_end }, pricing: { type: 'price_details', price_details: { price: price.id, product: price.product } } }] },
      metadata: {},
    });
    subscription.latest_invoice = invoice.id;
    return invoice;
  }

  /** Records the event and POSTs it, signed, to every enabled endpoint that listens for its type. */
  async emit(type: string, object: Obj, previous?: Record<string, unknown>): Promise<Obj> {
    const event = this.account.put({
      id: newId('evt'), object: 'event', created: now(), api_version: API_VERSION, type, livemode: false, pending_webhooks: 0,
      request: { id: null, idempotency_key: null },
      data: { object: publicView(structuredClone(object)), ...(previous ? { previous_attributes: previous } : {}) },
    });
    const endpoints = this.account.all('webhook_endpoint').filter((e) => e.status === 'enabled' && ((e.enabled_events as string[]).includes('*') || (e.enabled_events as string[]).includes(type)));
    const urls = endpoints.length ? endpoints.map((e) => e.url as string) : this.defaultWebhookUrl ? [this.defaultWebhookUrl] : [];
    const payload = JSON.stringify(publicView(event), null, 2);
    for (const url of urls) {
      const header = signer.generateTestHeaderString({ payload, secret: this.webhookSecret });
      const delivery: Delivery = { eventId: event.id, type, url, status: null };
      try {
        const res = await fetch(url, { method: 'POST', headers: { 'Content-Type': 'application/json; charset=utf-8', 'Stripe-Signature': header, 'User-Agent': 'Stripe/1.0 (+https://stripe.com/docs/webhooks)' }, body: payload, signal: AbortSignal.timeout(10_000) });
        delivery.status = res.status;
        await res.arrayBuffer();
      } catch (error) {
        delivery.error = (error as Error).message;
      }
      this.deliveries.push(delivery);
      if (this.deliveries.length > 500) this.deliveries.shift();
    }
    event.pending_webhooks = 0;
    return event;
  }
}

/** The hosted checkout page: order summary, a card field pre-filled with Stripe's success test card, one pay button. */
export function checkoutPage(session: Obj, account: StripeAccount, error?: string): string {
  const lineItems = session._line_items as { price: string; quantity: number }[];
  const price = account.get('price', lineItems[0].price);
  const product = account.get('product', price.product as string);
  const amount = `${((price.unit_amount as number) / 100).toFixed(2)} ${String(price.currency).toUpperCase()}`;
  const esc = (s: unknown) => String(s ?? '').replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
  const closed = session.status !== 'open';
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><title>Test checkout · ${esc(product.name)}</title>
<style>body{font-family:system-ui,sans-serif;background:#f4f1ea;margin:0;padding:40px}main{max-width:440px;margin:auto;background:#fff;border-radius:10px;padding:28px;box-shadow:0 2px 12px #0002}
h1{font-size:20px;margin:0 0 4px}.amount{font-size:28px;font-weight:600;margin:12px 0}label{display:block;font-size:13px;margin:14px 0 4px}input{width:100%;box-sizing:border-box;padding:10px;font-size:16px;border:1px solid #bbb;border-radius:6px}
button{margin-top:20px;width:100%;padding:12px;font-size:16px;border:0;border-radius:6px;background:#2d5b4f;color:#fff;cursor:pointer}.note{font-size:12px;color:#666;margin-top:14px}.error{color:#a40000;margin-top:12px}</style></head>
<body><main><p class="note">Local payment stand-in (test mode) — no money moves.</p><h1>${esc(product.name)}</h1>
<div class="amount" data-testid="amount">${esc(amount)} <small>per month</small></div>
${closed ? `<p>This checkout is ${esc(session.status)}.</p>` : `<form method="post" action="/checkout/${esc(session.id)}/confirm">
<label for="email">E-mail</label><input id="email" name="email" type="email" value="${esc(session.customer_email)}" required>
<label for="card">Card number (test)</label><input id="card" name="card" value="4242 4242 4242 4242" inputmode="numeric" required>
${error ? `<p class="error" role="alert">${esc(error)}</p>` : ''}
<button type="submit" data-testid="confirm-payment">Pay ${esc(amount)} and subscribe</button></form>
<p class="note">4242 4242 4242 4242 succeeds; 4000 0000 0000 0002 is declined.</p>
<p class="note"><a href="/checkout/${esc(session.id)}/cancel">Cancel and go back</a></p>`}</main></body></html>`;
}
