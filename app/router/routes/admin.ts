// Pages for administrators.
import type { RouteRecordRaw } from 'vue-router';

export const adminRoutes: RouteRecordRaw[] = [
  {
    path: '/admin/users',
    name: 'admin-users',
    component: () => import('@app/views/admin/AdminUsersPage.vue'),
    meta: { roles: ['admin'], title: 'Users', nav: 'Users', navOrder: 10 },
  },
];
