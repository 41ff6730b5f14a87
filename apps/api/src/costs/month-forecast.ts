import { and, eq, gte, lt } from 'drizzle-orm';
import { DateTime } from 'luxon';
import type { RatePlanDefinition } from '@nightyard/contracts';
import { localParts, ratePlanPeriodAtMs, type NightCharging } from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { buses, runs } from '../db/schema';

const SLOT_MS = 15 * 60_000;
/** Grid kWh per battery kWh: a charger's losses (about 8%: common practice for DC depot chargers). */
const CHARGER_EFFICIENCY = 0.92;

/** The building's own load (kW) at an instant: one flat value, or 24 by local hour. */
export function buildingKwAt(profile: readonly number[], t: number, zone: string): number {
  return profile.length === 1 ? profile[0]! : profile[localParts(t, zone).hour]!;
}

/** A service day as its runs give it: when the last bus is home and the first leaves, and the energy driven. */
interface ServiceDay {
  date: string;
  lastPullInMs: number;
  firstPullOutMs: number;
  kwh: number;
}

export interface ForecastNight {
  /** The service day whose night it is. */
  date: string;
  /** Battery kWh the night must put back: the next service day's runs. */
  needKwh: number;
  /** Where the need comes from: that day's runs, or the latest entered day of the same weekday. */
  basis: 'runs' | 'typical-weekday';
  /** The night's 15-minute intervals: price and the room under the service limit. */
  slots: ForecastSlot[];
  /** Grid kWh the night draws (the need over the chargers' efficiency). */
  gridKwh: number;
}

export interface ForecastSlot {
  t: number;
  price: number;
  /** The building's own load (kW). */
  buildingKw: number;
  /** Room for charging under the service limit (kW). */
  roomKw: number;
}

/** Charging kW per interval, by interval start. */
export type ChargingKw = Map<number, number>;

/** The depot as a forecast reads it. */
export type ForecastDepot = { id: string; timezone: string; serviceLimitKw: number; otherLoadKw: number[] };

/** One interval of a forecast night: its price, the building's load and the room left under the service limit. */
export function forecastSlot(depot: ForecastDepot, rate: RatePlanDefinition, t: number): ForecastSlot {
  const buildingKw = buildingKwAt(depot.otherLoadKw, t, depot.timezone);
  return {
    t,
    price: ratePlanPeriodAtMs(rate, t, depot.timezone).price,
    buildingKw,
    roomKw: Math.max(0, depot.serviceLimitKw - buildingKw),
  };
}

/** Each entered service day around the period, with its energy from kWh or miles x the bus's kWh per mile. */
async function serviceDaysAround(db: Db, depotId: string, from: string, to: string): Promise<ServiceDay[]> {
  const rows = await db
    .select({
      date: runs.serviceDate,
      pullOut: runs.pullOut,
      pullIn: runs.pullIn,
      miles: runs.miles,
      kwh: runs.kwh,
      perMile: buses.kwhPerMile,
    })
    .from(runs)
    .innerJoin(buses, eq(buses.id, runs.busId))
    .where(and(eq(runs.depotId, depotId), gte(runs.serviceDate, from), lt(runs.serviceDate, to)))
    // In a fixed order: the energy is a sum of fractions, and a sum in another order can differ
    // in its last digit from one computation to the next.
    .orderBy(runs.serviceDate, runs.id);
  const days = new Map<string, ServiceDay>();
  for (const r of rows) {
    const d = days.get(r.date) ?? { date: r.date, lastPullInMs: 0, firstPullOutMs: Infinity, kwh: 0 };
    d.lastPullInMs = Math.max(d.lastPullInMs, r.pullIn.getTime());
    d.firstPullOutMs = Math.min(d.firstPullOutMs, r.pullOut.getTime());
    d.kwh += r.kwh ?? (r.miles ?? 0) * r.perMile;
    days.set(r.date, d);
  }
  return [...days.values()].sort((a, b) => a.date.localeCompare(b.date));
}

/**
 * The nights of a billing period that have no published plan, forecast from the service calendar:
 * a night puts back what the next service day's runs use (entered runs, else, past the last day
 * entered, the latest entered day of the same weekday), drawn between the last bus home and the first
 * out. The plan would land between two simple shapes (`forecastShapes`): all of it in the
 * cheapest intervals, and spread evenly over the night; each night's intervals are returned so the
 * bill can be given as that range, under the demand target where there is one. Weekdays only for days with nothing entered (a weekend with no runs has no night).
 */
