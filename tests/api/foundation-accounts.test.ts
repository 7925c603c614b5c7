// Accounts end to end through the real SMTP catcher: sign-up → verification mail → verify → sign-in,
// password reset, and the account page's changes. Runs against the real PostgreSQL test database.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestApp, guestAgent, signedInAgent, TEST_PASSWORD, uniqueEmail, type TestApp } from '../support/app.js';
import { listMail, tokenIn, waitForMail } from '../support/mail.js';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t.close();
});

const sessionCookie = (res: { headers: Record<string, unknown> }): string | undefined =>
  ([] as string[]).concat((res.headers['set-cookie'] as string[] | undefined) ?? []).find((c) => c.startsWith('thence.sid='))?.split(';')[0];

/** How long the newest token of a purpose lives, in seconds (expiry is set by the server, creation by the database). */
async function lifetimeSeconds(userId: string, purpose: string): Promise<number> {
  const row = await t.ctx.pool.query(`SELECT extract(epoch FROM expires_at - created_at)::float8 AS s FROM auth_tokens WHERE user_id = $1 AND purpose = $2 ORDER BY created_at DESC LIMIT 1`, [userId, purpose]);
  return row.rows[0].s;
}

describe('sign-up, verification mail, verify, sign-in', () => {
  it('walks the whole path through the SMTP catcher', async () => {
    const email = uniqueEmail('signup');
    const agent = await guestAgent(t.app);
    const signUp = await agent.post('/api/auth/sign-up').send({ name: 'Rosa Lindqvist', email: email.toUpperCase(), password: 'a-long-enough-secret', roles: ['publisher', 'subscriber'] });
    expect(signUp.status).toBe(201);
    expect(signUp.body.user).toMatchObject({ email, name: 'Rosa Lindqvist', roles: ['publisher', 'subscriber'], emailVerified: false, hasPassword: true, google: false });
    expect(signUp.body.user).not.toHaveProperty('passwordHash');

    // Signed in at once.
    await agent.refreshCsrf();
    expect((await agent.get('/api/auth/me')).body.user).toMatchObject({ email, emailVerified: false });

    const mail = await waitForMail(email, /Confirm your e-mail/);
    expect(mail.text).toContain('Rosa Lindqvist');
    const token = tokenIn(mail, `${t.ctx.config.publicUrl}/verify?token=`);
    // 32 random bytes in base64url are 43 characters.
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    // Only the digest is stored, never the token itself.
    const stored = await t.ctx.pool.query(`SELECT token_hash FROM auth_tokens t JOIN users u ON u.id = t.user_id WHERE u.email = $1`, [email]);
    expect(stored.rows).toHaveLength(1);
    expect(Buffer.from(stored.rows[0].token_hash).toString('base64url')).not.toBe(token);
    expect(await lifetimeSeconds(signUp.body.user.id, 'verify_email')).toBeCloseTo(24 * 3600, -1);

    const verify = await agent.post('/api/auth/verify').send({ token });
    expect(verify.status).toBe(200);
    expect(verify.body.user).toMatchObject({ email, emailVerified: true });
    expect((await agent.get('/api/auth/me')).body.user.emailVerified).toBe(true);

    // Single use.
    const again = await agent.post('/api/auth/verify').send({ token });
    expect(again.status).toBe(400);
    expect(again.body.error.code).toBe('invalid_token');
    expect(again.body.error.fields.token[0]).toMatch(/not valid/);

    await agent.signOut();
    expect((await agent.get('/api/auth/me')).body.user).toBeNull();
    const signIn = await agent.signIn(email, 'a-long-enough-secret');
    expect(signIn.status).toBe(200);
    expect(signIn.body.user).toMatchObject({ email, emailVerified: true });
  });

  it('answers invalid sign-up input with 400 and a message per field, and keeps nothing', async () => {
    const agent = await guestAgent(t.app);
    const res = await agent.post('/api/auth/sign-up').send({ name: '', email: 'not-an-address', password: 'short', roles: ['admin'] });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('bad_request');
    expect(Object.keys(res.body.error.fields).sort()).toEqual(['email', 'name', 'password', 'roles.0']);
    expect(res.body.error.fields.password).toEqual(['Use at least 10 characters.']);
    expect((await agent.get('/api/auth/me')).body.user).toBeNull();
  });

  it('refuses a taken address with 409 on the email field', async () => {
    const email = uniqueEmail('taken');
    const first = await guestAgent(t.app);
    expect((await first.post('/api/auth/sign-up').send({ name: 'First', email, password: 'first-password-ok', roles: ['subscriber'] })).status).toBe(201);
    const second = await guestAgent(t.app);
    const res = await second.post('/api/auth/sign-up').send({ name: 'Second', email, password: 'second-password-ok', roles: ['subscriber'] });
    expect(res.status).toBe(409);
    expect(res.body.error.fields.email[0]).toMatch(/already exists/);
  });

  it('rejects an expired verification link', async () => {
    const email = uniqueEmail('expired');
    const agent = await guestAgent(t.app);
    await agent.post('/api/auth/sign-up').send({ name: 'Late Reader', email, password: 'late-reader-pass', roles: ['subscriber'] }).expect(201);
    const token = tokenIn(await waitForMail(email, /Confirm/), `${t.ctx.config.publicUrl}/verify?token=`);
    await t.ctx.pool.query(`UPDATE auth_tokens SET expires_at = now() - interval '1 second' WHERE user_id = (SELECT id FROM users WHERE email = $1)`, [email]);
    await agent.refreshCsrf();
    const res = await agent.post('/api/auth/verify').send({ token });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('invalid_token');
  });

  it('resends the verification mail to a signed-in, unverified user', async () => {
    const agent = await signedInAgent(t, { verified: false });
    const before = new Date();
    await agent.post('/api/auth/resend-verification').expect(204);
    const mail = await waitForMail(agent.user.email, /Confirm/, { after: before });
    const token = tokenIn(mail, `${t.ctx.config.publicUrl}/verify?token=`);
    expect((await agent.post('/api/auth/verify').send({ token })).body.user.emailVerified).toBe(true);
    const guest = await guestAgent(t.app);
    expect((await guest.post('/api/auth/resend-verification')).status).toBe(401);
  });
});

