// The marketplace's pages: the subscriber's subscriptions, keys, usage and API docs; the publisher's plans and usage;
// the admin's view of all usage.
import type { RouteRecordRaw } from 'vue-router';

const publisher = ['publisher', 'admin'] as const;

export const marketRoutes: RouteRecordRaw[] = [
  { path: '/market/subscriptions', name: 'subscriptions', component: () => import('@app/views/market/SubscriptionsPage.vue'), meta: { auth: true, title: 'Subscriptions', nav: 'Subscriptions', navOrder: 30 } },
  { path: '/market/keys', name: 'api-keys', component: () => import('@app/views/market/ApiKeysPage.vue'), meta: { auth: true, title: 'API keys', nav: 'API keys', navOrder: 31 } },
  { path: '/market/usage', name: 'subscriber-usage', component: () => import('@app/views/market/SubscriberUsagePage.vue'), meta: { auth: true, title: 'My usage', nav: 'My usage', navOrder: 32 } },
  { path: '/market/docs', name: 'api-docs', component: () => import('@app/views/market/ApiDocsPage.vue'), meta: { title: 'API docs', nav: 'API docs', navOrder: 33 } },
  { path: '/publisher/usage', name: 'publisher-usage', component: () => import('@app/views/market/PublisherUsagePage.vue'), meta: { roles: [...publisher], title: 'Usage and revenue', nav: 'Usage & revenue', navOrder: 25 } },
  { path: '/publisher/listings/:id/plans', name: 'plans-editor', component: () => import('@app/views/market/PlansEditorPage.vue'), meta: { roles: [...publisher], title: 'Plans' } },
  { path: '/admin/usage', name: 'admin-usage', component: () => import('@app/views/market/AdminUsagePage.vue'), meta: { roles: ['admin'], title: 'All usage', nav: 'All usage', navOrder: 90 } },
];
