// How roles are named and explained in the interface.
import type { Role } from '@shared/roles';

export const ROLE_LABELS: Record<Role, string> = {
  publisher: 'Publisher',
  subscriber: 'Subscriber',
  admin: 'Admin',
};

export const ROLE_DESCRIPTIONS: Record<Role, string> = {
  publisher: 'Upload an OWL ontology and datasets, and offer the entailed facts as a paid API.',
  subscriber: 'Buy API access to listings and query their facts from your applications.',
  admin: 'Manage users and their roles.',
};
