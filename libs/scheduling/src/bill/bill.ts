import { DateTime } from 'luxon';
import type { RatePlanDefinition } from '@nightyard/contracts';
import { periodAt, seasonOf } from './rate-calendar.js';

/** One interval of metered or planned site demand. */
export interface IntervalDemand {
  /** Start of the interval (epoch ms). */
  startMs: number;
  /** Energy drawn in the interval (kWh). */
  kwh: number;
}

export interface BillLine {
  name: string;
  quantity: number;
  unit: 'kWh' | 'kW' | 'day' | 'month';
  rate: number;
  amount: number;
}

export interface Bill {
  currency: string;
  /** Energy by time-of-use period. */
  energy: BillLine[];
  /** Facility demand and each period's demand: highest interval average demand x rate. */
  demand: (BillLine & { peakAt: number | null })[];
  fixed: BillLine[];
  energyTotal: number;
  demandTotal: number;
  fixedTotal: number;
  total: number;
  kwh: number;
}

export interface BillOptions {
  zone: string;
  /** Length of each interval in minutes (15 for the utility's demand interval). */
  intervalMinutes: number;
  /** The billing period's days, for daily fixed charges. */
  days: number;
  /** Peaks already set earlier in the billing period: only demand above them is charged. */
  peaksSoFarKw?: { facility?: number; periods?: Record<string, number> };
  /** Leave out fixed charges (a night's marginal cost does not change them). */
  withoutFixed?: boolean;
}

const cents = (v: number) => Math.round(v * 100) / 100;

/**
 * The bill of a billing period from interval data. An interval's demand is its energy divided by
 * its length (utilities' tariff definitions: common practice); the facility demand charge applies
 * to the highest interval of the period at any hour, a period's demand charge to the highest
 * interval inside that period's windows. Seasonal charges follow the season of each interval.
 */
export function computeBill(def: RatePlanDefinition, intervals: readonly IntervalDemand[], opts: BillOptions): Bill {
  const hours = opts.intervalMinutes / 60;
  const energy = new Map<string, { kwh: number; amount: number; rate: number; rates: Set<number> }>();
  const periodPeak = new Map<string, { kw: number; at: number | null; rate: number }>();
  let facility = { kw: 0, at: null as number | null, rate: 0 };
  let kwhTotal = 0;
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
    if (kw > facility.kw) facility = { kw, at: i.startMs, rate: season.facilityDemandCharge };
    if (!p.offPeak && p.demandCharge > 0) {
      const cur = periodPeak.get(p.period) ?? { kw: 0, at: null, rate: p.demandCharge };
      if (kw > cur.kw) periodPeak.set(p.period, { kw, at: i.startMs, rate: p.demandCharge });
    }
  }
  const energyLines: BillLine[] = [...energy].map(([name, e]) => ({
    name: `Energy, ${name}`,
    quantity: e.kwh,
    unit: 'kWh',
    // Several prices under one name (a season change): show the average price paid.
    rate: e.rates.size === 1 ? e.rate : e.amount / e.kwh,
    amount: cents(e.amount),
  }));
  const soFar = opts.peaksSoFarKw ?? {};
  const demandLines: Bill['demand'] = [];
  const chargeable = (kw: number, before = 0) => Math.max(0, kw - before);
  if (facility.rate > 0 || facility.kw > 0) {
    const q = chargeable(facility.kw, soFar.facility);
    demandLines.push({ name: 'Facility demand', quantity: q, unit: 'kW', rate: facility.rate, amount: cents(q * facility.rate), peakAt: facility.at });
  }
  for (const [name, peak] of periodPeak) {
    const q = chargeable(peak.kw, soFar.periods?.[name]);
    demandLines.push({ name: `Demand, ${name}`, quantity: q, unit: 'kW', rate: peak.rate, amount: cents(q * peak.rate), peakAt: peak.at });
  }
  const fixedLines: BillLine[] = opts.withoutFixed
    ? []
    : def.fixedCharges.map((f) => ({
        name: f.name,
        quantity: f.per === 'day' ? opts.days : 1,
        unit: f.per,
        rate: f.amount,
        amount: cents(f.amount * (f.per === 'day' ? opts.days : 1)),
      }));
  const sum = (l: BillLine[]) => cents(l.reduce((a, b) => a + b.amount, 0));
  const energyTotal = sum(energyLines);
  const demandTotal = sum(demandLines);
  const fixedTotal = sum(fixedLines);
  return {
    currency: def.currency,
    energy: energyLines,
    demand: demandLines,
    fixed: fixedLines,
    energyTotal,
    demandTotal,
    fixedTotal,
    total: cents(energyTotal + demandTotal + fixedTotal),
    kwh: kwhTotal,
  };
}

/**
 * Which period and season an interval falls in, remembered per rate plan and zone: a billing
 * period is billed several ways over the same ~3,000 intervals (projected, to date, with the
 * plans, with the baselines), and the zone arithmetic is most of a bill's work.
 */
const classified = new WeakMap<RatePlanDefinition, Map<string, Map<number, { p: ReturnType<typeof periodAt>; season: ReturnType<typeof seasonOf> }>>>();
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
      const local = DateTime.fromMillis(startMs, { zone });
      hit = { p: periodAt(def, local), season: seasonOf(def, local.month) };
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
  def: RatePlanDefinition, intervals: readonly IntervalDemand[],
  opts: Omit<BillOptions, 'days' | 'withoutFixed'>,
): Bill {
  return computeBill(def, intervals, { ...opts, days: 0, withoutFixed: true });
}

/** The highest demand so far, facility and per period, from interval data (for peaks so far). */
export function peaksOf(def: RatePlanDefinition, intervals: readonly IntervalDemand[], opts: { zone: string; intervalMinutes: number }) {
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
