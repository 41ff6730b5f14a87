export const ROLES = ['admin', 'facilities', 'supervisor', 'yard', 'finance'] as const;
// Plain values, no schema: the web app's first download (the shell, its guards) needs roles but
// not zod; the schema is in role-schema.ts.
export type Role = (typeof ROLES)[number];

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
