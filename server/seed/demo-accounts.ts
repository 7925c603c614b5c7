// The demo's people (an invented scenario), shared by the seed and the Google stand-in. Password for all: DEMO_PASSWORD.
import type { Role } from '../../shared/roles.js';

export const DEMO_PASSWORD = 'thence-demo-2026';

export interface DemoAccount {
  email: string;
  name: string;
  roles: Role[];
}

export const DEMO_ACCOUNTS: DemoAccount[] = [
  { email: 'ines.publisher@demo.thence.test', name: 'Ines Marwood', roles: ['publisher'] },
  { email: 'omar.subscriber@demo.thence.test', name: 'Omar Haddad', roles: ['subscriber'] },
  { email: 'ada.admin@demo.thence.test', name: 'Ada Quillfeather', roles: ['admin', 'publisher', 'subscriber'] },
];