export async function forecastNights(
  db: Db,
  depot: ForecastDepot,
  period: { start: DateTime; end: DateTime },
  rate: RatePlanDefinition,
  planned: Set<string>,
): Promise<ForecastNight[]> {
  const zone = depot.timezone;
  const entered = await serviceDaysAround(
    db,
    depot.id,
    period.start.minus({ days: 28 }).toISODate()!,
    period.end.plus({ days: 7 }).toISODate()!,
  );
  const byDate = new Map(entered.map((d) => [d.date, d]));
  // A weekday past the last one entered: the latest entered day of its weekday, moved to it. (A
  // day without runs between entered days is a day without service: a holiday, a break.)
  const lastEntered = entered.at(-1)?.date ?? '';
  const dayOf = (date: string): { day: ServiceDay; basis: ForecastNight['basis'] } | null => {
    const known = byDate.get(date);
    if (known) return { day: known, basis: 'runs' };
    const local = DateTime.fromISO(date, { zone });
    if (date <= lastEntered || local.weekday > 5) return null;
    const like = entered
      .filter((d) => d.date < date && DateTime.fromISO(d.date, { zone }).weekday === local.weekday)
      .at(-1);
    if (!like) return null;
    const shift = local.diff(DateTime.fromISO(like.date, { zone }), 'days').days * 86_400_000;
    return {
      day: {
        date,
        lastPullInMs: like.lastPullInMs + shift,
        firstPullOutMs: like.firstPullOutMs + shift,
        kwh: like.kwh,
      },
      basis: 'typical-weekday',
    };
  };

  const nights: ForecastNight[] = [];
  for (let d = period.start; d < period.end; d = d.plus({ days: 1 })) {
    const date = d.toISODate()!;
    if (planned.has(date)) continue;
    const tonight = dayOf(date);
    if (!tonight) continue;
    // The next service day within a week (a Friday's night runs to Monday).
    let next: ReturnType<typeof dayOf> = null;
    for (let k = 1; k <= 7 && !next; k++) next = dayOf(d.plus({ days: k }).toISODate()!);
    if (!next) continue;
    const from = Math.ceil(tonight.day.lastPullInMs / SLOT_MS) * SLOT_MS;
    const to = Math.floor(next.day.firstPullOutMs / SLOT_MS) * SLOT_MS;
    if (to <= from) continue;
    const slots: ForecastSlot[] = [];
    for (let t = from; t < to; t += SLOT_MS) slots.push(forecastSlot(depot, rate, t));
    nights.push({
      date,
      needKwh: next.day.kwh,
      basis: next.basis === 'runs' && tonight.basis === 'runs' ? 'runs' : 'typical-weekday',
      slots,
      gridKwh: next.day.kwh / CHARGER_EFFICIENCY,
    });
  }
  return nights;
}

/**
 * A forecast night's two shapes: all of it in the cheapest intervals, and the same power all
 * night. `siteCapKw` (the demand target by interval: site load, the building's with the
 * charging) holds both under the peaks the nights left are planned under, as a plan would be.
 * What does not fit under it raises the lowest site loads first, as little above the target as
 * it can, so the night's energy is always whole.
 */
export function forecastShapes(
  night: ForecastNight,
  siteCapKw?: (t: number) => number,
): { cheapest: ChargingKw; even: ChargingKw } {
  if (!siteCapKw)
    return { cheapest: fillCheapest(night.slots, night.gridKwh).kw, even: fillEvenly(night.slots, night.gridKwh) };
  // Each interval's cap read once: both shapes, and what tops them up, use it.
  const caps = night.slots.map((s) => siteCapKw(s.t));
  const capped = night.slots.map((s, i) => ({
    ...s,
    roomKw: Math.max(0, Math.min(s.roomKw, caps[i]! - s.buildingKw)),
  }));
  const whole = (kw: ChargingKw) => raiseLowest(night.slots, kw, night.gridKwh, caps);
  return {
    cheapest: whole(fillCheapest(capped, night.gridKwh).kw),
    even: whole(fillEvenly(capped, night.gridKwh)),
  };
}

/**
 * A night the demand target's LP charged. The LP plans each bus from its battery, from when it is
 * home to when it leaves, under the target; but it takes each night on its own (from a reading, or
 * the morning's estimate), so its energy need not be the month's: over a month the chargers put
 * back what the runs use. So the night keeps the energy of the next day's runs (`gridKwh`), placed
 * where the LP put its charging: the cheapest shape is the LP's charging (scaled down where it is
 * more than the runs use), what the runs need beyond it in the cheapest room left under the cap;
 * the even shape spreads it over the intervals with a bus at the depot. What does not fit under
 * the cap goes above it as little as it can (`raiseLowest`), as in `forecastShapes`.
 */
export function targetShapes(
  night: ForecastNight,
  charging: NightCharging,
  slotOf: (t: number) => ForecastSlot,
  siteCapKw: (t: number) => number,
): { cheapest: ChargingKw; even: ChargingKw } {
  const lp = quarterHoursOf(charging);
  const slots = [...lp.keys()].sort((a, b) => a - b).map(slotOf);
  if (!slots.length) return forecastShapes(night, siteCapKw);
  const caps = slots.map((s) => siteCapKw(s.t));
  const lpKwh = sumKwh(lp);
  const scale = lpKwh > night.gridKwh ? night.gridKwh / lpKwh : 1;
  const placed: ChargingKw = new Map([...lp].map(([t, kw]) => [t, kw * scale]));
  const room = slots.map((s, i) => ({
    ...s,
    roomKw: Math.max(0, Math.min(s.roomKw, caps[i]! - s.buildingKw) - placed.get(s.t)!),
  }));
  for (const [t, kw] of fillCheapest(room, night.gridKwh - sumKwh(placed)).kw) placed.set(t, placed.get(t)! + kw);
  return {
    cheapest: raiseLowest(slots, placed, night.gridKwh, caps),
    even: forecastShapes({ ...night, slots }, siteCapKw).even,
  };
}

