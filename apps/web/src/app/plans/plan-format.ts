import {
  baselineName,
  footedEnergyDemand,
  toCents,
  type PlanDetail,
  type PlanResult,
  type PlanState,
  type PlanSummary,
} from '@nightyard/contracts';
import { dayTimeAt, timeAt, weekdayTimeAt } from '@nightyard/contracts/depot-time';
import { horizonOf, type PlanHorizon } from '@nightyard/contracts/plan-horizon';

/** What stops a short bus, in plain words (the engine's `reason` codes). */
export const REASON_TEXT: Record<string, { label: string; detail: string }> = {
  dwell: { label: 'Dwell too short', detail: 'It is not parked long enough to take the energy it needs.' },
  charger: {
    label: 'Not enough charger time',
    detail: 'No charger it can use is free and strong enough for long enough while it is parked.',
  },
  cabinet: {
    label: 'Power cabinet limit',
    detail: 'The power cabinet shared by its chargers has no more power to give.',
  },
  site: { label: 'Site service limit', detail: "The depot's service limit leaves no more power for it." },
  taper: { label: 'Battery taper', detail: 'Near full, its battery takes power only slowly.' },
};

/**
 * The depot's service limit lowered since a plan was made, below what the plan draws: the plan
 * does not know, and only a new plan keeps to it. Null when the plan keeps to today's limit.
 */
export function serviceLimitLowered(peakKw: number, madeUnderKw: number, nowKw: number | undefined): string | null {
  return nowKw !== undefined && peakKw > nowKw + 0.05 && nowKw < madeUnderKw - 0.05
    ? `The service limit is now ${num(nowKw)} kW, below this plan's peak (it was made under ${num(madeUnderKw)} kW).`
    : null;
}

/**
 * The buses whose runs changed since a plan was made (`PlanDetail.runsChanged`), in words; null
 * when none. The caller adds what to do where it is shown.
 */
export function runsChangedNote(ids: readonly string[]): string | null {
  if (!ids.length) return null;
  const named = ids.length <= 5 ? listOf(ids) : `${ids.slice(0, 5).join(', ')} and ${ids.length - 5} more`;
  return `The runs of ${ids.length === 1 ? 'bus' : 'buses'} ${named} changed since this plan was made (their times, or the energy they need): it may not serve them.`;
}

export function reasonText(reason: string | null): string {
  if (!reason) return 'Not enough energy';
  return REASON_TEXT[reason]?.label ?? reason;
}

export function reasonDetail(reason: string | null): string {
  return (reason && REASON_TEXT[reason]?.detail) || '';
}

export const STATE_LABELS: Record<PlanState, string> = {
  draft: 'Draft',
  published: 'Published',
  superseded: 'Superseded',
};

export const KIND_LABELS: Record<PlanSummary['kind'], string> = {
  generated: 'Generated',
  'what-if': 'What-if',
  revision: 'Revision',
};

/**
 * The label beside a version's number: a what-if is a study, never a draft to publish, so it reads
 * "What-if" whatever its state; other versions read their state.
 */
export function versionLabel(plan: Pick<PlanSummary, 'kind' | 'state'>): string {
  return plan.kind === 'what-if' ? KIND_LABELS['what-if'] : STATE_LABELS[plan.state];
}

/** "Version 3" or "What-if version 3". */
export function versionName(plan: Pick<PlanSummary, 'kind' | 'version'>): string {
  return plan.kind === 'what-if' ? `What-if version ${plan.version}` : `Version ${plan.version}`;
}

const collator = new Intl.Collator(undefined, { numeric: true, sensitivity: 'base' });
export const naturalCompare = (a: string, b: string) => collator.compare(a, b);

/** Shortfalls below this are rounding, not a short bus (as the API counts them). */
export const SHORT_KWH = 1e-6;

/** "16:15" at the depot. */
export function clock(iso: string, timeZone: string): string {
  return timeAt(iso, timeZone);
}

