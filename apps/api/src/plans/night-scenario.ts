import { and, asc, eq, gt } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { coldWeatherFactor } from '@nightyard/contracts';
import type { ScenarioInput } from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { buses, runs, serviceDays } from '../db/schema';
import { DomainError } from '../http/errors';
import type { AuthUser } from '../auth/auth-user';
import { depotOf } from '../depots/depot-access';
import { arrivalEstimates, runEnergyKwh } from '../fleet/service-day-service';
import { buildScenarioBase } from '../scenarios/scenario-base';
import { datePlace } from '../night/depot-night';

const LOCAL = "yyyy-MM-dd'T'HH:mm";
type Bus = ScenarioInput['buses'][number];
type Stay = Bus['stays'][number];

const round = (v: number) => Math.round(v * 100) / 100;
const quarter = (t: DateTime, up: boolean) => {
  const m = t.minute % 15;
  const down = t.set({ minute: t.minute - m, second: 0, millisecond: 0 });
  return up && (m > 0 || t.second > 0) ? down.plus({ minutes: 15 }) : down;
};

/**
 * The engine's scenario for the night after `serviceDate`: from the day's first pull-in (or its
 * last, without the midday layover) to the next service day's last first pull-out. Each bus stays
 * between its runs; it must leave with the energy of what it drives before its next charge plus
 * its reserve, capped at its ceiling.
 */
export async function buildNightScenario(
  db: Db,
  caller: AuthUser,
  depotId: string,
  serviceDate: string,
  includeMidday: boolean,
  options: { periodPeaks?: boolean } = {},
) {
  const depot = await depotOf(db, caller, depotId);
  const zone = depot.timezone;
  const [next] = await db
    .select({ date: runs.serviceDate })
    .from(runs)
    .where(and(eq(runs.depotId, depotId), gt(runs.serviceDate, serviceDate)))
    .orderBy(asc(runs.serviceDate))
    .limit(1);
  if (!next)
    throw new DomainError(
      'validation_failed',
      `No runs after ${serviceDate}: enter the next service day's runs under Fleet first`,
      { serviceDate: 'No next service day' },
    );
  const dayRows = await db
    .select({ run: runs, bus: buses })
    .from(runs)
    .innerJoin(buses, eq(buses.id, runs.busId))
    .where(and(eq(runs.depotId, depotId), eq(runs.serviceDate, serviceDate)))
    .orderBy(asc(runs.pullOut));
  const nextRows = await db
    .select({ run: runs, bus: buses })
    .from(runs)
    .innerJoin(buses, eq(buses.id, runs.busId))
    .where(and(eq(runs.depotId, depotId), eq(runs.serviceDate, next.date)))
    .orderBy(asc(runs.pullOut));
  if (!dayRows.length) await refuseInsideANight(db, depotId, serviceDate, next.date, zone);
  const lows = await db.select().from(serviceDays).where(eq(serviceDays.depotId, depotId));
  const factorOn = (date: string) =>
    coldWeatherFactor(depot.coldWeatherFactors, lows.find((d) => d.serviceDate === date)?.forecastLowF ?? null);
  const todayFactor = factorOn(serviceDate);
  const nextFactor = factorOn(next.date);

  const notes: string[] = [];
  const at = (d: Date) => DateTime.fromJSDate(d, { zone });
  const firstOut = new Map<string, (typeof nextRows)[number]>();
  for (const r of nextRows) if (!firstOut.has(r.bus.id)) firstOut.set(r.bus.id, r);
  if (!firstOut.size) throw new DomainError('validation_failed', `No runs on ${next.date}`);

  const dayStart = DateTime.fromISO(serviceDate, { zone }).startOf('day');
  const pullIns = dayRows.map((r) => at(r.run.pullIn));
  const lastPullIns = [...new Map(dayRows.map((r) => [r.bus.id, at(r.run.pullIn)])).values()];
  const earliest = (l: DateTime[]) => l.reduce((a, b) => (b < a ? b : a));
  const latest = (l: DateTime[]) => l.reduce((a, b) => (b > a ? b : a));
  const from = includeMidday ? pullIns : lastPullIns;
  const start = quarter(from.length ? earliest(from) : dayStart.set({ hour: 12 }), false);
  const end = quarter(latest([...firstOut.values()].map((r) => at(r.run.pullOut))), true);

  const base = await buildScenarioBase(db, caller, depotId, start.toFormat(LOCAL), end.toFormat(LOCAL), options);
  notes.push(...base.notes);

  const scenarioBuses: Bus[] = [];
  for (const [busId, n1] of firstOut) {
    const bus = n1.bus;
    if (bus.status !== 'active') {
      notes.push(`Bus ${bus.number} is ${bus.status.replace(/_/g, ' ')} and is left out.`);
      continue;
    }
    const today = dayRows.filter((r) => r.bus.id === busId);
    const usable = bus.usableKwh;
    const reserve = round((bus.reservePct / 100) * usable);
    const ceiling = round((bus.ceilingPct / 100) * usable);
    const stays: Stay[] = [];
    // Stays between the day's runs (midday layovers), then the night until the next pull-out.
    const legs = today.map((r, k) => ({
      arrive: at(r.run.pullIn),
      depart: today[k + 1] ? at(today[k + 1]!.run.pullOut) : at(n1.run.pullOut),
      nextRun: today[k + 1] ?? n1,
      nextFactor: today[k + 1] ? todayFactor : nextFactor,
      arrivedFrom: r,
    }));
    // A reading at the day's last pull-in means the afternoon has happened: plan from there.
    const lastRead = today.at(-1)?.run.arrivalSocPct !== null && today.at(-1) !== undefined;
    const usedLegs = legs.filter((l) => l.depart > start && (includeMidday && !lastRead ? true : l.nextRun === n1));
    if (includeMidday && lastRead && legs.length > 1) {
      notes.push(
        `Bus ${bus.number} has a reading at its last pull-in: it is planned from there, without the midday layover.`,
      );
    }
    // Overnight the bus takes on the whole next day's runs: a midday top-up is welcome but not
    // counted on. Between runs it needs the next run only.
    const nextDay = nextRows
      .filter((r) => r.bus.id === busId)
      .reduce((sum, r) => sum + runEnergyKwh(r.run, bus, nextFactor), 0);
    const legNeed = (overnight: boolean, run: (typeof dayRows)[number]['run']) =>
      overnight ? round(nextDay) : runEnergyKwh(run, bus, todayFactor);
    let arrivalKwh: number;
    if (!usedLegs.length) {
      // Off duty today: it waits at the depot from the start of the horizon.
      arrivalKwh = ceiling;
      notes.push(
        `Bus ${bus.number} has no runs on ${serviceDate}; it is assumed at its ceiling (${bus.ceilingPct} %).`,
      );
      const need = legNeed(true, n1.run);
      stays.push({
        arrive: start.toFormat(LOCAL),
        depart: at(n1.run.pullOut).toFormat(LOCAL),
        departMinKwh: round(Math.min(usable, need + reserve)),
      });
    } else {
      const first = usedLegs[0]!.arrivedFrom.run;
      if (first.arrivalSocPct !== null) {
        arrivalKwh = round((first.arrivalSocPct / 100) * usable);
      } else {
        // The service day's estimate: its note gives the Fleet page's figure; the plan takes it
        // unrounded, up to the next hundredth of a kWh, so that a bus whose estimate says it has
        // exactly what its next run needs is not planned a rounding short of it.
        const estimate = arrivalEstimates(
          today.map((r) => r.run),
          bus,
          todayFactor,
        ).get(first.id)!;
        notes.push(
          `Bus ${bus.number}: no state of charge was entered for its ${at(first.pullIn).toFormat('HH:mm')} pull-in; ${estimate.pct} % is estimated from miles.`,
        );
        arrivalKwh = Math.ceil((estimate.exactPct / 100) * usable * 100 - 1e-6) / 100;
      }
      usedLegs.forEach((l, k) => {
        const need = legNeed(l.nextRun === n1, l.nextRun.run);
        const arrive = l.arrive > start ? l.arrive : start;
        stays.push({
          arrive: arrive.toFormat(LOCAL),
          depart: l.depart.toFormat(LOCAL),
          departMinKwh: round(Math.min(ceiling, need + reserve)),
          ...(k < usedLegs.length - 1 ? { runKwh: runEnergyKwh(l.nextRun.run, bus, l.nextFactor) } : {}),
        });
        if (need + reserve > ceiling) {
          notes.push(
            `Bus ${bus.number} needs ${round(need + reserve)} kWh with reserve for what follows its ${l.depart.toFormat('HH:mm')} pull-out, above its ceiling (${ceiling} kWh): it leaves at the ceiling and relies on the midday layover.`,
          );
        }
      });
    }
    scenarioBuses.push({
      id: bus.number,
      usableKwh: usable,
      maxKw: bus.maxChargeKw,
      arrivalKwh: Math.min(arrivalKwh, usable),
      ceilingKwh: ceiling,
      reserveKwh: reserve,
      ...(bus.taperStartPct !== null ? { taperFromKwh: round((bus.taperStartPct / 100) * usable) } : {}),
      stays,
    });
  }
  if (!scenarioBuses.length) throw new DomainError('validation_failed', 'No active bus has a run to plan for');
  const scenario: ScenarioInput = { ...base.scenario, buses: scenarioBuses } as ScenarioInput;
  return { scenario, notes, nextServiceDate: next.date };
}

