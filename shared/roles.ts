import * as z from 'zod';

/** Roles, from least to most privileged. Each role includes everything the previous one may do. */
export const ROLES = ['analyst', 'operations', 'admin'] as const;
export const roleSchema = z.enum(ROLES);
export type Role = z.infer<typeof roleSchema>;

/** True when `role` may do what `required` may do (roles are ordered). */
export function roleAtLeast(role: Role, required: Role): boolean {
  return ROLES.indexOf(role) >= ROLES.indexOf(required);
}
