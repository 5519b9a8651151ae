import type { Role } from '../../../shared/roles.js';

/** Display names of the roles (shared/roles.ts holds the ordered identifiers). */
export const ROLE_LABELS: Readonly<Record<Role, string>> = {
  analyst: 'Analyst',
  operations: 'Operations',
  admin: 'Admin',
};
