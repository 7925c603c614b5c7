// Browser journey of the marketplace: the publisher prices a listing; a subscriber finds it in the catalogue, subscribes
// to the paid plan through the stand-in's hosted checkout, creates a key, runs a query from the API docs page; the
// publisher then sees the usage and the revenue. Real chromium, real app, the Stripe stand-in through the official SDK.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { createTestUser, type TestUser } from '../support/app.js';
import { journeyShots, launchBrowser, startApp, type BrowserSession, type RunningApp } from '../support/browser.js';
import { publishedListing, type TestListing } from '../support/market.js';
import { startStripeStandIn, type StripeStandIn } from '../../server/fakes/stripe.js';
import { stripeClient } from '../../server/services/stripe.js';
import { HANDLED_EVENTS, splitAmount } from '../../server/services/billing.js';
import { stopMeter } from '../../server/services/metering.js';
import { waitForMail } from '../support/mail.js';

const RDF_TYPE = 'http://www.w3.org/1999/02/22-rdf-syntax-ns#type';
const EX = 'http://thence.test/lighthouse#';

let standIn: StripeStandIn;
let app: RunningApp;
let browser: BrowserSession | null = null;
let listing: TestListing;
let publisher: TestUser;
let subscriber: TestUser;

beforeAll(async () => {
  standIn = await startStripeStandIn({ port: 0, secretKey: 'sk_test_thence_journey', webhookSecret: 'whsec_thence_journey', webhookUrl: null, stateFile: null });
  app = await startApp({ stripe: { secretKey: 'sk_test_thence_journey', webhookSecret: 'whsec_thence_journey', host: '127.0.0.1', port: Number(new URL(standIn.url).port), protocol: 'http' } });
  await stripeClient(app.ctx.config).webhookEndpoints.create({ url: `${app.url}/api/webhooks/stripe`, enabled_events: [...HANDLED_EVENTS] });
  publisher = await createTestUser(app.ctx, { roles: ['publisher'] });
  subscriber = await createTestUser(app.ctx, { roles: ['subscriber'] });
  // Invented demo-style data: lighthouses on a coast, typed as Lighthouse (asserted) and Beacon (entailed).
  listing = await publishedListing(app.ctx, [
    [`${EX}northPoint`, RDF_TYPE, `${EX}Lighthouse`, true], [`${EX}northPoint`, RDF_TYPE, `${EX}Beacon`, false],
    [`${EX}gullRock`, RDF_TYPE, `${EX}Lighthouse`, true], [`${EX}gullRock`, RDF_TYPE, `${EX}Beacon`, false],
  ], { publisher, title: `Coastal lights ${Date.now().toString(36)}` });
});
afterAll(async () => {
  await browser?.close();
  if (app) await stopMeter(app.ctx);
  await app?.close();
  await standIn?.close();
});

const eventually = <T>(read: () => T | Promise<T>, timeout = 20_000) => expect.poll(read, { timeout });

/** Element Plus puts data-test on the native input of el-input and on the wrapper of el-input-number: find either. */
const field = (page: Page, name: string, tag: 'input' | 'textarea' = 'input') => page.locator(`${tag}[data-test="${name}"], [data-test="${name}"] ${tag}`).first();

