// "Sign in with Google" through the local OpenID Connect stand-in (oauth2-mock-server), following the real
// redirects: app /api/auth/google → stand-in /authorize → app /api/auth/google/callback (authorization code
// flow with state and PKCE, RFC 6749 §4.1 and RFC 7636), the app's session cookie kept by the supertest agent.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, createTestUser, guestAgent, uniqueEmail, type TestAgent, type TestApp } from '../support/app.js';
import { startOAuthStandIn, type OAuthStandIn } from '../../server/fakes/oauth.js';

let standIn: OAuthStandIn;
let t: TestApp;
beforeAll(async () => {
  standIn = await startOAuthStandIn({ port: 0 });
  t = await createTestApp({ google: { issuer: standIn.url, clientId: 'thence-test-client', clientSecret: 'thence-test-secret' } });
});
afterAll(async () => {
  await t.close();
  await standIn.close();
});

const pathOf = (location: string) => {
  const url = new URL(location, 'http://app.invalid');
  return url.pathname + url.search;
};

/** Runs the redirect dance and returns where the app finally sends the browser. */
async function googleSignIn(agent: TestAgent, loginHint?: string, tamper?: (callback: URL) => void): Promise<string> {
  const start = await agent.get(`/api/auth/google${loginHint ? `?login_hint=${encodeURIComponent(loginHint)}` : ''}`);
  expect(start.status).toBe(302);
  const authorize = new URL(start.headers.location);
  expect(authorize.origin).toBe(standIn.url);
  expect(authorize.pathname).toBe('/authorize');
  expect(authorize.searchParams.get('client_id')).toBe('thence-test-client');
  expect(authorize.searchParams.get('scope')).toBe('openid email profile');
  expect(authorize.searchParams.get('state')).toBeTruthy();
  expect(authorize.searchParams.get('code_challenge_method')).toBe('S256');
  expect(authorize.searchParams.get('redirect_uri')).toBe(`${t.ctx.config.publicUrl}/api/auth/google/callback`);

  const atStandIn = await fetch(authorize, { redirect: 'manual' });
  expect(atStandIn.status).toBe(302);
  const callback = new URL(atStandIn.headers.get('location')!);
  expect(callback.pathname).toBe('/api/auth/google/callback');
  tamper?.(callback);
  const back = await agent.get(pathOf(callback.href));
  expect(back.status).toBe(303);
  await agent.refreshCsrf();
  return back.headers.location;
}

describe('Google sign-in through the stand-in', () => {
  it('creates a verified subscriber account for a new Google user, and finds it again next time', async () => {
    const email = uniqueEmail('google.new');
    const agent = await guestAgent(t.app);
    expect(await googleSignIn(agent, email)).toBe('/?signedIn=google');
    const me = (await agent.get('/api/auth/me')).body.user;
    expect(me).toMatchObject({ email, roles: ['subscriber'], emailVerified: true, google: true, hasPassword: false });

    const again = await guestAgent(t.app);
    expect(await googleSignIn(again, email)).toBe('/?signedIn=google');
    expect((await again.get('/api/auth/me')).body.user.id).toBe(me.id);
    const rows = await t.ctx.pool.query(`SELECT count(*)::int AS n FROM users WHERE email = $1`, [email]);
    expect(rows.rows[0].n).toBe(1);
  });

  it('signs in as the demo subscriber when no account is hinted', async () => {
    const agent = await guestAgent(t.app);
    expect(await googleSignIn(agent)).toBe('/?signedIn=google');
    expect((await agent.get('/api/auth/me')).body.user).toMatchObject({ email: 'omar.subscriber@demo.thence.test', google: true });
  });

  it('links a Google identity to the existing account with the same verified address', async () => {
    const existing = await createTestUser(t.ctx, { roles: ['publisher'], verified: false });
    const agent = await guestAgent(t.app);
    expect(await googleSignIn(agent, existing.email)).toBe('/?signedIn=google');
    const me = (await agent.get('/api/auth/me')).body.user;
    expect(me).toMatchObject({ id: existing.id, roles: ['publisher'], google: true, hasPassword: true, emailVerified: true });
    // The password still works too.
    expect((await (await guestAgent(t.app)).signIn(existing.email, existing.password)).status).toBe(200);
  });

  it('refuses a Google account whose address Google has not verified, and creates nothing', async () => {
    const email = uniqueEmail('google.unverified');
    const put = await fetch(`${standIn.url}/standin/identities/${encodeURIComponent(email)}`, {
      method: 'PUT',
      headers: { 'Content-Type': 'application/json' },
      body: JSON.stringify({ name: 'Unverified Person', email_verified: false }),
    });
    expect(put.status).toBe(200);
    const agent = await guestAgent(t.app);
    expect(await googleSignIn(agent, email)).toBe('/sign-in?error=google');
    expect((await agent.get('/api/auth/me')).body.user).toBeNull();
    expect((await t.ctx.pool.query(`SELECT 1 FROM users WHERE email = $1`, [email])).rowCount).toBe(0);
  });

  it('refuses a callback whose state does not belong to this browser session', async () => {
    const agent = await guestAgent(t.app);
    const landing = await googleSignIn(agent, uniqueEmail('google.forged'), (callback) => callback.searchParams.set('state', 'forged-state-value'));
    expect(landing).toBe('/sign-in?error=google');
    expect((await agent.get('/api/auth/me')).body.user).toBeNull();
  });

  it('signs in as whoever is chosen on the stand-in\'s page', async () => {
    const page = await fetch(`${standIn.url}/standin`);
    expect(page.headers.get('content-type')).toMatch(/text\/html/);
    expect(await page.text()).toContain('Ada Quillfeather');
    const chosen = uniqueEmail('google.chosen');
    const choose = await fetch(`${standIn.url}/standin/default`, {
      method: 'POST',
      headers: { 'Content-Type': 'application/x-www-form-urlencoded' },
      body: new URLSearchParams({ email: 'omar.subscriber@demo.thence.test', other: chosen }),
      redirect: 'manual',
    });
    expect(choose.status).toBe(303);
    try {
      const agent = await guestAgent(t.app);
      expect(await googleSignIn(agent)).toBe('/?signedIn=google');
      expect((await agent.get('/api/auth/me')).body.user.email).toBe(chosen);
      const bad = await fetch(`${standIn.url}/standin/default`, { method: 'PUT', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ email: 'no' }) });
      expect(bad.status).toBe(400);
    } finally {
      await fetch(`${standIn.url}/standin/default`, { method: 'PUT', headers: { 'Content-Type': 'application/json' }, body: JSON.stringify({ email: 'omar.subscriber@demo.thence.test' }) });
    }
  });

  it('says which providers are on', async () => {
    expect((await (await guestAgent(t.app)).get('/api/auth/providers')).body).toEqual({ password: true, google: true });
  });
});

describe('without Google configured', () => {
  it('sends the browser back to the sign-in page instead of failing', async () => {
    const bare = await createTestApp({ google: { issuer: null, clientId: '', clientSecret: '' } });
    try {
      const agent = await guestAgent(bare.app);
      const res = await agent.get('/api/auth/google');
      expect(res.status).toBe(303);
      expect(res.headers.location).toBe('/sign-in?error=google-unavailable');
      expect((await agent.get('/api/auth/providers')).body.google).toBe(false);
    } finally {
      await bare.close();
    }
  });
});
