// Sessions live in PostgreSQL (connect-pg-simple), so a signed-in browser stays signed in across a server restart:
// two app instances with separate contexts (pools, stores) on the same database, as before and after a restart.
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, createTestUser, guestAgent, startTestServer } from '../support/app.js';

const cookieOf = (headers: Record<string, unknown>, name: string): string | undefined =>
  ([] as string[]).concat((headers['set-cookie'] as string[] | undefined) ?? []).find((c) => c.startsWith(`${name}=`))?.split(';')[0];

describe('session across a restart', () => {
  it('keeps the user signed in and the CSRF token valid on a new app instance', async () => {
    const before = await createTestApp();
    const user = await createTestUser(before.ctx, { roles: ['admin'] });
    const agent = await guestAgent(before.app);
    const signIn = await agent.signIn(user.email, user.password);
    expect(signIn.status).toBe(200);
    const sid = cookieOf(signIn.headers, 'thence.sid');
    expect(sid).toBeDefined();
    const csrfRes = await request(before.app).get('/api/csrf').set('Cookie', sid!);
    const csrfCookie = cookieOf(csrfRes.headers, 'thence.csrf');
    const token = csrfRes.body.token as string;
    // Cookie flags: HttpOnly and SameSite on the session cookie (Secure too when served over HTTPS).
    const raw = ([] as string[]).concat(signIn.headers['set-cookie'] as unknown as string[]).find((c) => c.startsWith('thence.sid='))!;
    expect(raw).toMatch(/HttpOnly/);
    expect(raw).toMatch(/SameSite=Lax/);
    await before.close();

    const after = await createTestApp();
    try {
      const me = await request(after.app).get('/api/auth/me').set('Cookie', sid!);
      expect(me.body.user).toMatchObject({ id: user.id, email: user.email, roles: ['admin'] });
      expect((await request(after.app).get('/api/admin/users').set('Cookie', sid!)).status).toBe(200);
      // A write with the token issued before the restart is still accepted.
      const rename = await request(after.app)
        .patch('/api/account')
        .set('Cookie', [sid!, csrfCookie!].join('; '))
        .set('X-CSRF-Token', token)
        .send({ name: 'Still Here' });
      expect(rename.status).toBe(200);
      expect(rename.body.user.name).toBe('Still Here');
      // Without the cookie, nobody is signed in.
      expect((await request(after.app).get('/api/auth/me')).body.user).toBeNull();
    } finally {
      await after.close();
    }
  });

  it('ends the session on sign-out, on every instance', async () => {
    const first = await createTestApp();
    const second = await createTestApp();
    try {
      const user = await createTestUser(first.ctx);
      const agent = await guestAgent(first.app);
      const sid = cookieOf((await agent.signIn(user.email, user.password)).headers, 'thence.sid')!;
      expect((await request(second.app).get('/api/auth/me').set('Cookie', sid)).body.user.id).toBe(user.id);
      await agent.signOut();
      expect((await request(second.app).get('/api/auth/me').set('Cookie', sid)).body.user).toBeNull();
    } finally {
      await first.close();
      await second.close();
    }
  });
});

describe('test server on a loopback port', () => {
  it('serves the API at the URL its mailed links and callbacks use', async () => {
    const server = await startTestServer();
    try {
      expect(server.ctx.config.publicUrl).toBe(server.url);
      const res = await fetch(`${server.url}/api/auth/me`);
      expect(res.status).toBe(200);
      expect(await res.json()).toEqual({ user: null });
    } finally {
      await server.close();
    }
  });
});

describe('cookies behind HTTPS', () => {
  it('are Secure, HttpOnly, SameSite=Lax and __Host- prefixed (RFC 6265bis, the "__Host-" prefix: Secure, Path=/, no Domain; section number from memory: §4.1.3.2)', async () => {
    const secure = await createTestApp({ cookieSecure: true, publicUrl: 'https://thence.example' });
    try {
      // A TLS-terminating proxy on loopback (trust proxy: loopback) tells the app the request came over HTTPS.
      const res = await request(secure.app).get('/api/csrf').set('X-Forwarded-Proto', 'https');
      expect(res.status).toBe(200);
      const cookies = ([] as string[]).concat(res.headers['set-cookie'] as unknown as string[]);
      const sid = cookies.find((c) => c.startsWith('__Host-thence.sid='));
      const csrf = cookies.find((c) => c.startsWith('__Host-thence.csrf='));
      for (const cookie of [sid, csrf]) {
        expect(cookie).toBeDefined();
        expect(cookie).toMatch(/; Secure/);
        expect(cookie).toMatch(/; HttpOnly/);
        expect(cookie).toMatch(/; SameSite=Lax/i);
        expect(cookie).toMatch(/; Path=\//);
        expect(cookie).not.toMatch(/Domain=/i);
      }
      expect(res.headers['strict-transport-security']).toMatch(/max-age=\d+/);
    } finally {
      await secure.close();
    }
  });
});