/** "Wed 16:15" at the depot (plans span two days). */
export function dayClock(iso: string, timeZone: string): string {
  return weekdayTimeAt(iso, timeZone);
}

/** "Wed, Dec 2, 15:02" at the depot (when a version was made or published). */
export function when(iso: string, timeZone: string): string {
  return dayTimeAt(iso, timeZone);
}

/** An amount of money; whole cents go through the one rounding rule (`toCents`), as on Costs. */
export function money(value: number, currency: string, digits = 2): string {
  if (digits === 2) value = toCents(value);
  try {
    return new Intl.NumberFormat(undefined, {
      style: 'currency',
      currency,
      maximumFractionDigits: digits,
      minimumFractionDigits: digits,
      // No "-$0.00": a figure that rounds to zero has no sign.
      signDisplay: 'negative',
    }).format(value);
  } catch {
    return `${value.toFixed(digits)} ${currency}`;
  }
}

export function num(value: number, digits = 1): string {
  return new Intl.NumberFormat(undefined, { maximumFractionDigits: digits, signDisplay: 'negative' }).format(value);
}

export function pct(share: number, digits = 1): string {
  return `${num(share * 100, digits)} %`;
}

/** One bus of the plan as the per-bus table shows it. */
export interface BusPlanRow {
  bus: string;
  chargers: string;
  /**
   * Each plug-in of the bus: charger, when at the depot, energy, and who plugs in and unplugs where
   * the depot has yard crew rules ('driver': on pulling in or out; null: the crew, or no rules).
   */
  sessions: {
    charger: string;
    plugIn: string;
    unplug: string;
    kwh: number;
    plugInByDriver: boolean;
    unplugByDriver: boolean;
  }[];
  kwh: number;
  /** Each departure: when, and the state of charge then. */
  departures: { at: string; socPct: number | null }[];
  shortfallKwh: number;
  short: boolean;
  reason: string;
  reasonDetail: string;
}

/** The plan's buses, short ones first (largest shortfall first), then by bus number. */
export function busRows(plan: Pick<PlanDetail, 'result' | 'timezone' | 'busCapacityKwh'>): BusPlanRow[] {
  const result = plan.result;
  if (!result) return [];
  const tz = plan.timezone;
  return result.buses
    .map((b) => {
      const sessions = result.sessions.filter((s) => s.bus === b.id).sort((x, y) => x.start.localeCompare(y.start));
      const capacity = plan.busCapacityKwh[b.id];
      const short = b.shortfallKwh > SHORT_KWH;
      return {
        bus: b.id,
        chargers: [...new Set(sessions.map((s) => s.charger))].join(', ') || '–',
        sessions: sessions.map((s) => ({
          charger: s.charger,
          plugIn: dayClock(s.start, tz),
          unplug: dayClock(s.end, tz),
          kwh: s.kwh,
          plugInByDriver: s.startMove === 'driver',
          unplugByDriver: s.endMove === 'driver',
        })),
        kwh: sessions.reduce((sum, s) => sum + s.kwh, 0),
        departures: b.departures.map((d) => ({
          at: dayClock(d.at, tz),
          socPct: capacity ? (d.kwh / capacity) * 100 : null,
        })),
        shortfallKwh: b.shortfallKwh,
        short,
        reason: short ? reasonText(b.reason) : '',
        // The engine's own words where it gives them: times, what binds, whether it is proven.
        reasonDetail: short
          ? b.cause
            ? `${b.cause.charAt(0).toUpperCase()}${b.cause.slice(1)}.`
            : reasonDetail(b.reason)
          : '',
      };
    })
    .sort(
      (a, b) =>
        Number(b.short) - Number(a.short) ||
        (a.short ? b.shortfallKwh - a.shortfallKwh : 0) ||
        naturalCompare(a.bus, b.bus),
    );
}

/** What a plan without slots is drawn on (`horizonOf(result) ?? NO_HORIZON`): one empty quarter hour. */
export const NO_HORIZON: PlanHorizon = { start: 0, end: 15 * 60_000, slotMs: 15 * 60_000 };

