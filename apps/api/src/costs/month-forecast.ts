import { and, eq, gte, lt } from 'drizzle-orm';
import { DateTime } from 'luxon';
import type { RatePlanDefinition } from '@nightyard/contracts';
import { localParts, ratePlanPeriodAtMs } from '@nightyard/scheduling';
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
  /** Two ways to draw it from the grid, per 15-minute interval (kW of charging). */
  cheapest: Map<number, number>;
  even: Map<number, number>;
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
 * out. The plan would land between two simple shapes: all of it in the cheapest intervals the
 * service limit allows, and spread evenly over the night; both are returned so the bill can be
 * given as a range. Weekdays only for days with nothing entered (a weekend with no runs has no night).
 */
export async function forecastNights(
  db: Db,
  depot: { id: string; timezone: string; serviceLimitKw: number; otherLoadKw: number[] },
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
    const slots: { t: number; price: number; roomKw: number }[] = [];
    for (let t = from; t < to; t += SLOT_MS) {
      slots.push({
        t,
        price: ratePlanPeriodAtMs(rate, t, zone).price,
        roomKw: Math.max(0, depot.serviceLimitKw - buildingKwAt(depot.otherLoadKw, t, zone)),
      });
    }
    const gridKwh = next.day.kwh / CHARGER_EFFICIENCY;
    nights.push({
      date,
      needKwh: next.day.kwh,
      basis: next.basis === 'runs' && tonight.basis === 'runs' ? 'runs' : 'typical-weekday',
      cheapest: fillCheapest(slots, gridKwh),
      even: fillEvenly(slots, gridKwh),
    });
  }
  return nights;
}

/** Cheapest intervals first, each up to the room under the service limit. */
function fillCheapest(slots: { t: number; price: number; roomKw: number }[], gridKwh: number): Map<number, number> {
  const kw = new Map<number, number>();
  let left = gridKwh;
  for (const s of slots.slice().sort((a, b) => a.price - b.price || a.t - b.t)) {
    if (left <= 1e-9) break;
    const take = Math.min(s.roomKw, left * 4);
    kw.set(s.t, take);
    left -= take / 4;
  }
  return kw;
}

/** The same power all night, capped by the room under the limit (the rest in the cheapest intervals left). */
function fillEvenly(slots: { t: number; price: number; roomKw: number }[], gridKwh: number): Map<number, number> {
  const flat = (gridKwh * 4) / slots.length;
  const kw = new Map<number, number>();
  let left = gridKwh;
  for (const s of slots) {
    const take = Math.min(flat, s.roomKw);
    kw.set(s.t, take);
    left -= take / 4;
  }
  if (left > 1e-9) {
    const rest = fillCheapest(
      slots.map((s) => ({ ...s, roomKw: s.roomKw - kw.get(s.t)! })),
      left,
    );
    for (const [t, extra] of rest) kw.set(t, kw.get(t)! + extra);
  }
  return kw;
}
