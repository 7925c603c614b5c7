// One-time link tokens (e-mail verification, password reset): 32 random bytes, only their SHA-256 is stored,
// each usable once before it expires. Following the OWASP Forgot Password Cheat Sheet (common practice).
import { createHash, randomBytes } from 'node:crypto';
import type { AppContext } from '../context.js';
import type { AuthTokenPurpose } from '../entities/AuthToken.js';

/** How long a link stays valid: a day to verify an address, an hour to reset a password (common practice). */
export const TOKEN_LIFETIME_MS: Record<AuthTokenPurpose, number> = {
  verify_email: 24 * 3600 * 1000,
  reset_password: 3600 * 1000,
};

/** Returns the SHA-256 digest under which a raw token is stored. */
export function hashToken(raw: string): Buffer {
  return createHash('sha256').update(raw, 'utf8').digest();
}

/** Issues a new token for the user and returns the raw value (base64url) that goes into the link. */
export async function issueToken(ctx: AppContext, userId: string, purpose: AuthTokenPurpose): Promise<string> {
  // Housekeeping on the way: this user's long-dead tokens go, so the table stays the size of its active users.
  await ctx.pool.query(`DELETE FROM auth_tokens WHERE user_id = $1 AND expires_at < now() - interval '1 day'`, [userId]);
  const raw = randomBytes(32).toString('base64url');
  const expiresAt = new Date(Date.now() + TOKEN_LIFETIME_MS[purpose]);
  await ctx.pool.query(`INSERT INTO auth_tokens (user_id, purpose, token_hash, expires_at) VALUES ($1, $2, $3, $4)`, [
    userId,
    purpose,
    hashToken(raw),
    expiresAt,
  ]);
  return raw;
}

/**
 * Marks the token used and returns its user id, or null when it is unknown, expired, already used or for another purpose.
 * One UPDATE ... RETURNING, so two concurrent uses of the same link cannot both succeed.
 */
export async function consumeToken(ctx: AppContext, raw: string, purpose: AuthTokenPurpose): Promise<string | null> {
  const result = await ctx.pool.query<{ user_id: string }>(
    `UPDATE auth_tokens SET used_at = now()
      WHERE token_hash = $1 AND purpose = $2 AND used_at IS NULL AND expires_at > now()
      RETURNING user_id`,
    [hashToken(raw), purpose],
  );
  return result.rows[0]?.user_id ?? null;
}

/** Voids every open token of one purpose for a user (e.g. all reset links once the password changed). */
export async function revokeTokens(ctx: AppContext, userId: string, purpose: AuthTokenPurpose): Promise<void> {
  await ctx.pool.query(`UPDATE auth_tokens SET used_at = now() WHERE user_id = $1 AND purpose = $2 AND used_at IS NULL`, [userId, purpose]);
}

/** Deletes tokens that can no longer be used; a housekeeping step, safe to run at any time. */
export async function pruneTokens(ctx: AppContext): Promise<number> {
  const result = await ctx.pool.query(`DELETE FROM auth_tokens WHERE expires_at < now() - interval '7 days'`);
  return result.rowCount ?? 0;
}
