import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Listings, knowledge-base versions, their uploaded files and the job log.
 * The fact store itself (per-version term dictionary and fact table, named by store_key) is created by
 * server/services/factStore.ts at load time, not here: one pair of tables per version.
 */
export class Listings1764700000000 implements MigrationInterface {
  name = 'Listings1764700000000';
  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE listings (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      publisher_id uuid NOT NULL REFERENCES users(id),
      slug text NOT NULL UNIQUE,
      title text NOT NULL,
      summary text NOT NULL DEFAULT '',
      description_md text NOT NULL DEFAULT '',
      tags text[] NOT NULL DEFAULT '{}',
      licence text NOT NULL DEFAULT '',
      contact text NOT NULL DEFAULT '',
      published_version_id uuid NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      CONSTRAINT listings_slug_shape CHECK (slug ~ '^[a-z0-9](?:[a-z0-9-]{0,62}[a-z0-9])?$')
    )`);
    await q.query(`CREATE INDEX listings_publisher_idx ON listings (publisher_id)`);
    // store_key: a small integer naming the version's fact tables (kb_facts_<key>, kb_terms_<key>).
    await q.query(`CREATE SEQUENCE kb_store_key_seq AS integer START 1`);
    await q.query(`CREATE TABLE kb_versions (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      listing_id uuid NOT NULL REFERENCES listings(id) ON DELETE CASCADE,
      number integer NOT NULL,
      store_key integer NOT NULL UNIQUE DEFAULT nextval('kb_store_key_seq'),
      status text NOT NULL DEFAULT 'queued',
      stage text NULL,
      progress real NOT NULL DEFAULT 0,
      mode text NOT NULL DEFAULT 'strict',
      profile jsonb NULL,
      rewriting jsonb NULL,
      program text NULL,
      counts jsonb NULL,
      diagnostics jsonb NULL,
      explanation jsonb NULL,
      timings jsonb NULL,
      fact_count bigint NULL,
      job_id text NULL,
      attempts integer NOT NULL DEFAULT 0,
      cancel_requested boolean NOT NULL DEFAULT false,
      heartbeat_at timestamptz NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      started_at timestamptz NULL,
      finished_at timestamptz NULL,
      error text NULL,
      CONSTRAINT kb_versions_number_unique UNIQUE (listing_id, number),
      CONSTRAINT kb_versions_status_known CHECK (status IN ('queued','processing','ready','failed','inconsistent','cancelled')),
      CONSTRAINT kb_versions_mode_known CHECK (mode IN ('strict','approximate'))
    )`);
    await q.query(`ALTER SEQUENCE kb_store_key_seq OWNED BY kb_versions.store_key`);
    await q.query(`CREATE INDEX kb_versions_status_idx ON kb_versions (status) WHERE status IN ('queued','processing')`);
    await q.query(`ALTER TABLE listings ADD CONSTRAINT listings_published_version_fk
      FOREIGN KEY (published_version_id) REFERENCES kb_versions(id) ON DELETE SET NULL`);
    await q.query(`CREATE TABLE kb_files (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      version_id uuid NOT NULL REFERENCES kb_versions(id) ON DELETE CASCADE,
      role text NOT NULL,
      position integer NOT NULL DEFAULT 0,
      original_name text NOT NULL,
      stored_path text NOT NULL,
      format text NOT NULL,
      size_bytes bigint NOT NULL,
      sha256 text NOT NULL,
      csv_mapping jsonb NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      CONSTRAINT kb_files_role_known CHECK (role IN ('ontology','dataset'))
    )`);
    await q.query(`CREATE INDEX kb_files_version_idx ON kb_files (version_id)`);
    await q.query(`CREATE TABLE kb_version_log (
      id bigserial PRIMARY KEY,
      version_id uuid NOT NULL REFERENCES kb_versions(id) ON DELETE CASCADE,
      at timestamptz NOT NULL DEFAULT clock_timestamp(),
      level text NOT NULL DEFAULT 'info',
      message text NOT NULL
    )`);
    await q.query(`CREATE INDEX kb_version_log_version_idx ON kb_version_log (version_id, id)`);
  }
  async down(q: QueryRunner): Promise<void> {
    await q.query(`DROP TABLE kb_version_log`);
    await q.query(`DROP TABLE kb_files`);
    await q.query(`ALTER TABLE listings DROP CONSTRAINT listings_published_version_fk`);
    await q.query(`DROP TABLE kb_versions`);
    await q.query(`DROP TABLE listings`);
  }
}
