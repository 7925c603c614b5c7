// Browser journeys of the foundation: sign-up → verification mail → sign-out → sign-in; password reset by mail;
// Google sign-in through the OpenID Connect stand-in; role-guarded pages for the wrong and the right role; the narrow shell.
// Real chromium, the real app on the test database, the real SMTP catcher and stand-in (started by npm test).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { createTestUser, uniqueEmail, TEST_PASSWORD } from '../support/app.js';
import { journeyShots, launchBrowser, startApp, type BrowserSession, type RunningApp } from '../support/browser.js';
import { linkIn, waitForMail } from '../support/mail.js';

/** A journey is many page loads on a shared machine; vitest's default 30 s is for single requests. */
const JOURNEY_TIMEOUT_MS = 120_000;

let app: RunningApp;
let browser: BrowserSession | null = null;

beforeAll(async () => {
  app = await startApp();
});
afterAll(async () => {
  await browser?.close();
  await app?.close();
});

/** A fresh chromium profile for each journey, so one journey's cookies never help another. */
async function freshPage(options?: { width?: number; height?: number }): Promise<Page> {
  await browser?.close();
  browser = await launchBrowser(options);
  return browser.page;
}

/** Polls until the value matches; the default second of expect.poll is short on a shared two-core machine. */
const eventually = <T>(read: () => T | Promise<T>) => expect.poll(read, { timeout: 20_000 });

/** Waits until the address is this path (globs would also match "/sign-in?redirect=/admin/users" for "**\/admin/users"). */
const atPath = (page: Page, pathname: string) => page.waitForURL((url) => url.pathname === pathname);

/** The message Element Plus shows beside the form field whose input has this name. */
function fieldError(page: Page, name: string) {
  return page.locator('.el-form-item', { has: page.locator(`input[name="${name}"]`) }).locator('.el-form-item__error');
}

async function signInThroughForm(page: Page, email: string, password: string): Promise<void> {
  await page.locator('input[name="email"]').fill(email);
  await page.locator('input[name="password"]').fill(password);
  await page.getByRole('button', { name: 'Sign in', exact: true }).click();
}

async function signOutThroughMenu(page: Page): Promise<void> {
  await page.getByRole('button', { name: 'Account menu' }).click();
  await page.getByRole('menuitem', { name: 'Sign out' }).click();
  await eventually(() => page.getByRole('link', { name: 'Sign in', exact: true }).isVisible()).toBe(true);
}

