import type { Charger, PlanDetail } from '@nightyard/contracts';
import { addDays } from '@nightyard/contracts/depot-time';
import { SHORT_KWH, naturalCompare, reasonText } from '../plans/plan-format';

/** How many nights before tonight the page looks back for a published plan. */
export const NIGHTS_BACK = 4;

/** The nights to try, newest first: tonight, then up to `back` nights before. */
export function candidateNights(tonight: string, back = NIGHTS_BACK): string[] {
  return Array.from({ length: back + 1 }, (_, i) => addDays(tonight, -i));
}

export interface ShortBus {
  bus: string;
  shortfallKwh: number;
  reason: string;
}

/** The plan's short buses, largest shortfall first, with the reason in words. */
export function shortBuses(plan: Pick<PlanDetail, 'result'>): ShortBus[] {
  return (plan.result?.buses ?? [])
    .filter((b) => b.shortfallKwh > SHORT_KWH)
    .map((b) => ({ bus: b.id, shortfallKwh: b.shortfallKwh, reason: reasonText(b.reason) }))
    .sort((a, b) => b.shortfallKwh - a.shortfallKwh || naturalCompare(a.bus, b.bus));
}

export interface PeakLoad {
  peakKw: number;
  /** The limit in force at the peak. */
  limitKw: number;
  /** Whether any slot of the night goes over its limit. */
  over: boolean;
}

export function peakLoad(plan: Pick<PlanDetail, 'result'>): PeakLoad | null {
  const slots = plan.result?.slots ?? [];
  if (slots.length === 0) return null;
  const peak = slots.reduce((max, s) => (s.loadKw > max.loadKw ? s : max), slots[0]!);
  return { peakKw: peak.loadKw, limitKw: peak.limitKw, over: slots.some((s) => s.loadKw > s.limitKw + 1e-6) };
}

export type LiveState = 'available' | 'connected' | 'charging' | 'faulted' | 'out' | 'offline' | 'unknown';

export const LIVE_STATES: readonly { state: LiveState; label: string; icon: string }[] = [
  { state: 'charging', label: 'Charging', icon: 'bolt' },
  { state: 'connected', label: 'Plugged in, not charging', icon: 'electrical_services' },
  { state: 'available', label: 'Available', icon: 'check_circle' },
  { state: 'faulted', label: 'Faulted', icon: 'error' },
  { state: 'out', label: 'Out of service', icon: 'block' },
  { state: 'offline', label: 'Offline', icon: 'cloud_off' },
  { state: 'unknown', label: 'No reading', icon: 'help' },
];

/**
 * A charger's state as the yard should read it: what the station reports, except that a charger
 * out of service now is "Out of service" whatever idle state its station reports (a station that
 * says "Available" does not know it was taken out of use; counted as available, someone would plug
 * a bus in). Charging and a fault still show as reported: power flowing matters there.
 */
export function liveStateOf(c: Pick<Charger, 'live'>, outOfService = false): LiveState {
  const reported = c.live?.status ?? 'unknown';
  return outOfService && reported !== 'charging' && reported !== 'faulted' ? 'out' : reported;
}

/** How many chargers are in each state (every state listed, zeros included); `out`: out of service now. */
export function liveCounts<C extends Pick<Charger, 'live'>>(
  chargers: readonly C[],
  out: (c: C) => boolean = () => false,
): { state: LiveState; label: string; icon: string; count: number }[] {
  const states = chargers.map((c) => liveStateOf(c, out(c)));
  return LIVE_STATES.map((s) => ({ ...s, count: states.filter((x) => x === s.state).length }));
}