/** Where a span [from, to) sits on the horizon, in % of its width (clamped to it). */
export function spanPct(from: number, to: number, h: { start: number; end: number }): { left: number; width: number } {
  const total = h.end - h.start || 1;
  const a = Math.min(Math.max(from, h.start), h.end);
  const b = Math.min(Math.max(to, h.start), h.end);
  return { left: ((a - h.start) / total) * 100, width: (Math.max(0, b - a) / total) * 100 };
}

export type PriceLevel = 'low' | 'mid' | 'high';

/** Runs of slots at one price, with where the price ranks among the night's prices. */
export interface PriceBand {
  start: number;
  end: number;
  price: number;
  /** The tariff period, as the rate plan names it (null in plans made before slots carried it). */
  period: string | null;
  level: PriceLevel;
}

export function priceBands(result: Pick<PlanResult, 'slots'>): PriceBand[] {
  const h = horizonOf(result) ?? NO_HORIZON;
  const prices = [...new Set(result.slots.map((s) => s.price))].sort((a, b) => a - b);
  const level = (p: number): PriceLevel =>
    prices.length < 2 || p === prices[0] ? 'low' : p === prices.at(-1) ? 'high' : 'mid';
  const bands: PriceBand[] = [];
  for (const s of result.slots) {
    const t = Date.parse(s.start);
    const last = bands.at(-1);
    const period = s.period ?? null;
    if (last && last.price === s.price && last.period === period && last.end === t) last.end = t + h.slotMs;
    else bands.push({ start: t, end: t + h.slotMs, price: s.price, period, level: level(s.price) });
  }
  return bands;
}

/** Hour marks on the horizon (local hours at the depot), every `step` hours. */
export function hourTicks(result: Pick<PlanResult, 'slots'>, timeZone: string): { at: number; label: string }[] {
  const h = horizonOf(result) ?? NO_HORIZON;
  const hours = (h.end - h.start) / 3_600_000;
  const step = hours > 16 ? 3 : hours > 8 ? 2 : 1;
  const ticks: { at: number; label: string }[] = [];
  for (const s of result.slots) {
    const label = clock(s.start, timeZone);
    const [hh, mm] = label.split(':').map(Number);
    if (mm === 0 && (hh ?? 0) % step === 0) ticks.push({ at: Date.parse(s.start), label });
  }
  return ticks;
}

export { baselineName };

/**
 * A night against its baseline the way the costs are billed: the energy saving of the night and
 * its peak beside the baseline's (demand is billed once a billing period, so a night does not
 * claim a demand saving of its own). A baseline that delivers less carries its shortfall, valued
 * at the plan's average price, in its energy. Figures are in cents as shown: the plan's energy and
 * demand foot to its total (footedCents, the one rounding rule) and the saving is the shown
 * baseline less the shown energy, so no figure beside another is a cent off.
 */
export interface NightComparison {
  baselineName: string;
  /** The other baseline, shown beside it. */
  otherName: string | null;
  otherEnergy: number | null;
  planEnergy: number;
  planDemand: number;
  baselineEnergy: number;
  energySaving: number;
  energySavingShare: number;
  baselinePeakKw: number;
  baselineShortKwh: number;
}

export function nightComparison(result: PlanResult): NightComparison {
  const base = result.baseline;
  const baselineEnergy = toCents(base.energy + (base.shortfallCost ?? 0));
  const otherKind = base.kind === 'arrival' ? 'timer' : base.kind === 'timer' ? 'arrival' : null;
  const other = otherKind && result.baselines ? result.baselines[otherKind] : null;
  const { energy: planEnergy, demand: planDemand } = footedEnergyDemand(result.cost);
  const energySaving = toCents(baselineEnergy - planEnergy);
  return {
    baselineName: baselineName(base.kind),
    otherName: other ? baselineName(otherKind) : null,
    otherEnergy: other ? toCents(other.energy + (other.shortfallCost ?? 0)) : null,
    planEnergy,
    planDemand,
    baselineEnergy,
    energySaving,
    energySavingShare: baselineEnergy > 0 ? energySaving / baselineEnergy : 0,
    baselinePeakKw: base.peakKw,
    baselineShortKwh: base.shortfallKwh ?? 0,
  };
}