describe('journey: sign-up, verification mail, sign-out, sign-in', () => {
  it('creates an account, confirms the address from the mail and signs in again', async () => {
    const page = await freshPage();
    const shot = journeyShots(page, 'sign-up-verify-sign-in');
    const email = uniqueEmail('journey');
    const password = 'a-long-journey-password';

    await page.goto(app.url + '/');
    await eventually(() => page.getByRole('heading', { level: 1 }).textContent()).toContain('Facts that follow');
    await shot('home-signed-out');
    // The shipped fonts (fonts/, through @font-face) load from our own origin under the app's Content-Security-Policy.
    const loadedFaces = await page.evaluate(async () => {
      await document.fonts.ready;
      return [...document.fonts].filter((face) => face.status === 'loaded').map((face) => `${face.family.replace(/"/g, '')} ${face.weight}`);
    });
    expect(loadedFaces).toEqual(expect.arrayContaining(['IBM Plex Sans 400', 'IBM Plex Sans 600']));

    await page.getByRole('link', { name: 'Create account' }).click();
    await atPath(page, '/sign-up');

    // Client-side check with the shared zod schema: messages appear beside each field, nothing is sent.
    await page.getByRole('button', { name: 'Create account' }).click();
    await eventually(() => fieldError(page, 'name').textContent()).toBe('Enter your name.');
    await eventually(() => fieldError(page, 'email').textContent()).toBe('Enter a valid e-mail address.');
    await eventually(() => fieldError(page, 'password').textContent()).toBe('Use at least 10 characters.');
    await shot('sign-up-client-errors');

    await page.locator('input[name="name"]').fill('Journey Tester');
    await page.locator('input[name="email"]').fill(email);
    await page.locator('input[name="password"]').fill(password);
    await page.locator('label.el-checkbox', { hasText: 'Publisher' }).click();
    await shot('sign-up-filled');
    await page.getByRole('button', { name: 'Create account' }).click();

    // Signed in at once, with the reminder to confirm the address.
    await page.waitForURL(app.url + '/');
    await eventually(() => page.getByRole('button', { name: 'Account menu' }).textContent()).toContain('Journey Tester');
    await eventually(() => page.getByText('Confirm your e-mail address').isVisible()).toBe(true);
    await shot('signed-up-unconfirmed');

    const mail = await waitForMail(email, /confirm/i);
    const link = linkIn(mail, `${app.url}/verify?token=`);
    await page.goto(link);
    // The page says either that the address is confirmed or why the link failed; show which on failure.
    await eventually(() => page.locator('.el-result__title').textContent()).toBe('Your e-mail address is confirmed');
    await shot('verified');
    // The reminder is gone once the address is confirmed.
    await page.getByRole('link', { name: 'Continue' }).click();
    await page.waitForURL(app.url + '/');
    expect(await page.getByText('Confirm your e-mail address').count()).toBe(0);

    await signOutThroughMenu(page);
    await shot('signed-out');

    // The server's per-field answer (409 with fields.email) is shown beside the e-mail field.
    await page.getByRole('link', { name: 'Create account' }).click();
    await page.locator('input[name="name"]').fill('Someone Else');
    await page.locator('input[name="email"]').fill(email);
    await page.locator('input[name="password"]').fill('another-long-password');
    await page.getByRole('button', { name: 'Create account' }).click();
    await eventually(() => fieldError(page, 'email').textContent()).toContain('already exists');
    await shot('sign-up-server-error-beside-field');

    await page.getByRole('link', { name: 'Sign in', exact: true }).first().click();
    await atPath(page, '/sign-in');
    await signInThroughForm(page, email, 'not-the-password');
    await eventually(() => page.locator('.form-alert').textContent()).toContain('do not match');
    await shot('sign-in-wrong-password');
    await signInThroughForm(page, email, password);
    await page.waitForURL(app.url + '/');
    await eventually(() => page.getByRole('button', { name: 'Account menu' }).textContent()).toContain('Journey Tester');

    await page.goto(app.url + '/account');
    await eventually(() => page.getByText('confirmed', { exact: true }).isVisible()).toBe(true);
    await eventually(() => page.locator('.role-tags').first().textContent()).toMatch(/Publisher.*Subscriber/);
    await shot('account-page');

    // Account edits are cookie-authenticated writes (CSRF token sent by the client) that show their answers in place.
    await page.locator('input[name="name"]').fill('Journey Tester Renamed');
    await page.getByRole('button', { name: 'Save name' }).click();
    await eventually(() => page.getByRole('button', { name: 'Account menu' }).textContent()).toContain('Journey Tester Renamed');
    await page.locator('input[name="currentPassword"]').fill('not-the-password');
    await page.locator('input[name="newPassword"]').fill('yet-another-password');
    await page.getByRole('button', { name: 'Change password' }).click();
    await eventually(() => fieldError(page, 'currentPassword').textContent()).toContain('not correct');
    await shot('account-wrong-current-password');
  }, JOURNEY_TIMEOUT_MS);
});

describe('journey: password reset by mail', () => {
  it('asks for a link, chooses a new password and signs in with it', async () => {
    const page = await freshPage();
    const shot = journeyShots(page, 'password-reset');
    const user = await createTestUser(app.ctx, { roles: ['subscriber'], name: 'Reset Tester' });
    const newPassword = 'a-brand-new-password';

    await page.goto(app.url + '/sign-in');
    await page.getByRole('link', { name: 'Forgot your password?' }).click();
    await page.locator('input[name="email"]').fill(user.email);
    await page.getByRole('button', { name: 'Send the link' }).click();
    await eventually(() => page.getByRole('status').textContent()).toContain('reset link is on its way');
    await shot('link-requested');

    const link = linkIn(await waitForMail(user.email, /password/i), `${app.url}/reset?token=`);
    await page.goto(link);
    await page.locator('input[name="password"]').fill(newPassword);
    await page.locator('input[name="confirm"]').fill(newPassword + 'x');
    await page.getByRole('button', { name: 'Save the new password' }).click();
    await eventually(() => fieldError(page, 'confirm').textContent()).toBe('The two passwords differ.');
    await page.locator('input[name="confirm"]').fill(newPassword);
    await page.getByRole('button', { name: 'Save the new password' }).click();
    await eventually(() => page.getByText('Your password is changed').isVisible()).toBe(true);
    await shot('password-changed');

    // The link works once: opening it again is refused with the server's message on the token.
    await page.goto(link);
    await page.locator('input[name="password"]').fill(newPassword);
    await page.locator('input[name="confirm"]').fill(newPassword);
    await page.getByRole('button', { name: 'Save the new password' }).click();
    await eventually(() => page.locator('.el-alert--error').textContent()).toContain('not valid any more');
    await shot('link-used-twice');

    await page.goto(app.url + '/sign-in');
    await signInThroughForm(page, user.email, TEST_PASSWORD);
    await eventually(() => page.locator('.form-alert').textContent()).toContain('do not match');
    await signInThroughForm(page, user.email, newPassword);
    await page.waitForURL(app.url + '/');
    await eventually(() => page.getByRole('button', { name: 'Account menu' }).textContent()).toContain('Reset Tester');
    await shot('signed-in-with-new-password');
  }, JOURNEY_TIMEOUT_MS);
});

