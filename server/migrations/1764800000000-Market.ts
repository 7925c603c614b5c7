import type { MigrationInterface, QueryRunner } from 'typeorm';

// Marketplace tables: plans, subscriptions, API keys, invoices, webhook events, usage counters, rate-limit buckets, quota notices.
export class Market1764800000000 implements MigrationInterface {
  name = 'Market1764800000000';
  async up(q: QueryRunner): Promise<void> {
    await q.query(`CREATE TABLE plans (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      listing_id uuid NOT NULL REFERENCES listings(id) ON DELETE CASCADE,
      name text NOT NULL,
      description text NOT NULL DEFAULT '',
      kind text NOT NULL CHECK (kind IN ('free','paid')),
      price_cents integer NOT NULL DEFAULT 0 CHECK (price_cents >= 0),
      currency text NOT NULL DEFAULT 'eur',
      monthly_quota integer NOT NULL CHECK (monthly_quota > 0),
      rate_per_minute integer NOT NULL CHECK (rate_per_minute > 0),
      stripe_product_id text,
      stripe_price_id text UNIQUE,
      archived_at timestamptz,
      position integer NOT NULL DEFAULT 0,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now(),
      CONSTRAINT plans_price_matches_kind CHECK ((kind = 'free' AND price_cents = 0) OR (kind = 'paid' AND price_cents > 0))
    )`);
    await q.query(`CREATE INDEX plans_listing_idx ON plans (listing_id)`);

    await q.query(`CREATE TABLE subscriptions (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      subscriber_id uuid NOT NULL REFERENCES users(id) ON DELETE CASCADE,
      listing_id uuid NOT NULL REFERENCES listings(id) ON DELETE CASCADE,
      plan_id uuid NOT NULL REFERENCES plans(id),
      status text NOT NULL CHECK (status IN ('pending','active','past_due','canceled')),
      stripe_customer_id text,
      stripe_subscription_id text UNIQUE,
      stripe_checkout_session_id text UNIQUE,
      current_period_start timestamptz,
      current_period_end timestamptz,
      cancel_at_period_end boolean NOT NULL DEFAULT false,
      canceled_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now(),
      updated_at timestamptz NOT NULL DEFAULT now()
    )`);
    // One live subscription per subscriber and listing; pending (unfinished checkouts) and canceled rows may repeat.
    await q.query(`CREATE UNIQUE INDEX subscriptions_one_live_idx ON subscriptions (subscriber_id, listing_id) WHERE status IN ('active','past_due')`);
    await q.query(`CREATE INDEX subscriptions_listing_idx ON subscriptions (listing_id)`);

    await q.query(`CREATE TABLE api_keys (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      subscription_id uuid NOT NULL REFERENCES subscriptions(id) ON DELETE CASCADE,
      name text NOT NULL,
      prefix text NOT NULL UNIQUE,
      secret_sha256 text NOT NULL,
      created_at timestamptz NOT NULL DEFAULT now(),
      last_used_at timestamptz,
      revoked_at timestamptz
    )`);
    await q.query(`CREATE INDEX api_keys_subscription_idx ON api_keys (subscription_id)`);

    await q.query(`CREATE TABLE invoices (
      id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
      subscription_id uuid NOT NULL REFERENCES subscriptions(id) ON DELETE CASCADE,
      listing_id uuid NOT NULL REFERENCES listings(id) ON DELETE CASCADE,
      stripe_invoice_id text NOT NULL UNIQUE,
      status text NOT NULL CHECK (status IN ('paid','failed')),
      amount_cents integer NOT NULL,
      currency text NOT NULL,
      platform_fee_cents integer NOT NULL,
      publisher_share_cents integer NOT NULL,
      period_start timestamptz,
      period_end timestamptz,
      paid_at timestamptz,
      created_at timestamptz NOT NULL DEFAULT now(),
      CONSTRAINT invoices_split_adds_up CHECK (platform_fee_cents + publisher_share_cents = amount_cents)
    )`);
    await q.query(`CREATE INDEX invoices_listing_idx ON invoices (listing_id, created_at)`);

    await q.query(`CREATE TABLE webhook_events (
      id text PRIMARY KEY,
      type text NOT NULL,
      received_at timestamptz NOT NULL DEFAULT now()
    )`);

    await q.query(`CREATE TABLE usage_counters (
      api_key_id uuid NOT NULL REFERENCES api_keys(id) ON DELETE CASCADE,
      subscription_id uuid NOT NULL REFERENCES subscriptions(id) ON DELETE CASCADE,
      listing_id uuid NOT NULL REFERENCES listings(id) ON DELETE CASCADE,
      hour timestamptz NOT NULL,
      status_class smallint NOT NULL CHECK (status_class IN (2,3,4,5)),
      latency_bucket smallint NOT NULL,
      count bigint NOT NULL,
      PRIMARY KEY (api_key_id, hour, status_class, latency_bucket, listing_id)
    )`);
    await q.query(`CREATE INDEX usage_counters_subscription_idx ON usage_counters (subscription_id, hour)`);
    await q.query(`CREATE INDEX usage_counters_listing_idx ON usage_counters (listing_id, hour)`);

    // Unlogged: rate-limit windows are worth nothing after a crash, and skipping WAL keeps the hot path at one cheap round trip.
    await q.query(`CREATE UNLOGGED TABLE rate_limit_buckets (
      key text PRIMARY KEY,
      hits integer NOT NULL,
      reset_at timestamptz NOT NULL
    )`);

    await q.query(`CREATE TABLE quota_notices (
      subscription_id uuid NOT NULL REFERENCES subscriptions(id) ON DELETE CASCADE,
      month date NOT NULL,
      threshold smallint NOT NULL CHECK (threshold IN (80,100)),
      sent_at timestamptz NOT NULL DEFAULT now(),
      PRIMARY KEY (subscription_id, month, threshold)
    )`);
  }
  async down(q: QueryRunner): Promise<void> {
    for (const table of ['quota_notices', 'rate_limit_buckets', 'usage_counters', 'webhook_events', 'invoices', 'api_keys', 'subscriptions', 'plans']) {
      await q.query(`DROP TABLE ${table}`);
    }
  }
}
