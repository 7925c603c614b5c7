// One-time link tokens on the real database: single use even under concurrent use, purpose-bound, expiring,
// stored only as SHA-256 (FIPS 180-4; the digest of "abc" is the standard's own example).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createTestApp, createTestUser, type TestApp } from '../support/app.js';
import { consumeToken, hashToken, issueToken } from '../../server/services/tokens.js';

let t: TestApp;
beforeAll(async () => {
  t = await createTestApp();
});
afterAll(async () => {
  await t.close();
});

describe('one-time tokens', () => {
  it('hashes with SHA-256', () => {
    // FIPS 180-4 example (appendix, "abc"), from memory: ba7816bf…15ad.
    expect(hashToken('abc').toString('hex')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('lets exactly one of many concurrent uses succeed', async () => {
    const user = await createTestUser(t.ctx);
    const token = await issueToken(t.ctx, user.id, 'reset_password');
    const results = await Promise.all(Array.from({ length: 8 }, () => consumeToken(t.ctx, token, 'reset_password')));
    expect(results.filter((id) => id === user.id)).toHaveLength(1);
    expect(results.filter((id) => id === null)).toHaveLength(7);
  });

  it('is bound to its purpose', async () => {
    const user = await createTestUser(t.ctx);
    const token = await issueToken(t.ctx, user.id, 'verify_email');
    expect(await consumeToken(t.ctx, token, 'reset_password')).toBeNull();
    expect(await consumeToken(t.ctx, token, 'verify_email')).toBe(user.id);
  });

  it('clears a user\'s long-expired tokens when a new one is issued', async () => {
    const user = await createTestUser(t.ctx);
    const old = await issueToken(t.ctx, user.id, 'verify_email');
    await t.ctx.pool.query(`UPDATE auth_tokens SET expires_at = now() - interval '2 days' WHERE token_hash = $1`, [hashToken(old)]);
    await issueToken(t.ctx, user.id, 'reset_password');
    const rows = await t.ctx.pool.query(`SELECT purpose FROM auth_tokens WHERE user_id = $1`, [user.id]);
    expect(rows.rows.map((r) => r.purpose)).toEqual(['reset_password']);
  });
});
