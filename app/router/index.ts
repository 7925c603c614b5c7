// The client's router: every feature's routes, the shell's own pages, and one guard mirroring the server's roles.
import { createRouter, createWebHistory, type RouteRecordRaw, type Router } from 'vue-router';
import './meta';
import { useSessionStore } from '@app/stores/session';
import { decideAccess, safeRedirect } from './access';
import { authRoutes } from './routes/auth';
import { publisherRoutes } from './routes/publisher';
import { marketRoutes } from './routes/market';
import { adminRoutes } from './routes/admin';

const shellRoutes: RouteRecordRaw[] = [
  { path: '/', name: 'home', component: () => import('@app/views/HomePage.vue'), meta: { title: 'Ontology-backed fact APIs', nav: 'Home', navOrder: 0 } },
  { path: '/forbidden', name: 'forbidden', component: () => import('@app/views/ForbiddenPage.vue'), meta: { title: 'Not allowed' } },
];

// The catch-all goes last so that every feature's paths win over it.
const notFoundRoute: RouteRecordRaw = {
  path: '/:pathMatch(.*)*',
  name: 'not-found',
  component: () => import('@app/views/NotFoundPage.vue'),
  meta: { title: 'Page not found' },
};

export const routes: RouteRecordRaw[] = [...shellRoutes, ...authRoutes, ...publisherRoutes, ...marketRoutes, ...adminRoutes, notFoundRoute];

export function createAppRouter(): Router {
  const router = createRouter({
    history: createWebHistory(),
    routes,
    scrollBehavior: (_to, _from, saved) => saved ?? { top: 0 },
  });

  router.beforeEach(async (to) => {
    const session = useSessionStore();
    await session.load();
    const decision = decideAccess(to.meta, session.user);
    switch (decision.kind) {
      case 'allow':
        return true;
      case 'sign-in':
        return { name: 'sign-in', query: { redirect: to.fullPath } };
      case 'signed-in-already':
        return safeRedirect(to.query.redirect);
      case 'forbidden':
        // A refused page says so (and why) instead of silently sending the user elsewhere.
        return { name: 'forbidden', query: { from: to.fullPath, needs: decision.needs.join(',') }, replace: true };
    }
  });

  router.afterEach((to) => {
    document.title = to.meta.title ? `${to.meta.title} · Thence` : 'Thence';
  });
  return router;
}
