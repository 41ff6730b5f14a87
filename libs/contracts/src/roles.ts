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

// Who may do what: the API's routes declare these lists and the web app shows or hides the same
// actions with them (and SECTIONS says who opens each section with them). Every role reads what
// its sections show; the lists below name who may change or run something.

/** Every role: reading a depot, its night, plans, fleet and rates. */
export const EVERY_ROLE: readonly Role[] = ROLES;
/** People and invitations. */
export const ADMINS: readonly Role[] = ['admin'];
/** Depot set-up (chargers, cabinets, limits, load-reduction windows, yard crew) and rate plans. */
export const SETUP_EDITORS: readonly Role[] = ['facilities', 'admin'];
/** Buses and service days' runs. */
export const FLEET_EDITORS: readonly Role[] = ['supervisor', 'admin'];
/** Generating, comparing and publishing plans (and what-ifs). */
export const PLANNERS: readonly Role[] = ['supervisor', 'admin'];
/** The Plans and Fleet sections, read only for facilities and finance. */
export const PLAN_READERS: readonly Role[] = ['supervisor', 'admin', 'facilities', 'finance'];
/** Scenario files and charging profiles of a plan: the planners and facilities. */
export const SCENARIO_READERS: readonly Role[] = ['supervisor', 'admin', 'facilities'];
/** The Yard: tonight's steps, confirmations and reports (which re-plan the night). */
export const YARD_CREW: readonly Role[] = ['yard', 'supervisor', 'admin'];
/** Costs, bills and savings. */
export const COST_READERS: readonly Role[] = ['finance', 'admin', 'supervisor', 'facilities'];
/** Meter data imports and billing peaks entered for Costs. */
export const COST_EDITORS: readonly Role[] = ['finance', 'admin'];
/** The district overview: every depot side by side, tonight and the billing period. */
export const DISTRICT_READERS: readonly Role[] = ['admin', 'finance'];
