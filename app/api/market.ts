// The marketplace's calls: plans, subscriptions, API keys, usage; plus the /api/v1 query runner (key-authenticated, no cookie).
import { api, ApiError, query } from './client';
import type { ApiKeyView, CreatedApiKey, PlanInput, PlanView, PublisherUsage, SubscribeResult, SubscriberUsage, SubscriptionView } from '@shared/market';

export const listPublicPlans = (slug: string) => api.get<{ plans: PlanView[] }>(`/api/market/listings/${encodeURIComponent(slug)}/plans`).then((r) => r.plans);
export const listListingPlans = (listingId: string) => api.get<{ plans: PlanView[] }>(`/api/market/publisher/listings/${listingId}/plans`).then((r) => r.plans);
export const createPlan = (listingId: string, body: PlanInput) => api.post<{ plan: PlanView }>(`/api/market/publisher/listings/${listingId}/plans`, body).then((r) => r.plan);
export const updatePlan = (planId: string, body: PlanInput) => api.put<{ plan: PlanView }>(`/api/market/publisher/plans/${planId}`, body).then((r) => r.plan);
export const archivePlan = (planId: string) => api.delete<{ plan: PlanView }>(`/api/market/publisher/plans/${planId}`).then((r) => r.plan);

export const listSubscriptions = () => api.get<{ subscriptions: SubscriptionView[] }>('/api/market/subscriptions').then((r) => r.subscriptions);
export const subscribe = (planId: string) => api.post<SubscribeResult>('/api/market/subscriptions', { planId });
export const changePlan = (id: string, planId: string) => api.put<SubscribeResult>(`/api/market/subscriptions/${id}/plan`, { planId });
export const cancelSubscription = (id: string, when: 'now' | 'period_end') => api.post<{ subscription: SubscriptionView }>(`/api/market/subscriptions/${id}/cancel`, { when }).then((r) => r.subscription);
export const resumeSubscription = (id: string) => api.post<{ subscription: SubscriptionView }>(`/api/market/subscriptions/${id}/resume`).then((r) => r.subscription);
export const syncCheckout = (sessionId: string) => api.post<{ subscription: SubscriptionView }>(`/api/market/subscriptions/checkout/${encodeURIComponent(sessionId)}/sync`).then((r) => r.subscription);

export const listKeys = () => api.get<{ keys: ApiKeyView[] }>('/api/market/keys').then((r) => r.keys);
export const createKey = (subscriptionId: string, name: string) => api.post<{ key: CreatedApiKey }>('/api/market/keys', { subscriptionId, name }).then((r) => r.key);
export const revokeKey = (id: string) => api.delete<{ key: ApiKeyView }>(`/api/market/keys/${id}`).then((r) => r.key);

export const subscriberUsage = (days: number) => api.get<SubscriberUsage>(`/api/market/usage/mine${query({ days })}`);
export const publisherUsage = (days: number) => api.get<PublisherUsage>(`/api/market/usage/publisher${query({ days })}`);
export const allUsage = (days: number) => api.get<PublisherUsage>(`/api/market/usage/all${query({ days })}`);
export const publisherUsageCsvUrl = (days: number, all = false) => `/api/market/usage/${all ? 'all' : 'publisher'}.csv${query({ days })}`;

export interface QueryRun { status: number; contentType: string; body: string; ms: number; headers: Record<string, string> }

/** Calls the query API with a pasted key, as an application would (Bearer header, no cookie, no CSRF token). */
export async function runQuery(path: string, key: string, init: { method?: 'GET' | 'POST'; body?: string; contentType?: string } = {}): Promise<QueryRun> {
  const started = performance.now();
  let res: Response;
  try {
    res = await fetch(path, {
      method: init.method ?? 'GET',
      credentials: 'omit',
      headers: { Authorization: `Bearer ${key.trim()}`, Accept: 'application/sparql-results+json, application/json', ...(init.contentType ? { 'Content-Type': init.contentType } : {}) },
      body: init.body,
    });
  } catch {
    throw new ApiError(0, { code: 'network', message: 'The server could not be reached.' });
  }
  const headers: Record<string, string> = {};
  for (const name of ['ratelimit', 'ratelimit-policy', 'retry-after']) {
    const value = res.headers.get(name);
    if (value) headers[name] = value;
  }
  return { status: res.status, contentType: res.headers.get('content-type') ?? '', body: await res.text(), ms: Math.round(performance.now() - started), headers };
}

export function formatMoney(cents: number, currency: string): string {
  return new Intl.NumberFormat('en', { style: 'currency', currency: currency.toUpperCase() }).format(cents / 100);
}
