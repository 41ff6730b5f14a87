import { hasAnyRole, type Role } from './roles';
import { SECTIONS, homeSection, type Section, type SectionKey } from './sections';

/** A page of the web app to send someone to, with the words that introduce it in an e-mail. */
export interface PageLink {
  section: SectionKey;
  /** Path and query, e.g. `/yard?night=2026-12-09`. */
  path: string;
  label: string;
}

/** One night's plan at a depot, as an e-mail speaks of it. */
export interface NightTarget {
  planId: string;
  /** The night's service date, `YYYY-MM-DD`. */
  serviceDate: string;
}

const planReview = (t: NightTarget): PageLink => ({
  section: 'plans',
  path: `/plans?date=${t.serviceDate}&plan=${encodeURIComponent(t.planId)}`,
  label: 'Review the plan',
});
const yardNight = (t: NightTarget): PageLink => ({
  section: 'yard',
  path: `/yard?night=${t.serviceDate}`,
  label: 'Open the yard view for that night',
});
const nightCosts = (t: NightTarget): PageLink => ({
  section: 'costs',
  path: `/costs/nights/${encodeURIComponent(t.planId)}`,
  label: "See the night's costs",
});

/**
 * Where a person goes for a night's plan, by role. Someone with several roles gets the page of the
 * first role that matches, in the same order as their home section after sign-in (supervisor, yard,
 * facilities, finance, admin), so a link and the app agree on what that person does first.
 */
const NIGHT_PAGES: readonly [Role, (t: NightTarget) => PageLink][] = [
  ['supervisor', planReview],
  ['yard', yardNight],
  ['facilities', planReview],
  ['finance', nightCosts],
  ['admin', planReview],
];

/** The page an e-mail about a night's plan links to for someone with these roles. */
export function nightPageFor(roles: readonly Role[], target: NightTarget): PageLink {
  const page = NIGHT_PAGES.find(([role]) => roles.includes(role))?.[1](target);
  if (page && canOpen(roles, page.path)) return page;
  const home = homeSection(roles);
  return { section: home.key, path: home.path, label: `Open ${home.label}` };
}

/** The section an in-app path belongs to (`/plans/abc?x=1` is Plans), or null for other pages. */
export function sectionOfPath(path: string): Section | null {
  const first = path.split(/[?#]/, 1)[0]!.split('/')[1] ?? '';
  return SECTIONS.find((s) => s.path === `/${first}`) ?? null;
}

/** Whether someone with these roles may open the path (pages outside the sections are open to all). */
export function canOpen(roles: readonly Role[], path: string): boolean {
  const section = sectionOfPath(path);
  return !section || hasAnyRole(roles, section.roles);
}
