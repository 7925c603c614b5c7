import type { RouteRecordRaw } from 'vue-router';

export const authRoutes: RouteRecordRaw[] = [];
