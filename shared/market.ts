// Marketplace shapes shared by server and client: plan input, subscriptions, keys, usage rows.
import { z } from 'zod';

export const CURRENCIES = ['eur', 'usd', 'gbp'] as const;

/** Latency buckets (upper bounds, ms) for the usage counters; the last bucket is "slower than 1 s". */
export const LATENCY_BUCKETS_MS = [1, 2, 5, 10, 25, 50, 100, 250, 500, 1000] as const;

export const planInputSchema = z
  .object({
    name: z.string().trim().min(1, 'Give the plan a name.').max(60, 'At most 60 characters.'),
    description: z.string().trim().max(500, 'At most 500 characters.').default(''),
    kind: z.enum(['free', 'paid'], { message: 'Choose free or paid.' }),
    priceCents: z.number({ message: 'Enter the monthly price.' }).int('Whole cents only.').min(0).max(10_000_000, 'At most 100,000 a month.').default(0),
    currency: z.enum(CURRENCIES, { message: `One of ${CURRENCIES.join(', ')}.` }).default('eur'),
    monthlyQuota: z.number({ message: 'Enter the monthly request quota.' }).int('A whole number.').min(1, 'At least 1 request a month.').max(1_000_000_000),
    ratePerMinute: z.number({ message: 'Enter the rate limit.' }).int('A whole number.').min(1, 'At least 1 request a minute.').max(1_000_000),
  })
  .superRefine((plan, ctx) => {
    if (plan.kind === 'free' && plan.priceCents !== 0) ctx.addIssue({ code: 'custom', path: ['priceCents'], message: 'A free plan has no price.' });
    if (plan.kind === 'paid' && plan.priceCents < 50) ctx.addIssue({ code: 'custom', path: ['priceCents'], message: 'A paid plan costs at least 0.50 a month.' });
  });
export type PlanInput = z.infer<typeof planInputSchema>;

export interface PlanView {
  id: string;
  listingId: string;
  name: string;
  description: string;
  kind: 'free' | 'paid';
  priceCents: number;
  currency: string;
  monthlyQuota: number;
  ratePerMinute: number;
  archived: boolean;
}

export const subscribeSchema = z.object({ planId: z.uuid({ message: 'Choose a plan.' }) });
export const changePlanSchema = z.object({ planId: z.uuid({ message: 'Choose a plan.' }) });
export const cancelSchema = z.object({ when: z.enum(['now', 'period_end']).default('period_end') });

export type SubscriptionStatus = 'pending' | 'active' | 'past_due' | 'canceled';

export interface SubscriptionView {
  id: string;
  status: SubscriptionStatus;
  listing: { id: string; slug: string; title: string };
  plan: PlanView;
  currentPeriodStart: string | null;
  currentPeriodEnd: string | null;
  cancelAtPeriodEnd: boolean;
  createdAt: string;
  quota: { month: string; used: number; limit: number };
}

/** Either the subscription is live at once (free plan, paid plan change) or the browser goes to checkout. */
export type SubscribeResult = { subscription: SubscriptionView; checkoutUrl: null } | { subscription: null; checkoutUrl: string };

export const createKeySchema = z.object({
  subscriptionId: z.uuid({ message: 'Choose a subscription.' }),
  name: z.string().trim().min(1, 'Name the key (e.g. where it is used).').max(60, 'At most 60 characters.'),
});

export interface ApiKeyView {
  id: string;
  subscriptionId: string;
  listingSlug: string;
  name: string;
  prefix: string;
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
}

/** Returned once, at creation: the full secret is never stored nor shown again. */
export interface CreatedApiKey extends ApiKeyView {
  secret: string;
}

export interface UsageRow {
  day: string;
  keyId: string | null;
  keyName: string | null;
  keyPrefix: string | null;
  listingSlug: string;
  subscriberEmail?: string;
  ok: number;
  clientErrors: number;
  serverErrors: number;
  total: number;
}

export interface SubscriberUsage {
  rows: UsageRow[];
  quotas: { subscriptionId: string; listingSlug: string; planName: string; used: number; limit: number; month: string }[];
}

export interface RevenueRow {
  listingSlug: string;
  month: string;
  currency: string;
  invoices: number;
  amountCents: number;
  platformFeeCents: number;
  publisherShareCents: number;
}

export interface PublisherUsage {
  rows: UsageRow[];
  revenue: RevenueRow[];
}