/** The figures of the summary cards. */
export interface PlanFigures extends NightComparison {
  cost: number;
  energyCost: number;
  demandCost: number;
  peakKw: number;
  limitKw: number;
  lowerBound: number;
  gap: number;
  /** False when the engine proved no useful bound (e.g. 0 while buses are short). */
  boundProven: boolean;
  /** The gap is to a bound that leaves out the crew's hours (the night has crew rules). */
  boundLeavesOutCrew: boolean;
  shortBuses: number;
  shortKwh: number;
  /**
   * A plan made from a cut-off: the night's cost split there (local HH:mm), what was drawn before it
   * and the re-plan from it on, footed to the total shown. Null for a night planned whole.
   */
  split: { at: string; before: number; after: number } | null;
}

export function planFigures(result: PlanResult): PlanFigures {
  const short = result.buses.filter((b) => b.shortfallKwh > SHORT_KWH);
  const night = nightComparison(result);
  return {
    ...night,
    cost: toCents(result.cost.total),
    energyCost: night.planEnergy,
    demandCost: night.planDemand,
    peakKw: Math.max(0, ...result.slots.map((s) => s.loadKw)),
    limitKw: Math.min(...result.slots.map((s) => s.limitKw)),
    lowerBound: result.lowerBound,
    gap: result.gap,
    boundProven: result.lowerBound > 0 && result.gap < 0.999,
    // Said only where there is a gap to explain (a tenth of a percent and more).
    boundLeavesOutCrew: result.boundKeepsCrew === false && result.gap >= 0.001,
    shortBuses: short.length,
    shortKwh: short.reduce((s, b) => s + b.shortfallKwh, 0),
    split: costSplit(result),
  };
}

function costSplit(result: PlanResult): PlanFigures['split'] {
  const own = result.replan?.own;
  const from = result.replan?.from;
  if (!own || !from) return null;
  const total = toCents(result.cost.total);
  const after = toCents(own.cost.total);
  // The ISO time carries the depot's offset: its clock digits are the depot's local time.
  return { at: from.slice(11, 16), before: toCents(total - after), after };
}

/** The version shown when none is chosen: the published one, else the newest. */
export function defaultVersion(plans: readonly PlanSummary[]): PlanSummary | null {
  return plans.find((p) => p.state === 'published') ?? [...plans].sort((a, b) => b.version - a.version)[0] ?? null;
}

/** The version to compare with by default: the closest older finished version, else the published one. */
export function previousVersion(plans: readonly PlanSummary[], current: PlanSummary): PlanSummary | null {
  const done = plans.filter((p) => p.id !== current.id && p.status === 'done');
  const older = done.filter((p) => p.version < current.version).sort((a, b) => b.version - a.version)[0];
  return older ?? done.find((p) => p.state === 'published') ?? null;
}

/** A stretch of the night where the slots' limit is below the service limit (a load-reduction window). */
export interface LoweredLimit {
  from: string;
  to: string;
  limitKw: number;
}

/**
 * The service limit (the slots' highest limit) and the load-reduction windows that lower it,
 * merged into runs of equal limit, in depot time.
 */
