// The demo seed's accounts: created verified with the demo password and roles, and a second run changes nothing.
import { afterAll, beforeAll, expect, it } from 'vitest';
import { createTestApp, guestAgent, type TestApp } from '../support/app.js';
import { seedAccounts } from '../../server/seed/index.js';
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../../server/seed/demo-accounts.js';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t.close();
});

it('seeds the three demo accounts idempotently', async () => {
  await seedAccounts(t.ctx, () => {});
  const before = await t.ctx.pool.query(`SELECT email, roles, password_hash, email_verified_at FROM users WHERE email = ANY($1) ORDER BY email`, [DEMO_ACCOUNTS.map((a) => a.email)]);
  expect(before.rows).toHaveLength(3);
  await seedAccounts(t.ctx, () => {});
  const after = await t.ctx.pool.query(`SELECT email, roles, password_hash, email_verified_at FROM users WHERE email = ANY($1) ORDER BY email`, [DEMO_ACCOUNTS.map((a) => a.email)]);
  expect(after.rows).toEqual(before.rows);

  const admin = DEMO_ACCOUNTS.find((a) => a.roles.includes('admin'))!;
  const agent = await guestAgent(t.app);
  const res = await agent.signIn(admin.email, DEMO_PASSWORD);
  expect(res.status).toBe(200);
  expect(res.body.user).toMatchObject({ email: admin.email, emailVerified: true });
  expect([...res.body.user.roles].sort()).toEqual(['admin', 'publisher', 'subscriber']);
  expect((await agent.get('/api/admin/users')).status).toBe(200);
});
