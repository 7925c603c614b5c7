// Sign-in attempts are rate-limited per address and client: 10 failures in 15 minutes, then 429 with the
// IETF RateLimit headers (draft-ietf-httpapi-ratelimit-headers-08) and Retry-After (RFC 9110 §10.2.3).
import { afterAll, beforeAll, expect, it } from 'vitest';
import { createTestApp, createTestUser, guestAgent, type TestApp } from '../support/app.js';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t.close();
});

it('stops an address after 10 failed attempts; successes do not count; other addresses are unaffected', async () => {
  const victim = await createTestUser(t.ctx);
  const bystander = await createTestUser(t.ctx);
  const agent = await guestAgent(t.app);
  const attempt = (email: string, password: string) => agent.post('/api/auth/sign-in').send({ email, password });

  for (let i = 0; i < 9; i++) expect((await attempt(victim.email, `wrong-guess-${i}`)).status).toBe(401);
  // A correct sign-in in between is not held against the owner.
  const success = await attempt(victim.email, victim.password);
  expect(success.status).toBe(200);
  await agent.refreshCsrf();
  expect((await attempt(victim.email, 'wrong-guess-9')).status).toBe(401);

  const limited = await attempt(victim.email, victim.password);
  expect(limited.status).toBe(429);
  expect(limited.body.error.code).toBe('rate_limited');
  expect(limited.body.error.message).toMatch(/15 minutes/);
  expect(limited.headers['ratelimit-policy']).toMatch(/q=10; w=900/);
  expect(limited.headers.ratelimit).toMatch(/r=0/);
  expect(Number(limited.headers['retry-after'])).toBeGreaterThan(0);

  // The same address in other letter case is the same address.
  expect((await attempt(victim.email.toUpperCase(), victim.password)).status).toBe(429);
  expect((await attempt(bystander.email, bystander.password)).status).toBe(200);
});