/** A plan's charging in the bill's 15-minute intervals, whatever its slot length: each slot's energy goes to the intervals it overlaps. */
function quarterHoursOf(charging: NightCharging): ChargingKw {
  const kw: ChargingKw = new Map();
  const slotMs = charging.slotMinutes * 60_000;
  for (const s of charging.slots) {
    const end = s.startMs + slotMs;
    for (let t = Math.floor(s.startMs / SLOT_MS) * SLOT_MS; t < end; t += SLOT_MS) {
      const overlap = Math.min(end, t + SLOT_MS) - Math.max(s.startMs, t);
      kw.set(t, (kw.get(t) ?? 0) + (s.kw * overlap) / SLOT_MS);
    }
  }
  return kw;
}

/** Cheapest intervals first, each up to its room; with the kWh that did not fit. */
function fillCheapest(slots: readonly ForecastSlot[], gridKwh: number): { kw: ChargingKw; leftKwh: number } {
  const kw: ChargingKw = new Map();
  let left = gridKwh;
  for (const s of slots.slice().sort((a, b) => a.price - b.price || a.t - b.t)) {
    if (left <= 1e-9) break;
    const take = Math.min(s.roomKw, left * 4);
    kw.set(s.t, take);
    left -= take / 4;
  }
  return { kw, leftKwh: Math.max(0, left) };
}

/** The same power all night, capped by each interval's room (the rest in the cheapest intervals left). */
function fillEvenly(slots: readonly ForecastSlot[], gridKwh: number): ChargingKw {
  const flat = (gridKwh * 4) / slots.length;
  const kw: ChargingKw = new Map();
  let left = gridKwh;
  for (const s of slots) {
    const take = Math.min(flat, s.roomKw);
    kw.set(s.t, take);
    left -= take / 4;
  }
  return left > 1e-9 ? topUp(slots, kw, gridKwh) : kw;
}

/**
 * Energy left over below this (kWh) is the night's energy rounded, not a need: not placed. Raised
 * above the target for it, a forecast night read 185.001 kW and took the month's peak from the
 * night that set it.
 */
const MEASURABLE_KWH = 0.01;

/** `kw` topped up to `gridKwh` in the room each interval has left, cheapest first. */
function topUp(slots: readonly ForecastSlot[], kw: ChargingKw, gridKwh: number): ChargingKw {
  const left = gridKwh - sumKwh(kw);
  if (left < MEASURABLE_KWH) return kw;
  const rest = fillCheapest(
    slots.map((s) => ({ ...s, roomKw: Math.max(0, s.roomKw - (kw.get(s.t) ?? 0)) })),
    left,
  ).kw;
  const out = new Map(kw);
  for (const [t, extra] of rest) out.set(t, (out.get(t) ?? 0) + extra);
  return out;
}

/**
 * `kw` topped up to `gridKwh` where the site load is furthest below its cap (water-filling on the
 * excess over the target, under the service limit): what must go above the target goes above it
 * by as little as it can, in every demand period alike.
 */
function raiseLowest(
  slots: readonly ForecastSlot[],
  kw: ChargingKw,
  gridKwh: number,
  capKw: readonly number[],
): ChargingKw {
  const left = gridKwh - sumKwh(kw);
  if (left < MEASURABLE_KWH) return kw;
  const site = slots.map((s) => s.buildingKw + (kw.get(s.t) ?? 0));
  const top = slots.map((s) => s.buildingKw + s.roomKw);
  const cap = slots.map((_, i) => Math.min(capKw[i]!, top[i]!));
  const to = (excess: number) => site.map((v, i) => Math.max(v, Math.min(top[i]!, cap[i]! + excess)));
  const added = (excess: number) => to(excess).reduce((a, v, i) => a + (v - site[i]!) / 4, 0);
  let lo = 0;
  let hi = Math.max(...top);
  for (let k = 0; k < 100 && hi - lo > 1e-9; k++) {
    const mid = (lo + hi) / 2;
    if (added(mid) < left) lo = mid;
    else hi = mid;
  }
  const out = new Map(kw);
  to(hi).forEach((v, i) => out.set(slots[i]!.t, v - slots[i]!.buildingKw));
  return out;
}

const sumKwh = (kw: ChargingKw) => {
  let kwh = 0;
  for (const v of kw.values()) kwh += v / 4;
  return kwh;
};
