// The key created last in this tab, kept in memory only (never stored): the docs page fills it into its examples.
import { ref } from 'vue';
import type { CreatedApiKey } from '@shared/market';

export const recentKey = ref<CreatedApiKey | null>(null);