describe('sign-in', () => {
  it('gives 401 invalid_credentials for a wrong password and for an unknown address alike', async () => {
    const agent = await signedInAgent(t);
    const guest = await guestAgent(t.app);
    const wrong = await guest.post('/api/auth/sign-in').send({ email: agent.user.email, password: 'not-the-password' });
    const unknown = await guest.post('/api/auth/sign-in').send({ email: uniqueEmail('ghost'), password: 'not-the-password' });
    for (const res of [wrong, unknown]) {
      expect(res.status).toBe(401);
      expect(res.body.error).toEqual({ code: 'invalid_credentials', message: 'The e-mail address or the password is not correct.' });
    }
  });

  it('gives the session a new id on sign-in (no session fixation)', async () => {
    const agent = await signedInAgent(t);
    const guest = await guestAgent(t.app);
    const anonymousSid = sessionCookie(await guest.get('/api/csrf'));
    expect(anonymousSid).toBeDefined();
    const signIn = await guest.post('/api/auth/sign-in').send({ email: agent.user.email, password: TEST_PASSWORD });
    expect(signIn.status).toBe(200);
    const after = sessionCookie(signIn);
    expect(after).toBeDefined();
    expect(after).not.toBe(anonymousSid);
    // The old anonymous session id does not carry the sign-in.
    expect((await request(t.app).get('/api/auth/me').set('Cookie', anonymousSid!)).body.user).toBeNull();
    expect((await request(t.app).get('/api/auth/me').set('Cookie', after!)).body.user.id).toBe(agent.user.id);
  });

  it('asks for a CSRF token on writes', async () => {
    const res = await request(t.app).post('/api/auth/sign-in').send({ email: 'a@example.test', password: 'x' });
    expect(res.status).toBe(403);
    expect(res.body.error.code).toBe('csrf');
  });
});

describe('password reset', () => {
  it('mails a one-hour link, sets the new password, and ends the old sessions', async () => {
    const agent = await signedInAgent(t);
    const email = agent.user.email;
    const guest = await guestAgent(t.app);
    const before = new Date();
    await guest.post('/api/auth/request-reset').send({ email }).expect(204);
    const mail = await waitForMail(email, /new Thence password/, { after: before });
    const token = tokenIn(mail, `${t.ctx.config.publicUrl}/reset?token=`);
    expect(await lifetimeSeconds(agent.user.id, 'reset_password')).toBeCloseTo(3600, -1);

    const tooShort = await guest.post('/api/auth/reset').send({ token, password: 'short' });
    expect(tooShort.status).toBe(400);
    expect(tooShort.body.error.fields.password).toBeDefined();

    await guest.post('/api/auth/reset').send({ token, password: 'brand-new-password-9' }).expect(204);
    // The link works once.
    expect((await guest.post('/api/auth/reset').send({ token, password: 'another-password-10' })).body.error.code).toBe('invalid_token');
    // The session signed in with the old password has ended.
    expect((await agent.get('/api/auth/me')).body.user).toBeNull();
    expect((await guest.signIn(email, TEST_PASSWORD)).status).toBe(401);
    expect((await guest.signIn(email, 'brand-new-password-9')).status).toBe(200);
  });

  it('answers 204 for an unknown address and sends nothing (no account enumeration)', async () => {
    const email = uniqueEmail('nobody');
    const guest = await guestAgent(t.app);
    const res = await guest.post('/api/auth/request-reset').send({ email });
    expect(res.status).toBe(204);
    await new Promise((resolve) => setTimeout(resolve, 500));
    expect(await listMail(email)).toEqual([]);
    expect((await guest.post('/api/auth/request-reset').send({ email: 'nope' })).body.error.fields.email).toBeDefined();
  });
});

describe('account', () => {
  it('renames the account and changes the password after checking the current one', async () => {
    const agent = await signedInAgent(t);
    const renamed = await agent.patch('/api/account').send({ name: '  Yusuf Okafor ' });
    expect(renamed.status).toBe(200);
    expect(renamed.body.user.name).toBe('Yusuf Okafor');
    expect((await agent.patch('/api/account').send({ name: '' })).body.error.fields.name).toEqual(['Enter your name.']);

    const wrong = await agent.post('/api/account/password').send({ currentPassword: 'not-it-at-all', newPassword: 'next-password-123' });
    expect(wrong.status).toBe(400);
    expect(wrong.body.error.fields.currentPassword).toEqual(['The current password is not correct.']);
    await agent.post('/api/account/password').send({ currentPassword: TEST_PASSWORD, newPassword: 'next-password-123' }).expect(204);
    // This session stays signed in.
    expect((await agent.get('/api/auth/me')).body.user.email).toBe(agent.user.email);
    const guest = await guestAgent(t.app);
    expect((await guest.signIn(agent.user.email, 'next-password-123')).status).toBe(200);
  });

  it('refuses account changes when signed out', async () => {
    const guest = await guestAgent(t.app);
    expect((await guest.patch('/api/account').send({ name: 'X' })).status).toBe(401);
    expect((await guest.post('/api/account/password').send({ currentPassword: 'a', newPassword: 'bbbbbbbbbbbb' })).status).toBe(401);
  });
});
