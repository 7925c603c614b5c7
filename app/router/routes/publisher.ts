// The publisher's pages (own listings, uploads, versions, facts) and the public catalogue and listing pages.
import type { RouteRecordRaw } from 'vue-router';

const publisher = ['publisher', 'admin'] as const;

export const publisherRoutes: RouteRecordRaw[] = [
  { path: '/catalogue', name: 'catalogue', component: () => import('@app/views/CataloguePage.vue'), meta: { title: 'Catalogue', nav: 'Catalogue', navOrder: 10 } },
  { path: '/listings/:slug', name: 'listing', component: () => import('@app/views/ListingPage.vue'), meta: { title: 'Listing' } },
  { path: '/publisher', name: 'my-listings', component: () => import('@app/views/publisher/MyListingsPage.vue'), meta: { roles: [...publisher], title: 'My listings', nav: 'My listings', navOrder: 20 } },
  { path: '/publisher/listings/new', name: 'listing-new', component: () => import('@app/views/publisher/ListingEditorPage.vue'), meta: { roles: [...publisher], title: 'New listing' } },
  { path: '/publisher/listings/:id', name: 'listing-edit', component: () => import('@app/views/publisher/ListingEditorPage.vue'), meta: { roles: [...publisher], title: 'Listing' } },
  { path: '/publisher/versions/:id', name: 'version', component: () => import('@app/views/publisher/VersionPage.vue'), meta: { roles: [...publisher], title: 'Version' } },
  { path: '/publisher/versions/:id/facts', name: 'version-facts', component: () => import('@app/views/publisher/FactsBrowserPage.vue'), meta: { roles: [...publisher], title: 'Facts' } },
];
