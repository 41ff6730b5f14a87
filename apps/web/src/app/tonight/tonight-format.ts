import type { Charger, PlanDetail } from '@nightyard/contracts';
import { SHORT_KWH, naturalCompare, reasonText } from '../plans/plan-format';

/** How many nights before today the page looks back for a published plan. */
export const NIGHTS_BACK = 4;

/** Today's date (YYYY-MM-DD) at the depot. */
export function todayIn(timeZone: string, now = new Date()): string {
  const parts = { year: 'numeric', month: '2-digit', day: '2-digit' } as const;
  try {
    return new Intl.DateTimeFormat('en-CA', { timeZone, ...parts }).format(now);
  } catch {
    return new Intl.DateTimeFormat('en-CA', parts).format(now);
  }
}

/** A calendar date moved by whole days (no time-zone shift). */
export function addDays(isoDate: string, days: number): string {
  const d = new Date(`${isoDate}T00:00:00Z`);
  d.setUTCDate(d.getUTCDate() + days);
  return d.toISOString().slice(0, 10);
}

/** The nights to try, newest first: today, then up to `back` days before. */
export function candidateNights(today: string, back = NIGHTS_BACK): string[] {
  return Array.from({ length: back + 1 }, (_, i) => addDays(today, -i));
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

export type LiveState = 'available' | 'charging' | 'faulted' | 'offline' | 'unknown';

export const LIVE_STATES: readonly { state: LiveState; label: string; icon: string }[] = [
  { state: 'charging', label: 'Charging', icon: 'bolt' },
  { state: 'available', label: 'Available', icon: 'check_circle' },
  { state: 'faulted', label: 'Faulted', icon: 'error' },
  { state: 'offline', label: 'Offline', icon: 'cloud_off' },
  { state: 'unknown', label: 'No reading', icon: 'help' },
];

export function liveStateOf(c: Pick<Charger, 'live'>): LiveState {
  return c.live?.status ?? 'unknown';
}

/** How many chargers report each live state (every state listed, zeros included). */
export function liveCounts(chargers: readonly Pick<Charger, 'live'>[]): { state: LiveState; label: string; icon: string; count: number }[] {
  return LIVE_STATES.map((s) => ({ ...s, count: chargers.filter((c) => liveStateOf(c) === s.state).length }));
}
