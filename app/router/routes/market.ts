import type { RouteRecordRaw } from 'vue-router';

export const marketRoutes: RouteRecordRaw[] = [];
