import type { RatePlanDefinition } from '@nightyard/contracts';
import { localParts } from './local-time.js';
import { ratePlanPeriodAt, seasonOf } from './rate-calendar.js';

/** One interval of metered or planned site demand. */
export interface IntervalDemand {
  /** Start of the interval (epoch ms). */
  startMs: number;
  /** Energy drawn in the interval (kWh). */
  kwh: number;
  /**
   * An estimate of time gone by (a forecast night nobody planned or metered): its energy is
   * billed, but it sets no peak. The demand of a span that has passed is what was recorded
   * (meter data, peaks entered in Depot, published plans): a guess at when unplanned buses drew
   * their energy must not bill, or be shown as, a peak the meter never saw.
   */
  energyOnly?: boolean;
}

export interface BillLine {
  name: string;
  quantity: number;
  unit: 'kWh' | 'kW' | 'day' | 'month';
  rate: number;
  /** In full precision: round only to show (`footedCents` in the contracts). */
  amount: number;
  /** Where the quantity comes from when not simply the intervals (a ratchet, a peak entered by hand). */
  note?: string;
}

export interface Bill {
  currency: string;
  /** Energy by time-of-use period, then the price change of each energy block used. */
  energy: BillLine[];
  /** Facility demand and each period's demand: highest interval average demand x rate. */
  demand: (BillLine & { peakAt: number | null })[];
  /** Fixed charges, and the top-up to the minimum bill when the bill is below it. */
  fixed: BillLine[];
  energyTotal: number;
  demandTotal: number;
  fixedTotal: number;
  /** Sum of the unrounded lines: round it once, to show. */
  total: number;
  kwh: number;
}

export interface BillOptions {
  zone: string;
  /** Length of each interval in minutes (15 for the utility's demand interval). */
  intervalMinutes: number;
  /** The billing period's days, for daily fixed charges. */
  days: number;
  /** Peaks already set earlier in the billing period: only demand above them is charged (a night's marginal cost). */
  peaksSoFarKw?: { facility?: number; periods?: Record<string, number> };
  /**
   * Peaks the utility's meter has already recorded in this billing period (entered in Depot):
   * the demand billed is at least these, whatever the intervals show.
   */
  recordedPeaksKw?: { facility?: number; periods?: Record<string, number> };
  /**
   * The highest facility demand of the previous billing periods the rate plan's demand ratchet
   * looks back over, with where it comes from (null or absent: no earlier peak known).
   */
  ratchetBase?: { kw: number; source: string } | null;
  /** kWh already used earlier in the billing period (for energy blocks of a part of a period). */
  kwhBefore?: number;
  /** Leave out fixed charges and the minimum bill (a night's marginal cost does not change them). */
  withoutFixed?: boolean;
}

/**
 * A peak is set by the first interval that reaches it: equal loads of later nights (the same
 * forecast every weekday) differ only in floating-point noise and must not move its date.
 */
const PEAK_EPSILON_KW = 1e-9;

const kwText = (v: number) => `${Math.round(v * 10) / 10} kW`;
const kwhText = (v: number) => `${Math.round(v).toLocaleString('en-US')} kWh`;

/**
 * The bill of a billing period from interval data. An interval's demand is its energy divided by
 * its length (utilities' tariff definitions: common practice); the facility demand charge applies
 * to the highest interval of the period at any hour, a period's demand charge to the highest
 * interval inside that period's windows. Seasonal charges follow the season of each interval.
 * Energy blocks are filled in time order from the period's first kWh; a demand ratchet raises the
 * facility demand billed to its share of the earlier peak; a minimum bill tops the total up.
 * Every amount stays in full precision and every total is the sum of its unrounded lines: the
 * one rounding happens where a figure is shown.
 */
