import { nightPageFor, type NightTarget, type Role } from '@nightyard/contracts';
import type { MailLink } from './templates';

/**
 * The link of a mail about a night's plan, built for its recipient: the page their roles can use
 * (yard staff the Yard at that night, supervisors the plan review, finance the night's costs).
 */
export function nightMailLink(
  roles: readonly Role[],
  target: NightTarget,
  publicUrl: (path: string) => string,
): MailLink {
  const page = nightPageFor(roles, target);
  return { label: page.label, url: publicUrl(page.path) };
}
