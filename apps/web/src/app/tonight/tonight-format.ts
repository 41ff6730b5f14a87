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

export type LiveState = 'available' | 'connected' | 'charging' | 'faulted' | 'offline' | 'unknown';

export const LIVE_STATES: readonly { state: LiveState; label: string; icon: string }[] = [
  { state: 'charging', label: 'Charging', icon: 'bolt' },
  { state: 'connected', label: 'Plugged in, not charging', icon: 'electrical_services' },
  { state: 'available', label: 'Available', icon: 'check_circle' },
  { state: 'faulted', label: 'Faulted', icon: 'error' },
  { state: 'offline', label: 'Offline', icon: 'cloud_off' },
  { state: 'unknown', label: 'No reading', icon: 'help' },
];

export function liveStateOf(c: Pick<Charger, 'live'>): LiveState {
  return c.live?.status ?? 'unknown';
}

/** How many chargers report each live state (every state listed, zeros included). */
export function liveCounts(
  chargers: readonly Pick<Charger, 'live'>[],
): { state: LiveState; label: string; icon: string; count: number }[] {
  return LIVE_STATES.map((s) => ({ ...s, count: chargers.filter((c) => liveStateOf(c) === s.state).length }));
}