const longDay = (date: string, zone: string) => DateTime.fromISO(date, { zone }).toFormat('cccc, LLLL d');

/**
 * A draft made for a date that has since become part of another's night (the runs of the day
 * before it were entered after it) is not published: it would plan those hours a second time,
 * with no bus pulling in. A bad request (400), not a conflict: the draft's night itself is no
 * longer one, whoever publishes it.
 */
export async function refusePublishingInsideANight(
  db: Db,
  depotId: string,
  date: string,
  version: number,
  zone: string,
) {
  const { within } = await datePlace(db, depotId, date);
  if (!within) return;
  const day = (d: string) => longDay(d, zone);
  throw new DomainError(
    'validation_failed',
    `Version ${version} plans ${day(date)} as a night of its own, but it now falls inside the night of ${day(within)} (no runs on it): plan the night of ${day(within)} instead`,
    { serviceDate: `Inside the night of ${day(within)}` },
  );
}

/**
 * A date without runs after a service day is part of that day's night (a weekend or a holiday
 * belongs to the night before it): planning it as a night of its own would plan the same hours
 * twice, with no bus pulling in. Refused with the night to plan instead. A date with no service
 * day before it (the first after a depot's runs begin) is planned from noon, as a calendar night.
 */
async function refuseInsideANight(db: Db, depotId: string, date: string, nextDate: string, zone: string) {
  const { within } = await datePlace(db, depotId, date);
  if (!within) return;
  const day = (d: string) => longDay(d, zone);
  throw new DomainError(
    'validation_failed',
    `No runs on ${day(date)}: it falls inside the night of ${day(within)}, which runs to the first pull-outs of ${day(nextDate)}. Plan that night, or enter ${DateTime.fromISO(date, { zone }).toFormat('cccc')}'s runs under Fleet first`,
    { serviceDate: `Inside the night of ${day(within)}` },
  );
}
