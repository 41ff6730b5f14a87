import { and, asc, eq, inArray } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { coldWeatherFactor, type RunInput, type ServiceDay, type ServiceDayInput } from '@nightyard/contracts';
import type { Db } from '../db/client';
import { buses, runs, serviceDays } from '../db/schema';
import { lockTarget } from '../db/locks';
import { DomainError } from '../http/errors';
import type { AuthUser } from '../auth/auth-user';
import { depotOf } from '../depots/depot-access';
import { forgetServiceDays } from '../night/depot-night';

const LOCAL = "yyyy-MM-dd'T'HH:mm";
type DepotRow = Awaited<ReturnType<typeof depotOf>>;
type BusRow = typeof buses.$inferSelect;

/** kWh a run uses: its measured energy, or miles x consumption x the day's cold-weather factor. */
export function runEnergyKwh(
  run: { kwh: number | null; miles: number | null },
  bus: { kwhPerMile: number },
  factor: number,
): number {
  if (run.kwh !== null) return run.kwh;
  return Math.round((run.miles ?? 0) * bus.kwhPerMile * factor * 100) / 100;
}

/**
 * A bus's state of charge (%) as it pulled out in the morning, when no reading says otherwise: its
 * reserve and the energy of the day's runs, which is what a plan leaves it with at the least (it
 * plans each bus to leave with its next day's runs and its reserve), capped at its ceiling. Taking
 * the ceiling instead would plan too little for a bus that left with only what its runs needed: the
 * estimate errs towards needing more energy, not less.
 */
export function morningSocPct(bus: { ceilingPct: number; reservePct: number; usableKwh: number }, dayKwh: number) {
  return Math.min(bus.ceilingPct, bus.reservePct + (dayKwh / bus.usableKwh) * 100);
}

/**
 * Each run's estimated state of charge on arrival, by run id, for one bus's runs of a day in
 * pull-out order: from the morning's estimate (`morningSocPct`), each run takes its energy and no
 * charge is counted between runs; a reading, where a run has one, is where the next run starts.
 * `pct` is what the Fleet page shows (to 0.1 %); `exactPct` is unrounded, for a night's scenario:
 * rounded, a bus estimated to arrive at midday with just its reserve and the afternoon's run could
 * come out a few hundredths of a kWh short of the very need the estimate was made from.
 */
export function arrivalEstimates(
  runsOfBus: readonly { id: string; kwh: number | null; miles: number | null; arrivalSocPct: number | null }[],
  bus: { ceilingPct: number; reservePct: number; usableKwh: number; kwhPerMile: number },
  factor: number,
): Map<string, { pct: number; exactPct: number }> {
  const energy = runsOfBus.map((run) => runEnergyKwh(run, bus, factor));
  let soc = morningSocPct(
    bus,
    energy.reduce((a, e) => a + e, 0),
  );
  const out = new Map<string, { pct: number; exactPct: number }>();
  runsOfBus.forEach((run, i) => {
    const exactPct = Math.max(0, soc - (energy[i]! / bus.usableKwh) * 100);
    out.set(run.id, { pct: Math.round(exactPct * 10) / 10, exactPct });
    soc = run.arrivalSocPct ?? exactPct;
  });
  return out;
}

export async function getServiceDay(db: Db, caller: AuthUser, depotId: string, date: string): Promise<ServiceDay> {
  const depot = await depotOf(db, caller, depotId);
  const [day] = await db
    .select()
    .from(serviceDays)
    .where(and(eq(serviceDays.depotId, depotId), eq(serviceDays.serviceDate, date)));
  const forecastLowF = day?.forecastLowF ?? null;
  const factor = coldWeatherFactor(depot.coldWeatherFactors, forecastLowF);
  const rows = await db
    .select({ run: runs, bus: buses })
    .from(runs)
    .innerJoin(buses, eq(buses.id, runs.busId))
    .where(and(eq(runs.depotId, depotId), eq(runs.serviceDate, date)))
    .orderBy(asc(buses.number), asc(runs.pullOut));
  const local = (d: Date) => DateTime.fromJSDate(d, { zone: depot.timezone }).toFormat(LOCAL);
  // Without a reading, a bus is assumed to leave in the morning as a plan leaves it and to get no
  // charge between runs (`arrivalEstimates`): the estimate errs towards needing more energy, not less.
  const byBus = new Map<string, typeof rows>();
  for (const r of rows) byBus.set(r.bus.id, [...(byBus.get(r.bus.id) ?? []), r]);
  const estimates = new Map<string, number>();
  for (const ofBus of byBus.values())
    for (const [id, { pct }] of arrivalEstimates(
      ofBus.map((r) => r.run),
      ofBus[0]!.bus,
      factor,
    ))
      estimates.set(id, pct);
  const out = rows.map(({ run, bus }) => {
    const energyKwh = runEnergyKwh(run, bus, factor);
    return {
      id: run.id,
      busId: bus.id,
      busNumber: bus.number,
      pullOut: local(run.pullOut),
      pullIn: local(run.pullIn),
      miles: run.miles,
      kwh: run.kwh,
      energyKwh,
      arrivalSocPct: run.arrivalSocPct,
      arrivalSocSource: run.arrivalSocSource,
      estimatedArrivalSocPct: estimates.get(run.id)!,
    };
  });
  return { date, forecastLowF, coldWeatherFactor: factor, runs: out };
}

