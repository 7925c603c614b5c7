// Keeps the tab in step with the session when it comes back into view: another tab may have signed out, a password
// reset elsewhere ends every session, and an admin may have changed the user's roles. The page then gets the same
// treatment the router guard gives a navigation (sign in again, or the not-allowed page).
import { onBeforeUnmount, onMounted } from 'vue';
import { useRoute, useRouter } from 'vue-router';
import { ElMessage } from 'element-plus';
import { useSessionStore } from '@app/stores/session';
import { decideAccess } from '@app/router/access';

/** At most one check per this many milliseconds, however often the tab is switched. */
const MIN_INTERVAL_MS = 5_000;

export function useSessionRecheck(): void {
  const session = useSessionStore();
  const route = useRoute();
  const router = useRouter();
  let lastCheck = Date.now();

  async function recheck(): Promise<void> {
    if (document.visibilityState !== 'visible' || !session.loaded || Date.now() - lastCheck < MIN_INTERVAL_MS) return;
    lastCheck = Date.now();
    const before = session.user;
    const after = await session.load(true);
    if (before && !after) ElMessage({ type: 'info', message: 'You were signed out (in another tab or by a password change).' });
    const decision = decideAccess(route.meta, after);
    if (decision.kind === 'sign-in') await router.replace({ name: 'sign-in', query: { redirect: route.fullPath } });
    else if (decision.kind === 'forbidden') await router.replace({ name: 'forbidden', query: { from: route.fullPath, needs: decision.needs.join(',') } });
  }

  const onVisibility = () => void recheck();
  onMounted(() => document.addEventListener('visibilitychange', onVisibility));
  onBeforeUnmount(() => document.removeEventListener('visibilitychange', onVisibility));
}