describe('journey: Google sign-in through the OpenID Connect stand-in', () => {
  it('goes to the stand-in and comes back signed in', async () => {
    const issuer = process.env.GOOGLE_OAUTH_ISSUER;
    if (!issuer) throw new Error('GOOGLE_OAUTH_ISSUER is not set: run through npm test, or eval "$(bash server/scripts/dev-env.sh)" and start server/fakes/main.ts.');
    // Who the stand-in signs in as when no login_hint is given (the demo subscriber unless someone chose another).
    const identity = (await (await fetch(`${issuer}/standin/default`)).json()) as { email: string; name: string };

    const page = await freshPage();
    const shot = journeyShots(page, 'google-sign-in');
    await page.goto(app.url + '/sign-in');
    await shot('sign-in-page');
    const visited: string[] = [];
    page.on('request', (request) => {
      if (request.isNavigationRequest()) visited.push(request.url());
    });
    await page.getByRole('link', { name: 'Continue with Google' }).click();
    await page.waitForURL(app.url + '/', { timeout: 20_000 });

    // The round trip really went through the provider's /authorize and back to our callback.
    expect(visited.some((url) => url.startsWith(`${issuer}/authorize`))).toBe(true);
    expect(visited.some((url) => url.startsWith(`${app.url}/api/auth/google/callback`))).toBe(true);
    await eventually(() => page.getByRole('button', { name: 'Account menu' }).textContent()).toContain(identity.name);
    // The greeting's marker is tidied out of the address.
    await eventually(() => new URL(page.url()).search).toBe('');
    await shot('back-signed-in');

    await page.getByRole('button', { name: 'Account menu' }).click();
    await eventually(() => page.getByText(identity.email).first().isVisible()).toBe(true);
    await shot('account-menu');
  }, JOURNEY_TIMEOUT_MS);
});