export interface RowProblem {
  /** Index into the runs given (for CSV: the file's line number is added by the caller). */
  index: number;
  field: string;
  message: string;
}

/** Checks that need the database and the runs together: unknown buses, overlaps, impossible times. */
function checkRuns(
  depot: DepotRow,
  date: string,
  input: RunInput[],
  fleet: Map<string, BusRow>,
  rowName: (index: number) => string = (i) => `row ${i + 1}`,
): RowProblem[] {
  const problems: RowProblem[] = [];
  const at = (t: string) => DateTime.fromISO(t, { zone: depot.timezone });
  const byBus = new Map<string, { i: number; from: number; to: number }[]>();
  input.forEach((r, i) => {
    if (!fleet.has(r.busNumber)) {
      problems.push({ index: i, field: 'bus', message: `Bus ${r.busNumber} is not in this depot's fleet` });
      return;
    }
    const out = at(r.pullOut);
    const back = at(r.pullIn);
    if (out.toFormat(LOCAL) !== r.pullOut)
      problems.push({ index: i, field: 'pullOut', message: `${r.pullOut} does not exist at the depot (clock change)` });
    if (out.toISODate() !== date)
      problems.push({ index: i, field: 'pullOut', message: `The pull-out must be on ${date}` });
    if (back.diff(out, 'hours').hours > 24)
      problems.push({ index: i, field: 'pullIn', message: 'A run lasts at most 24 hours' });
    const list = byBus.get(r.busNumber) ?? [];
    list.push({ i, from: out.toMillis(), to: back.toMillis() });
    byBus.set(r.busNumber, list);
  });
  for (const [bus, list] of byBus) {
    list.sort((a, b) => a.from - b.from);
    for (let k = 1; k < list.length; k++) {
      if (list[k]!.from < list[k - 1]!.to) {
        problems.push({
          index: list[k]!.i,
          field: 'pullOut',
          message: `Bus ${bus} is still on another run then (${rowName(list[k - 1]!.i)})`,
        });
      }
    }
  }
  return problems.sort((a, b) => a.index - b.index);
}

/** Rows per INSERT: PostgreSQL takes at most 65,535 parameters in one statement. */
const INSERT_CHUNK = 1000;