export function computeBill(def: RatePlanDefinition, intervals: readonly IntervalDemand[], opts: BillOptions): Bill {
  const hours = opts.intervalMinutes / 60;
  const energy = new Map<string, { kwh: number; amount: number; rate: number; rates: Set<number> }>();
  const blocks = new Map<string, { kwh: number; amount: number; rate: number; rates: Set<number>; order: number }>();
  const periodPeak = new Map<string, { kw: number; at: number | null; rate: number }>();
  let facility = { kw: 0, at: null as number | null, rate: 0 };
  let kwhTotal = 0;
  let cumulative = opts.kwhBefore ?? 0;
  const classify = classifier(def, opts.zone);
  for (const i of intervals) {
    const { p, season } = classify(i.startMs);
    const kw = i.kwh / hours;
    kwhTotal += i.kwh;
    const e = energy.get(p.period) ?? { kwh: 0, amount: 0, rate: p.price, rates: new Set<number>() };
    e.kwh += i.kwh;
    e.amount += i.kwh * p.price;
    e.rates.add(p.price);
    energy.set(p.period, e);
    if (season.energyBlocks.length && i.kwh > 0) {
      let lo = 0;
      season.energyBlocks.forEach((b, k) => {
        const hi = b.uptoKwh ?? Infinity;
        const inBlock = Math.max(0, Math.min(hi, cumulative + i.kwh) - Math.max(lo, cumulative));
        if (inBlock > 0 && b.adder !== 0) {
          const name =
            b.uptoKwh === null ? `Energy above ${kwhText(lo)}` : `Energy from ${kwhText(lo)} to ${kwhText(hi)}`;
          const acc = blocks.get(name) ?? { kwh: 0, amount: 0, rate: b.adder, rates: new Set<number>(), order: k };
          acc.kwh += inBlock;
          acc.amount += inBlock * b.adder;
          acc.rates.add(b.adder);
          blocks.set(name, acc);
        }
        lo = hi;
      });
    }
    if (i.kwh > 0) cumulative += i.kwh;
    if (facility.at === null && season.facilityDemandCharge > facility.rate)
      facility.rate = season.facilityDemandCharge;
    if (!i.energyOnly && kw > facility.kw + PEAK_EPSILON_KW)
      facility = { kw, at: i.startMs, rate: season.facilityDemandCharge };
    if (!p.offPeak && p.demandCharge > 0) {
      // An energy-only interval still opens its period's line (a peak entered for it is billed).
      const cur = periodPeak.get(p.period) ?? { kw: 0, at: null, rate: p.demandCharge };
      const higher = !i.energyOnly && kw > cur.kw + PEAK_EPSILON_KW;
      if (higher || !periodPeak.has(p.period))
        periodPeak.set(p.period, higher ? { kw, at: i.startMs, rate: p.demandCharge } : cur);
    }
  }
  const averaged = (e: { kwh: number; amount: number; rate: number; rates: Set<number> }) =>
    // Several prices under one name (a season change): show the average price paid.
    e.rates.size === 1 || e.kwh === 0 ? e.rate : e.amount / e.kwh;
  const energyLines: BillLine[] = [
    ...[...energy].map(([name, e]): BillLine => ({
      name: `Energy, ${name}`,
      quantity: e.kwh,
      unit: 'kWh',
      rate: averaged(e),
      amount: e.amount,
    })),
    ...[...blocks]
      .sort((a, b) => a[1].order - b[1].order)
      .map(([name, e]): BillLine => ({
        name,
        quantity: e.kwh,
        unit: 'kWh',
        rate: averaged(e),
        amount: e.amount,
        note: "Price change per kWh of this block of the period's energy",
      })),
  ];
  const soFar = opts.peaksSoFarKw ?? {};
  const recorded = opts.recordedPeaksKw ?? {};
  const demandLines: Bill['demand'] = [];
  const chargeable = (kw: number, before = 0) => Math.max(0, kw - before);
  if (facility.rate > 0 || facility.kw > 0) {
    let kw = facility.kw;
    let at = facility.at;
    let note: string | undefined;
    if ((recorded.facility ?? 0) > kw) {
      kw = recorded.facility!;
      at = null;
      note = `Peak recorded by the utility's meter earlier in the period (entered in Depot): ${kwText(kw)}`;
    }
    const ratchet = def.demandRatchet;
    if (ratchet && opts.ratchetBase && (ratchet.percent / 100) * opts.ratchetBase.kw > kw) {
      kw = (ratchet.percent / 100) * opts.ratchetBase.kw;
      at = null;
      note = `Demand ratchet: ${ratchet.percent} % of ${kwText(opts.ratchetBase.kw)}, the highest demand of the previous ${ratchet.months} months (${opts.ratchetBase.source})`;
    }
    const q = chargeable(kw, soFar.facility);
    demandLines.push({
      name: 'Facility demand',
      quantity: q,
      unit: 'kW',
      rate: facility.rate,
      amount: q * facility.rate,
      peakAt: at,
      ...(note ? { note } : {}),
    });
  }
  for (const [name, peak] of periodPeak) {
    let kw = peak.kw;
    let at = peak.at;
    let note: string | undefined;
    const entered = recorded.periods?.[name] ?? 0;
    if (entered > kw) {
      kw = entered;
      at = null;
      note = `Peak recorded by the utility's meter earlier in the period (entered in Depot): ${kwText(kw)}`;
    }
    const q = chargeable(kw, soFar.periods?.[name]);
    demandLines.push({
      name: `Demand, ${name}`,
      quantity: q,
      unit: 'kW',
      rate: peak.rate,
      amount: q * peak.rate,
      peakAt: at,
      ...(note ? { note } : {}),
    });
  }
  const fixedLines: BillLine[] = opts.withoutFixed
    ? []
    : def.fixedCharges.map((f) => ({
        name: f.name,
        quantity: f.per === 'day' ? opts.days : 1,
        unit: f.per,
        rate: f.amount,
        amount: f.amount * (f.per === 'day' ? opts.days : 1),
      }));
  const sum = (l: BillLine[]) => l.reduce((a, b) => a + b.amount, 0);
  const energyTotal = sum(energyLines);
  const demandTotal = sum(demandLines);
  const min = def.minimumCharge;
  if (min && !opts.withoutFixed) {
    const quantity = min.per === 'day' ? opts.days : 1;
    const floor = min.amount * quantity;
    const before = energyTotal + demandTotal + sum(fixedLines);
    if (floor > before) {
      fixedLines.push({
        name: 'Minimum bill top-up',
        quantity,
        unit: min.per,
        rate: min.amount,
        amount: floor - before,
        note: `The bill is at least the minimum of ${floor.toFixed(2)} ${def.currency}`,
      });
    }
  }
  const fixedTotal = sum(fixedLines);
  return {
    currency: def.currency,
    energy: energyLines,
    demand: demandLines,
    fixed: fixedLines,
    energyTotal,
    demandTotal,
    fixedTotal,
    total: energyTotal + demandTotal + fixedTotal,
    kwh: kwhTotal,
  };
}

