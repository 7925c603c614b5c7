import type { RouteRecordRaw } from 'vue-router';

export const publisherRoutes: RouteRecordRaw[] = [];
