import { ADMINS, COST_READERS, DISTRICT_READERS, EVERY_ROLE, PLAN_READERS, YARD_CREW, type Role } from './roles';

/** The product's sections, who may open each, and which role lands where after sign-in. */
export type SectionKey = 'tonight' | 'yard' | 'plans' | 'fleet' | 'depot' | 'rates' | 'costs' | 'district' | 'people';

export interface Section {
  key: SectionKey;
  label: string;
  path: string;
  icon: string;
  roles: readonly Role[];
  purpose: string;
}

export const SECTIONS: readonly Section[] = [
  {
    key: 'tonight',
    label: 'Tonight',
    path: '/tonight',
    icon: 'nights_stay',
    roles: EVERY_ROLE,
    purpose: 'The night ahead at a glance: buses due in, chargers, pull-outs in the morning.',
  },
  {
    key: 'yard',
    label: 'Yard',
    path: '/yard',
    icon: 'ev_station',
    roles: YARD_CREW,
    purpose: "Tonight's published plan charger by charger: plug in, unplug, report what differs.",
  },
  {
    key: 'plans',
    label: 'Plans',
    path: '/plans',
    icon: 'event_note',
    roles: PLAN_READERS,
    purpose: 'Generate, review, compare and publish the plug-in plan for the night.',
  },
  {
    key: 'fleet',
    label: 'Fleet',
    path: '/fleet',
    icon: 'directions_bus',
    roles: PLAN_READERS,
    purpose: "Buses, their batteries and each service day's runs.",
  },
  {
    key: 'depot',
    label: 'Depot',
    path: '/depot',
    icon: 'electrical_services',
    roles: EVERY_ROLE,
    purpose: "Chargers, power cabinets, the service limit and the depot's other load.",
  },
  {
    key: 'rates',
    label: 'Rates',
    path: '/rates',
    icon: 'price_change',
    roles: EVERY_ROLE,
    purpose: 'The utility rate plan: time-of-use prices, demand charges, fixed charges.',
  },
  {
    key: 'costs',
    label: 'Costs',
    path: '/costs',
    icon: 'payments',
    roles: COST_READERS,
    purpose: 'Projected and actual electricity cost per night and month, against charging on arrival or on a timer.',
  },
  {
    key: 'district',
    label: 'District',
    path: '/district',
    icon: 'domain',
    roles: DISTRICT_READERS,
    purpose: "Every depot side by side: tonight's plan and the billing period's bill, with the totals.",
  },
  {
    key: 'people',
    label: 'People',
    path: '/people',
    icon: 'group',
    roles: ADMINS,
    purpose: 'Who may sign in, with which roles; invitations and deactivation.',
  },
];

/** Where a role starts its day. A user with several roles lands on the first that matches. */
const HOME_ORDER: readonly [Role, SectionKey][] = [
  ['supervisor', 'plans'],
  ['yard', 'yard'],
  ['facilities', 'depot'],
  ['finance', 'costs'],
  ['admin', 'tonight'],
];

export function homeSection(roles: readonly Role[]): Section {
  const key = HOME_ORDER.find(([role]) => roles.includes(role))?.[1] ?? 'tonight';
  return SECTIONS.find((s) => s.key === key)!;
}

export function sectionsFor(roles: readonly Role[]): Section[] {
  return SECTIONS.filter((s) => s.roles.some((r) => roles.includes(r)));
}