describe('journey: role-guarded pages', () => {
  it('refuses the admin users page to a subscriber with a clear page, and opens it to an admin', async () => {
    const subscriber = await createTestUser(app.ctx, { roles: ['subscriber'], name: 'Guarded Subscriber' });
    const admin = await createTestUser(app.ctx, { roles: ['admin'], name: 'Guard Admin' });

    const page = await freshPage();
    const shot = journeyShots(page, 'role-guard');

    // Signed out: the guard sends the visitor to sign in and back.
    await page.goto(app.url + '/admin/users');
    await page.waitForURL((url) => url.pathname === '/sign-in' && url.searchParams.get('redirect') === '/admin/users');
    await shot('signed-out-asked-to-sign-in');

    await signInThroughForm(page, subscriber.email, subscriber.password);
    await atPath(page, '/forbidden');
    await eventually(() => page.getByText('Not allowed').isVisible()).toBe(true);
    await eventually(() => page.locator('.el-result').textContent()).toContain('only for accounts with the Admin role');
    // The navigation does not offer what the role cannot open.
    expect(await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Users' }).count()).toBe(0);
    await shot('subscriber-refused');

    // The server refuses the data too: the page is not the only barrier.
    const status = await page.evaluate(async () => (await fetch('/api/admin/users')).status);
    expect(status).toBe(403);

    await signOutThroughMenu(page);
    await page.goto(app.url + '/admin/users');
    await atPath(page, '/sign-in');
    await signInThroughForm(page, admin.email, admin.password);
    await atPath(page, '/admin/users');
    await eventually(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Users');
    await eventually(() => page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Users' }).count()).toBe(1);

    // Grant the subscriber the publisher role from the list.
    await page.locator('input[name="search"]').fill(subscriber.email);
    const row = page.locator('.el-table__row', { hasText: subscriber.email });
    await eventually(() => row.count()).toBe(1);
    await shot('admin-users-search');
    await row.getByRole('button', { name: `Change roles of ${subscriber.email}` }).click();
    await page.locator('.el-dialog label.el-checkbox', { hasText: 'Publisher' }).click();
    await shot('admin-roles-dialog');
    await page.getByRole('button', { name: 'Save roles' }).click();
    await eventually(() => row.locator('.role-tags').textContent()).toMatch(/Publisher.*Subscriber/);
    await shot('admin-role-granted');

    const stored = await app.ctx.pool.query<{ roles: string[] }>('SELECT roles FROM users WHERE id = $1', [subscriber.id]);
    expect([...stored.rows[0].roles].sort()).toEqual(['publisher', 'subscriber']);
  }, JOURNEY_TIMEOUT_MS);
});

describe('journey: the session survives a server restart', () => {
  it('stays signed in when the app is stopped and started again on the same database', async () => {
    const user = await createTestUser(app.ctx, { roles: ['publisher'], name: 'Restart Tester' });
    const page = await freshPage();
    const shot = journeyShots(page, 'session-restart');
    await page.goto(app.url + '/sign-in');
    await signInThroughForm(page, user.email, user.password);
    await page.waitForURL(app.url + '/');
    await eventually(() => page.getByRole('heading', { level: 1 }).textContent()).toContain('Facts that follow');
    await eventually(() => page.getByRole('button', { name: 'Account menu' }).textContent()).toContain('Restart Tester');

    // A new app on a new context (new pools, nothing held in memory); cookies are scoped by host, not port, so the
    // browser sends the same session cookie to the new one, and the session must come from PostgreSQL.
    await page.waitForLoadState('networkidle');
    await app.close();
    app = await startApp();
    await page.goto(app.url + '/account');
    await eventually(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Your account');
    await eventually(() => page.getByRole('button', { name: 'Account menu' }).textContent()).toContain('Restart Tester');
    await shot('signed-in-after-restart');

    // Writes still pass the CSRF check after the restart (the client fetches a token for the restored session).
    await page.locator('input[name="name"]').fill('Restart Tester Again');
    await page.getByRole('button', { name: 'Save name' }).click();
    await eventually(() => page.getByRole('button', { name: 'Account menu' }).textContent()).toContain('Restart Tester Again');
  }, JOURNEY_TIMEOUT_MS);
});

describe('journey: signed out in another tab', () => {
  it('sends the first tab to sign-in when it comes back into view', async () => {
    const user = await createTestUser(app.ctx, { roles: ['subscriber'], name: 'Two Tabs' });
    const first = await freshPage();
    const shot = journeyShots(first, 'two-tabs');
    await first.goto(app.url + '/sign-in?redirect=/account');
    await signInThroughForm(first, user.email, user.password);
    await atPath(first, '/account');
    await eventually(() => first.getByRole('heading', { level: 1 }).textContent()).toBe('Your account');

    // Same profile, so the same session cookie: signing out here ends the session for both tabs.
    const second = await browser!.context.newPage();
    await second.goto(app.url + '/');
    await signOutThroughMenu(second);

    // The shell checks again when the tab becomes visible (at most every 5 s). Headless chromium keeps every tab
    // "visible", so the event a browser sends on switching tabs is sent here by hand.
    await first.waitForTimeout(5_200);
    await first.bringToFront();
    await first.evaluate(() => document.dispatchEvent(new Event('visibilitychange')));
    await first.waitForURL((url) => url.pathname === '/sign-in' && url.searchParams.get('redirect') === '/account');
    await eventually(() => first.getByRole('link', { name: 'Sign in', exact: true }).isVisible()).toBe(true);
    await shot('first-tab-asked-to-sign-in');
  }, JOURNEY_TIMEOUT_MS);
});

describe('journey: the shell on a narrow screen', () => {
  it('folds the navigation into a drawer opened from the menu button', async () => {
    const page = await freshPage({ width: 390, height: 800 });
    const shot = journeyShots(page, 'narrow-shell');
    await page.goto(app.url + '/');
    await eventually(() => page.getByRole('heading', { level: 1 }).isVisible()).toBe(true);
    // No side column: the navigation is hidden until asked for.
    expect(await page.getByRole('navigation', { name: 'Main' }).count()).toBe(0);
    await shot('home-narrow');
    await page.getByRole('button', { name: 'Menu' }).click();
    await eventually(() => page.getByRole('navigation', { name: 'Main' }).isVisible()).toBe(true);
    await shot('drawer-open');
    await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Home' }).click();
    await eventually(() => page.getByRole('navigation', { name: 'Main' }).isVisible()).toBe(false);
  }, JOURNEY_TIMEOUT_MS);
});
