import { z } from 'zod';

export const ROLES = ['admin', 'facilities', 'supervisor', 'yard', 'finance'] as const;
export const roleSchema = z.enum(ROLES);
export type Role = z.infer<typeof roleSchema>;

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  facilities: 'Facilities manager',
  supervisor: 'Fleet supervisor',
  yard: 'Yard staff',
  finance: 'Finance',
};

export function hasAnyRole(userRoles: readonly Role[], allowed: readonly Role[]): boolean {
  return userRoles.some((r) => allowed.includes(r));
}
