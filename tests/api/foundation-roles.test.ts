// Role boundaries on the admin routes (401 signed out, 403 without the role) and role administration.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, createTestUser, guestAgent, signedInAgent, uniqueEmail, type TestApp } from '../support/app.js';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t.close();
});

describe('admin routes refuse everyone but admins', () => {
  it('gives 401 when signed out', async () => {
    const guest = await guestAgent(t.app);
    const list = await guest.get('/api/admin/users');
    expect(list.status).toBe(401);
    expect(list.body.error.code).toBe('unauthenticated');
    const target = await createTestUser(t.ctx);
    expect((await guest.put(`/api/admin/users/${target.id}/roles`).send({ roles: ['admin'] })).status).toBe(401);
  });

  it.each([[['publisher']], [['subscriber']], [['publisher', 'subscriber']]] as const)('gives 403 JSON to %j', async (roles) => {
    const agent = await signedInAgent(t, { roles: [...roles] });
    const list = await agent.get('/api/admin/users');
    expect(list.status).toBe(403);
    expect(list.headers['content-type']).toMatch(/application\/json/);
    expect(list.body.error).toEqual({ code: 'forbidden', message: 'This needs the admin role.' });
    // Nobody grants themselves admin.
    const self = await agent.put(`/api/admin/users/${agent.user.id}/roles`).send({ roles: ['admin'] });
    expect(self.status).toBe(403);
    const row = await t.ctx.pool.query(`SELECT roles FROM users WHERE id = $1`, [agent.user.id]);
    expect(row.rows[0].roles).toEqual([...roles]);
  });

  it('lets an admin list and search accounts, a page at a time', async () => {
    const admin = await signedInAgent(t, { roles: ['admin'] });
    const marker = uniqueEmail('findme').split('@')[0];
    for (let i = 0; i < 3; i++) await createTestUser(t.ctx, { email: `${marker}.${i}@example.test`, name: `Searchable ${i}` });
    const page1 = await admin.get(`/api/admin/users?search=${encodeURIComponent(marker)}&pageSize=2&page=1`);
    expect(page1.status).toBe(200);
    expect(page1.body.total).toBe(3);
    expect(page1.body.users).toHaveLength(2);
    expect(Object.keys(page1.body.users[0]).sort()).toEqual(['createdAt', 'email', 'emailVerified', 'id', 'name', 'roles']);
    const page2 = await admin.get(`/api/admin/users?search=${encodeURIComponent(marker.toUpperCase())}&pageSize=2&page=2`);
    expect(page2.body.users).toHaveLength(1);
    const all = new Set([...page1.body.users, ...page2.body.users].map((u: { email: string }) => u.email));
    expect(all.size).toBe(3);
    // LIKE wildcards are literal: "%" matches nobody here.
    expect((await admin.get(`/api/admin/users?search=${encodeURIComponent(marker + '%')}`)).body.total).toBe(0);
    const bad = await admin.get('/api/admin/users?page=0&pageSize=abc');
    expect(bad.status).toBe(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['page', 'pageSize']);
  });
});

describe('granting and removing roles', () => {
  it('takes effect on the next request of the changed user', async () => {
    const admin = await signedInAgent(t, { roles: ['admin'] });
    const user = await signedInAgent(t, { roles: ['subscriber'] });
    expect((await user.get('/api/admin/users')).status).toBe(403);

    const grant = await admin.put(`/api/admin/users/${user.user.id}/roles`).send({ roles: ['subscriber', 'admin', 'publisher'] });
    expect(grant.status).toBe(200);
    // Stored in one canonical order.
    expect(grant.body.user.roles).toEqual(['publisher', 'subscriber', 'admin']);
    expect((await user.get('/api/auth/me')).body.user.roles).toEqual(['publisher', 'subscriber', 'admin']);
    expect((await user.get('/api/admin/users')).status).toBe(200);

    await admin.put(`/api/admin/users/${user.user.id}/roles`).send({ roles: ['publisher'] }).expect(200);
    expect((await user.get('/api/admin/users')).status).toBe(403);
    expect((await user.get('/api/auth/me')).body.user.roles).toEqual(['publisher']);
  });

  it('does not let an admin remove their own admin role', async () => {
    const admin = await signedInAgent(t, { roles: ['admin', 'publisher'] });
    const res = await admin.put(`/api/admin/users/${admin.user.id}/roles`).send({ roles: ['publisher'] });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.roles[0]).toMatch(/own admin role/);
    expect((await admin.get('/api/auth/me')).body.user.roles).toEqual(['publisher', 'admin']);
    // Changing their other roles is fine.
    expect((await admin.put(`/api/admin/users/${admin.user.id}/roles`).send({ roles: ['admin'] })).body.user.roles).toEqual(['admin']);
  });

  it('answers unknown roles with 400 and unknown users with 404', async () => {
    const admin = await signedInAgent(t, { roles: ['admin'] });
    const target = await createTestUser(t.ctx);
    const badRole = await admin.put(`/api/admin/users/${target.id}/roles`).send({ roles: ['owner'] });
    expect(badRole.status).toBe(400);
    expect(badRole.body.error.fields['roles.0']).toBeDefined();
    expect((await admin.put('/api/admin/users/00000000-0000-4000-8000-000000000000/roles').send({ roles: [] })).status).toBe(404);
    expect((await admin.put('/api/admin/users/not-a-uuid/roles').send({ roles: [] })).status).toBe(404);
  });
});