/** Replaces a service day's runs as a whole: every row is saved, or none. */
export async function replaceServiceDay(
  db: Db,
  caller: AuthUser,
  depotId: string,
  date: string,
  input: ServiceDayInput,
  source: 'typed' | 'uploaded',
  label: (index: number, field: string) => string = (i, f) => `runs[${i}].${f === 'bus' ? 'busNumber' : f}`,
  /** Checked under the lock, against the runs stored then (copying refuses to overwrite unasked). */
  precondition?: (existingRuns: number) => void,
  /**
   * An uploaded file's own problems (`earlier`, already named), reported together with these
   * checks so one upload lists everything; `rowName` names another row in a message ("line 7").
   */
  file?: { earlier: Record<string, string>; rowName: (index: number) => string },
): Promise<ServiceDay> {
  const depot = await depotOf(db, caller, depotId);
  const at = (t: string) => DateTime.fromISO(t, { zone: depot.timezone }).toJSDate();
  await db.transaction(async (tx) => {
    // One writer per depot and day: concurrent uploads would otherwise each delete nothing and
    // all insert. Everything read from the database is read again under the lock.
    await lockTarget(tx, 'service-day', depotId, date);
    const fleetRows = await tx.select().from(buses).where(eq(buses.depotId, depotId));
    const fleet = new Map(fleetRows.map((b) => [b.number, b]));
    const problems = checkRuns(depot, date, input.runs, fleet, file?.rowName);
    const earlier = file?.earlier ?? {};
    if (problems.length || Object.keys(earlier).length) {
      const fields: Record<string, string> = { ...earlier };
      for (const p of problems) fields[label(p.index, p.field)] ??= p.message;
      if (file) {
        const bad = new Set(Object.keys(fields).map((f) => f.split('.')[0]));
        throw new DomainError(
          'validation_failed',
          `${bad.size} ${bad.size === 1 ? 'line needs' : 'lines need'} fixing; nothing was saved`,
          fields,
        );
      }
      throw new DomainError(
        'validation_failed',
        `${problems.length} ${problems.length === 1 ? 'row needs' : 'rows need'} fixing; nothing was saved`,
        fields,
      );
    }
    // A reading that comes back unchanged keeps where it came from (typed or uploaded).
    const before = await tx
      .select()
      .from(runs)
      .where(and(eq(runs.depotId, depotId), eq(runs.serviceDate, date)));
    precondition?.(before.length);
    const sourceOf = (r: RunInput) => {
      if (r.arrivalSocPct === null) return null;
      const same = before.find(
        (b) => b.busId === fleet.get(r.busNumber)!.id && b.pullOut.getTime() === at(r.pullOut).getTime(),
      );
      return same && same.arrivalSocPct === r.arrivalSocPct && same.arrivalSocSource ? same.arrivalSocSource : source;
    };
    await tx.delete(runs).where(and(eq(runs.depotId, depotId), eq(runs.serviceDate, date)));
    await tx
      .insert(serviceDays)
      .values({ organisationId: caller.organisationId, depotId, serviceDate: date, forecastLowF: input.forecastLowF })
      .onConflictDoUpdate({
        target: [serviceDays.depotId, serviceDays.serviceDate],
        set: { forecastLowF: input.forecastLowF },
      });
    for (let k = 0; k < input.runs.length; k += INSERT_CHUNK) {
      await tx.insert(runs).values(
        input.runs.slice(k, k + INSERT_CHUNK).map((r) => ({
          organisationId: caller.organisationId,
          depotId,
          busId: fleet.get(r.busNumber)!.id,
          serviceDate: date,
          pullOut: at(r.pullOut),
          pullIn: at(r.pullIn),
          miles: r.miles,
          kwh: r.kwh,
          arrivalSocPct: r.arrivalSocPct,
          arrivalSocSource: sourceOf(r),
        })),
      );
    }
  });
  // Which night it is may have changed with the runs.
  forgetServiceDays(depotId);
  return getServiceDay(db, caller, depotId, date);
}

/** Copies another day's runs to `date` at the same wall-clock times (readings are not copied). */
export async function copyServiceDay(
  db: Db,
  caller: AuthUser,
  depotId: string,
  date: string,
  fromDate: string,
  replace: boolean,
): Promise<ServiceDay> {
  const existing = await getServiceDay(db, caller, depotId, date);
  const refuseOverwrite = (runsThere: number) => {
    if (runsThere && !replace)
      throw new DomainError('conflict', `${date} already has ${runsThere} runs: choose to replace them`);
  };
  refuseOverwrite(existing.runs.length);
  const source = await getServiceDay(db, caller, depotId, fromDate);
  if (!source.runs.length)
    throw new DomainError('validation_failed', `${fromDate} has no runs to copy`, { fromDate: 'No runs on that day' });
  const shift = (t: string) => {
    const days = DateTime.fromISO(date).diff(DateTime.fromISO(fromDate), 'days').days;
    return DateTime.fromISO(t).plus({ days }).toFormat(LOCAL);
  };
  return replaceServiceDay(
    db,
    caller,
    depotId,
    date,
    {
      forecastLowF: existing.forecastLowF,
      runs: source.runs.map((r) => ({
        busNumber: r.busNumber,
        pullOut: shift(r.pullOut),
        pullIn: shift(r.pullIn),
        miles: r.miles,
        kwh: r.kwh,
        arrivalSocPct: null,
      })),
    },
    'typed',
    undefined,
    refuseOverwrite,
  );
}

export async function busesByIds(db: Db, ids: string[]) {
  return ids.length ? db.select().from(buses).where(inArray(buses.id, ids)) : [];
}