export function limitWindows(
  result: Pick<PlanResult, 'slots' | 'replan'>,
  timeZone: string,
): { serviceKw: number; lowered: LoweredLimit[]; before: { limitKw: number; until: string } | null } {
  const h = horizonOf(result) ?? NO_HORIZON;
  // A plan made from a cut-off keeps the night's slots before it with the limit they had then: the
  // limit it plans under is the one from the cut-off on (a limit lowered since is not a window).
  const fromMs = result.replan?.from ? Date.parse(result.replan.from) : -Infinity;
  const planned = result.slots.filter((s) => Date.parse(s.start) >= fromMs);
  const kept = result.slots.filter((s) => Date.parse(s.start) < fromMs);
  const serviceKw = Math.max(0, ...planned.map((s) => s.limitKw));
  const keptKw = Math.max(0, ...kept.map((s) => s.limitKw));
  const runs: { start: number; end: number; limitKw: number }[] = [];
  for (const s of planned) {
    if (s.limitKw >= serviceKw - 1e-9) continue;
    const t = Date.parse(s.start);
    const last = runs.at(-1);
    if (last && last.end === t && last.limitKw === s.limitKw) last.end = t + h.slotMs;
    else runs.push({ start: t, end: t + h.slotMs, limitKw: s.limitKw });
  }
  return {
    serviceKw,
    lowered: runs.map((r) => ({
      from: clock(new Date(r.start).toISOString(), timeZone),
      to: clock(new Date(r.end).toISOString(), timeZone),
      limitKw: r.limitKw,
    })),
    before:
      kept.length && Math.abs(keptKw - serviceKw) > 1e-9
        ? { limitKw: keptKw, until: clock(new Date(fromMs).toISOString(), timeZone) }
        : null,
  };
}

const BUS_NOTE = /^Bus (\S+?)(:)? (.*)$/;

/** "201, 202 and 203". */
export function listOf(items: readonly string[]): string {
  return items.length < 2 ? (items[0] ?? '') : `${items.slice(0, -1).join(', ')} and ${items.at(-1)}`;
}

/**
 * The plan's notes with the ones that say the same of several buses said once: "Bus 201: no state
 * of charge was entered for its 15:30 pull-in; 62 % is estimated from miles." for twelve buses
 * reads as one line naming the twelve. Other notes stay as they are, in their order.
 */
export function groupedNotes(notes: readonly string[]): string[] {
  const groups = new Map<string, { first: string; buses: string[]; rest: string[] }>();
  const order: (string | { key: string })[] = [];
  for (const n of notes) {
    const m = BUS_NOTE.exec(n);
    if (!m) {
      order.push(n);
      continue;
    }
    const rest = m[3]!;
    const key = rest.replace(/\d+(?:[.:,]\d+)*/g, '#');
    const g = groups.get(key);
    if (g) {
      g.buses.push(m[1]!);
      g.rest.push(rest);
    } else {
      groups.set(key, { first: n, buses: [m[1]!], rest: [rest] });
      order.push({ key });
    }
  }
  return order.map((o) => {
    if (typeof o === 'string') return o;
    const g = groups.get(o.key)!;
    if (g.buses.length === 1) return g.first;
    const buses = [...g.buses].sort(naturalCompare);
    const rest = g.rest[0]!;
    if (/^no state of charge was entered/.test(rest)) {
      return `Buses ${listOf(buses)}: no state of charge was entered at their pull-in; their arrival charge is estimated from the miles of their runs.`;
    }
    if (/^has no runs on (\S+); it is assumed at its ceiling/.test(rest)) {
      const day = /^has no runs on (\S+);/.exec(rest)![1];
      return `Buses ${listOf(buses)} have no runs on ${day}; they are assumed at their ceiling.`;
    }
    if (/^has a reading at its last pull-in/.test(rest)) {
      return `Buses ${listOf(buses)} have a reading at their last pull-in: they are planned from there, without the midday layover.`;
    }
    if (/^needs .* relies on the midday layover/.test(rest)) {
      return `Buses ${listOf(buses)} need more than a full battery (with reserve) for the runs that follow their pull-out: they leave at their ceiling and top up at the midday layover.`;
    }
    return `Buses ${listOf(buses)}, each: ${rest}`;
  });
}

/**
 * Buses whose next day needs more than a full battery: they leave at their ceiling (so they are
 * not short tonight) and count on the next day's midday layover to finish their runs.
 */
export function middayTopUpBuses(notes: readonly string[]): string[] {
  const out = new Set<string>();
  for (const n of notes) {
    const m = /^Bus (\S+) needs .* midday layover/.exec(n);
    if (m) out.add(m[1]!);
  }
  return [...out].sort(naturalCompare);
}