/**
 * Which period and season an interval falls in, remembered per rate plan and zone: a billing
 * period is billed several ways over the same ~3,000 intervals (projected, to date, with the
 * plans, with the baselines), and the zone arithmetic is most of a bill's work.
 */
const classified = new WeakMap<
  RatePlanDefinition,
  Map<string, Map<number, { p: ReturnType<typeof ratePlanPeriodAt>; season: ReturnType<typeof seasonOf> }>>
>();
const MAX_REMEMBERED = 20_000;

function classifier(def: RatePlanDefinition, zone: string) {
  let byZone = classified.get(def);
  if (!byZone) classified.set(def, (byZone = new Map()));
  let known = byZone.get(zone);
  if (!known) byZone.set(zone, (known = new Map()));
  const memo = known;
  return (startMs: number) => {
    let hit = memo.get(startMs);
    if (!hit) {
      const local = localParts(startMs, zone);
      hit = { p: ratePlanPeriodAt(def, local), season: seasonOf(def, local.month) };
      if (memo.size >= MAX_REMEMBERED) memo.clear();
      memo.set(startMs, hit);
    }
    return hit;
  };
}

/**
 * What one night adds to the bill, given the billing period's peaks so far: its energy and the
 * demand charges on any increase over those peaks. Fixed charges are not affected by a night.
 */
export function nightMarginalCost(
  def: RatePlanDefinition,
  intervals: readonly IntervalDemand[],
  opts: Omit<BillOptions, 'days' | 'withoutFixed'>,
): Bill {
  return computeBill(def, intervals, { ...opts, days: 0, withoutFixed: true });
}

/** The highest demand so far, facility and per period, from interval data (for peaks so far). */
export function peaksOf(
  def: RatePlanDefinition,
  intervals: readonly IntervalDemand[],
  opts: { zone: string; intervalMinutes: number },
) {
  const bill = computeBill(def, intervals, { ...opts, days: 0, withoutFixed: true });
  const hours = opts.intervalMinutes / 60;
  let facility = { kw: 0, at: null as number | null };
  const periods: Record<string, { kw: number; at: number | null }> = {};
  for (const i of intervals) {
    const kw = i.kwh / hours;
    if (kw > facility.kw) facility = { kw, at: i.startMs };
  }
  for (const d of bill.demand) {
    if (d.name.startsWith('Demand, ')) periods[d.name.slice(8)] = { kw: d.quantity, at: d.peakAt };
  }
  return { facility, periods };
}
