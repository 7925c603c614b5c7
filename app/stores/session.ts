// The signed-in user as the whole client sees it: loaded once at start, replaced on every sign-in/out.
import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import type { SessionUser, SignInRequest, SignUpRequest } from '@shared/auth';
import type { Role } from '@shared/roles';
import * as auth from '@app/api/auth';

export const useSessionStore = defineStore('session', () => {
  const user = ref<SessionUser | null>(null);
  /** True once GET /api/auth/me has answered (the router guard waits for it). */
  const loaded = ref(false);
  let loading: Promise<SessionUser | null> | null = null;

  const signedIn = computed(() => user.value !== null);
  const roles = computed<Role[]>(() => user.value?.roles ?? []);

  /** Loads the session once; later calls share the first request. `force` asks the server again. */
  function load(force = false): Promise<SessionUser | null> {
    if (loading && !force) return loading;
    loading = auth
      .fetchCurrentUser()
      .then((current) => {
        user.value = current;
        return current;
      })
      .catch((error: unknown) => {
        // An unreachable server must not lock the visitor out of public pages: treat as signed out,
        // and let the next load() try again.
        loading = null;
        user.value = null;
        console.warn('Could not load the session:', error);
        return null;
      })
      .finally(() => {
        loaded.value = true;
      });
    return loading;
  }

  async function signIn(request: SignInRequest): Promise<SessionUser> {
    user.value = await auth.signIn(request);
    return user.value;
  }

  async function signUp(request: SignUpRequest): Promise<auth.SignUpResult> {
    const result = await auth.signUp(request);
    user.value = result.user;
    return result;
  }

  async function signOut(): Promise<void> {
    try {
      await auth.signOut();
    } finally {
      user.value = null;
    }
  }

  /** Replaces the user after a change made elsewhere (verification, account edits). */
  function setUser(next: SessionUser | null): void {
    user.value = next;
    loaded.value = true;
    loading = Promise.resolve(next);
  }

  function hasRole(...wanted: Role[]): boolean {
    return wanted.some((role) => roles.value.includes(role));
  }

  return { user, loaded, signedIn, roles, load, signIn, signUp, signOut, setUser, hasRole };
});
