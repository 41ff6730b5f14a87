import type { UserStatus } from '@nightyard/contracts';
import { dateTimeAt } from '@nightyard/contracts/depot-time';

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

/** An ISO instant at the depot ("Dec 2, 2026, 15:42"). */
export function formatWhen(iso: string | null, timeZone: string): string | null {
  return iso ? dateTimeAt(iso, timeZone) : null;
}
