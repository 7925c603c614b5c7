import type { MigrationInterface, QueryRunner } from 'typeorm';

/** One-time tokens for e-mail verification and password reset; only the SHA-256 of each token is stored. */
export class AuthTokens1764610000000 implements MigrationInterface {
  name = 'AuthTokens1764610000000';
  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE auth_tokens (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      user_id uuid NOT NULL REFERENCES users (id) ON DELETE CASCADE,
      purpose text NOT NULL CONSTRAINT auth_tokens_purpose_known CHECK (purpose IN ('verify_email', 'reset_password')),
      token_hash bytea NOT NULL UNIQUE,
      expires_at timestamptz NOT NULL,
      used_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now()
    )`);
    await q.query(`CREATE INDEX auth_tokens_user_purpose_idx ON auth_tokens (user_id, purpose)`);
    await q.query(`CREATE INDEX auth_tokens_expires_idx ON auth_tokens (expires_at)`);
  }
  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE auth_tokens`);
  }
}
