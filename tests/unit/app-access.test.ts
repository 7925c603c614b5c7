// The client's page guard (app/router/access.ts): it must agree with the server's role guard on every role
// combination, keep redirect targets on the site, and list in the navigation only pages the viewer may open.
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import type { Request, Response } from 'express';
import type { RouteMeta } from 'vue-router';
import '../../app/router/meta';
import { decideAccess, navigationFor, safeRedirect } from '../../app/router/access';
import { requireAuth, requireRole } from '../../server/auth/guards';
import { ROLES, type Role } from '../../shared/roles';

/** Every subset of the roles (2³ = 8), the whole space a user's roles can take. */
const ROLE_SETS: Role[][] = Array.from({ length: 1 << ROLES.length }, (_, mask) => ROLES.filter((_, bit) => mask & (1 << bit)));

/** Runs a server middleware on a request from this user and returns the HTTP status it answers with (200: passes). */
function serverStatus(middleware: ReturnType<typeof requireRole>, roles: Role[] | null): number {
  const req = { user: roles ? { id: 'u', email: 'u@example.test', name: 'U', roles, emailVerified: true } : undefined } as unknown as Request;
  let status = 0;
  middleware(req, {} as Response, (error?: unknown) => {
    status = error ? (error as { status: number }).status : 200;
  });
  return status;
}

describe('decideAccess mirrors server/auth/guards.ts', () => {
  // The reference is the server's own guard: the client must refuse exactly what the server refuses (401 → sign in, 403 → not allowed).
  for (const needs of ROLE_SETS.filter((set) => set.length > 0)) {
    for (const viewerRoles of [null, ...ROLE_SETS]) {
      it(`page for ${needs.join('|')}, viewer ${viewerRoles ? `[${viewerRoles.join(',')}]` : 'signed out'}`, () => {
        const status = serverStatus(requireRole(...needs), viewerRoles);
        const decision = decideAccess({ roles: needs }, viewerRoles ? { roles: viewerRoles } : null);
        const expected = { 200: 'allow', 401: 'sign-in', 403: 'forbidden' }[status];
        expect(decision.kind).toBe(expected);
        if (decision.kind === 'forbidden') expect(decision.needs).toEqual(needs);
      });
    }
  }

  it('pages that need only an account match requireAuth', () => {
    for (const viewerRoles of [null, ...ROLE_SETS]) {
      const status = serverStatus(requireAuth, viewerRoles);
      expect(decideAccess({ auth: true }, viewerRoles ? { roles: viewerRoles } : null).kind).toBe(status === 200 ? 'allow' : 'sign-in');
    }
  });

  it('public pages open to everyone; visitor-only pages send signed-in users on', () => {
    expect(decideAccess({}, null).kind).toBe('allow');
    expect(decideAccess({}, { roles: [] }).kind).toBe('allow');
    expect(decideAccess({ guestOnly: true }, null).kind).toBe('allow');
    expect(decideAccess({ guestOnly: true }, { roles: ['subscriber'] }).kind).toBe('signed-in-already');
  });
});

describe('safeRedirect keeps the visitor on the site', () => {
  // Open-redirect forms listed in the OWASP Unvalidated Redirects and Forwards Cheat Sheet (from memory), and the
  // WHATWG URL Standard's rules that "\" counts as "/" in http(s) URLs and that tabs and newlines are removed.
  const leaving = ['//evil.example', '/\\evil.example', '/\t/evil.example', '/\n/evil.example', 'https://evil.example/', 'evil.example', 'javascript:alert(1)', ''];
  for (const target of leaving) {
    it(`refuses ${JSON.stringify(target)}`, () => {
      expect(safeRedirect(target)).toBe('/');
    });
  }

  it('keeps paths, queries and fragments on the site', () => {
    expect(safeRedirect('/admin/users?search=ada#top')).toBe('/admin/users?search=ada#top');
    expect(safeRedirect('/catalogue')).toBe('/catalogue');
    expect(safeRedirect(undefined, '/home')).toBe('/home');
    expect(safeRedirect(['/a', '/b'])).toBe('/');
  });

  it('whatever it returns, a browser resolves to this origin (checked with Node’s WHATWG URL parser)', () => {
    fc.assert(
      fc.property(fc.oneof(fc.string(), fc.string().map((s) => '/' + s), fc.string().map((s) => '//' + s)), (target) => {
        const result = safeRedirect(target);
        expect(result.startsWith('/')).toBe(true);
        expect(new URL(result, 'https://thence.example').origin).toBe('https://thence.example');
      }),
      { numRuns: 2000 },
    );
  });
});

describe('navigationFor lists only pages the viewer may open', () => {
  const route = (path: string, meta: RouteMeta) => ({ path, meta });
  const routes = [
    route('/', { nav: 'Home', navOrder: 0 }),
    route('/catalogue', { nav: 'Catalogue', navOrder: 10 }),
    route('/listings/mine', { nav: 'My listings', roles: ['publisher'] }),
    route('/listings/:id', { nav: 'A listing', roles: ['publisher'] }),
    route('/subscriptions', { nav: 'Subscriptions', roles: ['subscriber'], navOrder: 1 }),
    route('/keys', { nav: 'API keys', roles: ['subscriber'], navOrder: 2 }),
    route('/admin/users', { nav: 'Users', roles: ['admin'] }),
    route('/sign-in', { guestOnly: true, nav: 'Sign in' }),
    route('/account', { auth: true }),
    route('/usage', { auth: true, nav: 'My usage' }),
  ];
  const labels = (roles: Role[] | null) => navigationFor(routes, roles ? { roles } : null).map((entry) => `${entry.section}:${entry.label}`);

  it('a visitor sees the public pages and sign-in', () => {
    expect(labels(null)).toEqual(['public:Home', 'public:Catalogue', 'public:Sign in']);
  });

  it('a subscriber sees the subscriber section in navOrder, and no admin or publisher page', () => {
    expect(labels(['subscriber'])).toEqual(['public:Home', 'public:Catalogue', 'account:My usage', 'subscriber:Subscriptions', 'subscriber:API keys']);
  });

  it('a signed-in user without roles sees the pages for any account, under their own heading', () => {
    expect(labels([])).toEqual(['public:Home', 'public:Catalogue', 'account:My usage']);
  });

  it('a user with every role sees every section, and never a route with parameters', () => {
    expect(labels([...ROLES])).toEqual([
      'public:Home',
      'public:Catalogue',
      'account:My usage',
      'publisher:My listings',
      'subscriber:Subscriptions',
      'subscriber:API keys',
      'admin:Users',
    ]);
  });
});
