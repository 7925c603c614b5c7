// Who may open a page: the client-side mirror of the server's role guards (server/auth/guards.ts).
// The server still refuses every call on its own; this only keeps people from landing on pages that cannot work for them.
import type { RouteMeta, RouteRecordNormalized } from 'vue-router';
import type { Role } from '@shared/roles';

/** What the guard does with a navigation. */
export type AccessDecision =
  | { kind: 'allow' }
  /** Signed out, page needs an account: go to sign-in and come back. */
  | { kind: 'sign-in' }
  /** Signed in without a role the page needs: show the not-allowed page. */
  | { kind: 'forbidden'; needs: Role[] }
  /** Signed in on a page only for visitors (sign-in, sign-up). */
  | { kind: 'signed-in-already' };

export interface Viewer {
  roles: readonly Role[];
}

/** Decides a navigation from the page's meta (merged over its matched records) and the viewer (null: signed out). */
export function decideAccess(meta: RouteMeta, viewer: Viewer | null): AccessDecision {
  if (meta.guestOnly && viewer) return { kind: 'signed-in-already' };
  const needs = meta.roles ?? [];
  if ((meta.auth || needs.length > 0) && !viewer) return { kind: 'sign-in' };
  if (viewer && needs.length > 0 && !needs.some((role) => viewer.roles.includes(role))) return { kind: 'forbidden', needs };
  return { kind: 'allow' };
}

/** True when a page would let this viewer in (navigation lists only such pages). */
export function mayOpen(meta: RouteMeta, viewer: Viewer | null): boolean {
  return decideAccess(meta, viewer).kind === 'allow';
}

/**
 * A redirect target taken from the address bar is used only when it stays on this site. "//host", "/\\host" and
 * "/<tab>/host" all leave it: browsers read a backslash as a slash and drop tabs and newlines before parsing
 * (WHATWG URL Standard, §4.4 basic URL parser). So the target is parsed the same way and must keep our origin.
 */
export function safeRedirect(target: unknown, fallback = '/'): string {
  if (typeof target !== 'string' || !target.startsWith('/')) return fallback;
  const base = 'http://thence.invalid';
  let url: URL;
  try {
    url = new URL(target, base);
  } catch {
    return fallback;
  }
  if (url.origin !== base) return fallback;
  return url.pathname + url.search + url.hash;
}

/** One entry of the shell's navigation. */
export interface NavEntry {
  label: string;
  path: string;
  order: number;
  /** The section it is listed under: the first role it needs; 'account' for any signed-in user; else 'public'. */
  section: Role | 'account' | 'public';
}

/** Navigation entries the viewer may open, from the routes' meta.nav; sorted by section, then navOrder, then label. */
export function navigationFor(routes: readonly Pick<RouteRecordNormalized, 'path' | 'meta'>[], viewer: Viewer | null): NavEntry[] {
  const sectionOrder: NavEntry['section'][] = ['public', 'account', 'publisher', 'subscriber', 'admin'];
  const entries: NavEntry[] = [];
  for (const route of routes) {
    const label = route.meta.nav;
    // Routes with parameters (":id") cannot be opened from a menu.
    if (!label || route.path.includes(':') || !mayOpen(route.meta, viewer)) continue;
    const section = route.meta.roles?.[0] ?? (route.meta.auth ? 'account' : 'public');
    entries.push({ label, path: route.path, order: route.meta.navOrder ?? 100, section });
  }
  return entries.sort(
    (a, b) => sectionOrder.indexOf(a.section) - sectionOrder.indexOf(b.section) || a.order - b.order || a.label.localeCompare(b.label),
  );
}

/** Section headings in the navigation. */
export const SECTION_LABELS: Record<NavEntry['section'], string> = {
  public: 'Explore',
  account: 'Your account',
  publisher: 'Publishing',
  subscriber: 'Subscribing',
  admin: 'Administration',
};
