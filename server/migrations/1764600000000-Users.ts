import type { MigrationInterface, QueryRunner } from 'typeorm';

export class Users1764600000000 implements MigrationInterface {
  name = 'Users1764600000000';
  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE EXTENSION IF NOT EXISTS pgcrypto`);
    await q.query(`CREATE TABLE users (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      email text NOT NULL UNIQUE,
      name text NOT NULL,
      password_hash text,
      google_id text UNIQUE,
      email_verified_at timestamptz,
      roles text[] NOT NULL DEFAULT '{subscriber}',
      created_at timestamptz NOT NULL DEFAULT now(),
      CONSTRAINT users_roles_known CHECK (roles <@ ARRAY['publisher','subscriber','admin']::text[])
    )`);
    // Table layout required by connect-pg-simple (its documented table.sql).
    await q.query(`CREATE TABLE session (
      sid varchar NOT NULL PRIMARY KEY,
      sess json NOT NULL,
      expire timestamp(6) NOT NULL
    )`);
    await q.query(`CREATE INDEX session_expire_idx ON session (expire)`);
  }
  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE session`);
    await q.query(`DROP TABLE users`);
  }
}
