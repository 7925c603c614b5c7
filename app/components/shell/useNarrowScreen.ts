// Whether the window is narrow enough for the collapsed navigation (kept in step with the CSS breakpoint).
import { onBeforeUnmount, ref, type Ref } from 'vue';

export const NARROW_QUERY = '(max-width: 860px)';

export function useNarrowScreen(): Ref<boolean> {
  const query = window.matchMedia(NARROW_QUERY);
  const narrow = ref(query.matches);
  const update = (event: MediaQueryListEvent) => {
    narrow.value = event.matches;
  };
  query.addEventListener('change', update);
  onBeforeUnmount(() => query.removeEventListener('change', update));
  return narrow;
}