async function signIn(page: Page, user: TestUser): Promise<void> {
  await page.goto(app.url + '/sign-in');
  await page.locator('input[name="email"]').fill(user.email);
  await page.locator('input[name="password"]').fill(user.password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
  await page.waitForURL((url) => url.pathname !== '/sign-in');
}

describe('journey: from a priced listing to a paid query and the publisher’s revenue', () => {
  it('publisher prices, subscriber pays, creates a key, queries; publisher sees usage and revenue', async () => {
    browser = await launchBrowser();
    let page = browser.page;
    const shot = journeyShots(page, 'market-subscribe-pay-query');

    // The publisher adds a free and a paid plan in the plans editor.
    await signIn(page, publisher);
    await page.goto(`${app.url}/publisher/listings/${listing.id}/plans`);
    await eventually(() => page.getByRole('heading', { level: 1 }).textContent()).toContain('Plans');
    for (const plan of [{ name: 'Keeper', paid: false }, { name: 'Harbour pilot', paid: true }]) {
      await page.locator('[data-test="new-plan"]').click();
      await field(page, 'plan-name').fill(plan.name);
      if (plan.paid) {
        await page.locator('[data-test="plan-paid"]').click();
        await field(page, 'plan-price').fill('24');
      }
      await field(page, 'plan-quota').fill('5000');
      await field(page, 'plan-rate').fill('120');
      if (plan.paid) await shot('plan-form');
      await page.locator('[data-test="save-plan"]').click();
      await eventually(() => page.locator('[data-test="plans-table"]').textContent()).toContain(plan.name);
    }
    await eventually(() => page.locator('[data-test="plans-table"]').textContent()).toContain('€24.00');
    await shot('plans-saved');
    await browser.close();

    // The subscriber finds the listing in the catalogue and subscribes to the paid plan.
    browser = await launchBrowser();
    page = browser.page;
    const shot2 = journeyShots(page, 'market-subscribe-pay-query-subscriber');
    await signIn(page, subscriber);
    await page.goto(app.url + '/catalogue');
    await page.getByRole('link', { name: listing.title }).click();
    await page.waitForURL((url) => url.pathname === `/listings/${listing.slug}`);
    await eventually(() => page.locator('[data-test="listing-plans"]').textContent()).toContain('Harbour pilot');
    await shot2('listing-plans');
    await page.locator('[data-test="plan-paid"] button').click();

    // The stand-in's hosted checkout page: confirm the test card payment.
    await page.waitForURL((url) => url.href.startsWith(`${standIn.url}/checkout/`));
    await eventually(() => page.locator('[data-testid="amount"]').textContent()).toContain('24.00 EUR');
    await shot2('checkout');
    await page.locator('[data-testid="confirm-payment"]').click();

    // Back on Thence: the subscription is live.
    await page.waitForURL((url) => url.pathname === '/market/subscriptions');
    await eventually(() => page.locator('[data-test="subscriptions-notice"]').textContent()).toContain('Payment received');
    await eventually(() => page.locator(`[data-test="subscription-${listing.slug}"] [data-test="subscription-status"]`).textContent()).toContain('active');
    await shot2('subscribed');
    await waitForMail(subscriber.email, /^Receipt /);

    // A key, shown once, then the docs page's runner with that key.
    await page.goto(app.url + '/market/keys');
    await field(page, 'key-name').fill('lighthouse app');
    await page.locator('[data-test="create-key"]').click();
    await eventually(() => page.locator('[data-test="new-key-secret"]').textContent()).toMatch(/^thk_/);
    const secret = (await page.locator('[data-test="new-key-secret"]').textContent())!;
    await shot2('key-created');
    await page.locator('[data-test="try-key"]').click();
    await page.waitForURL((url) => url.pathname === '/market/docs');
    await eventually(() => page.locator('[data-test="curl-example"]').first().textContent()).toContain(`Bearer ${secret}`);
    await eventually(() => page.locator('[data-test="curl-example"]').first().textContent()).toContain(`/api/v1/kbs/${listing.slug}/facts`);
    expect(await field(page, 'runner-key').inputValue()).toBe(secret);
    await field(page, 'runner-sparql', 'textarea').fill(`SELECT ?light WHERE { ?light a <${EX}Beacon> }`);
    await page.locator('[data-test="run-query"]').click();
    await eventually(() => page.locator('[data-test="runner-status"]').textContent()).toBe('200');
    const body = JSON.parse((await page.locator('[data-test="runner-body"]').textContent())!);
    // W3C SPARQL 1.1 Query Results JSON Format §3: head.vars and results.bindings of {type, value} terms.
    expect(body.head.vars).toEqual(['light']);
    expect(body.results.bindings.map((b: { light: { value: string } }) => b.light.value).sort()).toEqual([`${EX}gullRock`, `${EX}northPoint`]);
    await shot2('query-run');
    await browser.close();

    // The publisher sees the subscriber's usage and the revenue, split into fee and share.
    browser = await launchBrowser();
    page = browser.page;
    const shot3 = journeyShots(page, 'market-subscribe-pay-query-publisher');
    await signIn(page, publisher);
    await page.goto(app.url + '/publisher/usage');
    await eventually(() => page.locator('[data-test="usage-table"]').textContent()).toContain(subscriber.email);
    const { share } = splitAmount(2400, app.ctx.config.stripe.platformFeePercent);
    await eventually(() => page.locator('[data-test="revenue-table"]').textContent()).toContain(listing.slug);
    expect(await page.locator('[data-test="publisher-share"]').first().textContent()).toBe(new Intl.NumberFormat('en', { style: 'currency', currency: 'EUR' }).format(share / 100));
    await shot3('usage-and-revenue');
  }, 180_000);
});
