// Roles a user may hold; one user may hold several.
export const ROLES = ['publisher', 'subscriber', 'admin'] as const;
export type Role = (typeof ROLES)[number];
