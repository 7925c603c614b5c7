// Route meta fields every page declares; the shell's navigation and the guards read them.
import type { Role } from '@shared/roles';
import 'vue-router';

declare module 'vue-router' {
  interface RouteMeta {
    /** Who may open the page; any of these roles. Omitted: anyone, signed in or not. */
    roles?: Role[];
    /** Must be signed in (any role). Implied by `roles`. */
    auth?: boolean;
    /** Only for signed-out visitors (sign-in, sign-up): signed-in users go home. */
    guestOnly?: boolean;
    title?: string;
    /** Label in the shell's navigation; pages without it are not listed. */
    nav?: string;
    /** Order in the navigation (small first). */
    navOrder?: number;
  }
}
export {};
