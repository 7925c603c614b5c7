// Typed calls for the admin's user list and role changes (server: /api/admin/users).
import type { Role } from '@shared/roles';
import { api, query } from './client';

/** One row of the admin's user list. */
export interface AdminUserRow {
  id: string;
  email: string;
  name: string;
  roles: Role[];
  emailVerified: boolean;
  /** ISO 8601 timestamp. */
  createdAt: string;
}

export interface AdminUserPage {
  users: AdminUserRow[];
  /** Accounts matching the search, over all pages. */
  total: number;
}

/** Rows per page the list asks for (the server allows 1 to 100). */
export const USERS_PAGE_SIZE = 25;

/** One page (from 1) of accounts whose e-mail or name contains `search`, newest first. */
export function listUsers(search: string, page: number, pageSize = USERS_PAGE_SIZE): Promise<AdminUserPage> {
  return api.get<AdminUserPage>(`/api/admin/users${query({ search: search.trim(), page, pageSize })}`);
}

export async function setUserRoles(id: string, roles: Role[]): Promise<AdminUserRow> {
  const body = await api.put<{ user: AdminUserRow }>(`/api/admin/users/${encodeURIComponent(id)}/roles`, { roles });
  return body.user;
}
