import type { UserStatus } from '@nightyard/contracts';

export const STATUS_LABELS: Record<UserStatus, string> = {
  active: 'Active',
  invited: 'Invited',
  deactivated: 'Deactivated',
};

export const STATUS_ICONS: Record<UserStatus, string> = {
  active: 'check_circle',
  invited: 'schedule_send',
  deactivated: 'block',
};

const WHEN = new Intl.DateTimeFormat(undefined, { dateStyle: 'medium', timeStyle: 'short' });

/** An ISO instant in the viewer's own time zone. */
export function formatWhen(iso: string | null): string | null {
  if (!iso) return null;
  const at = new Date(iso);
  return Number.isNaN(at.getTime()) ? iso : WHEN.format(at);
}
