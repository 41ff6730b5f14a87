import { nightOfDepot } from '../night/depot-night';
import { createHash } from 'node:crypto';
import { and, asc, eq, gte, lt } from 'drizzle-orm';
import { DateTime } from 'luxon';
import type { PeriodTargetView } from '@nightyard/contracts';
import {
  parseScenario,
  shiftScenario,
  type PeriodNight,
  type PeriodTarget,
  type Scenario,
  type ScenarioInput,
} from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { runs } from '../db/schema';
import { DomainError } from '../http/errors';
import type { AuthUser } from '../auth/auth-user';
import { depotOf } from '../depots/depot-access';
import { buildNightScenario } from '../plans/night-scenario';
import { buildScenarioBase } from '../scenarios/scenario-base';
import { runInPool } from '../workers/pool';
import { billingPeriodOf, ratePlanOn } from './billing-period';
import { periodPeaksBefore, type PeriodPeaks } from './period-peaks';

// The billing period's demand target, computed on demand from the data as it is: the nights left
// in the period are built as the engine's scenarios (a night with runs from its runs, a weekday
// without from the latest entered night of that weekday, moved to its date), their peaks so far
// raised to what the meter measured this period, and the period LP solved in the engine's thread.
// The same nights give the same target: solved once, then remembered by their content, so a
// change to any input (runs, a report, meter data, limits, the rate plan) gives a fresh target.

type Caller = AuthUser;

/**
 * The planning job reads the period's nights for the organisation, not for a person: it may read
 * every depot of it (as an administrator would), and nothing of another organisation.
 */
export function planningJobCaller(organisationId: string): AuthUser {
  const caller = {
    id: '',
    organisationId,
    email: '',
    name: 'Planning job',
    roles: ['admin'],
    depotIds: [] as string[],
  };
  return caller as AuthUser;
}

/** Peaks the period has already set, by name ('facility' and each period): the target's floor. */
export type PeaksFloor = PeriodPeaks;

export interface PeriodNights {
  nights: (PeriodNight & { date: string })[];
  /** The ratchet's floor where it is above every other peak so far of the facility (it sets the floor then). */
  ratchet: PeriodTargetView['ratchet'];
  periodStart: string;
  periodEnd: string;
}

const label = (date: string, zone: string) => DateTime.fromISO(date, { zone }).toFormat('cccc LLL d');

/** A night's scenario from its runs, or null where the runs do not make one (no next service day...). */
async function nightFromRuns(db: Db, caller: Caller, depotId: string, date: string): Promise<ScenarioInput | null> {
  try {
    return (await buildNightScenario(db, caller, depotId, date, true, { periodPeaks: false })).scenario;
  } catch (err) {
    if (err instanceof DomainError) return null;
    throw err;
  }
}

/**
 * The nights of the billing period holding `fromDate`, from that night to the period's end. `own`
 * replaces that night's scenario (a revision's, with the yard's reports applied).
 */
export async function periodNightsOf(
  db: Db,
  caller: Caller,
  depotId: string,
  fromDate: string,
  own?: { date: string; scenario: ScenarioInput | Scenario },
  floor?: PeaksFloor,
): Promise<PeriodNights> {
  const depot = await depotOf(db, caller, depotId);
  const zone = depot.timezone;
  const period = billingPeriodOf(fromDate, depot.billingStartDay, zone);
  const periodStart = period.start.toISODate()!;
  const periodEnd = period.end.toISODate()!;
  const entered = (
    await db
      .selectDistinct({ date: runs.serviceDate })
      .from(runs)
      .where(
        and(
          eq(runs.depotId, depotId),
          gte(runs.serviceDate, period.start.minus({ days: 28 }).toISODate()!),
          lt(runs.serviceDate, period.end.plus({ days: 7 }).toISODate()!),
        ),
      )
      .orderBy(asc(runs.serviceDate))
  ).map((r) => r.date);
  const enteredSet = new Set(entered);
  const lastEntered = entered.at(-1) ?? '';
  const built = new Map<string, ScenarioInput | null>();
  const fromRuns = async (date: string) => {
    if (!built.has(date)) built.set(date, await nightFromRuns(db, caller, depotId, date));
    return built.get(date)!;
  };

  // Peaks the meter measured so far this period, the published nights before this one and a
  // demand ratchet's floor raise every night's peaks so far, counted once for the period (the night
  // scenarios are built without them: periodPeaks: false below).
  const rate = await ratePlanOn(db, depot, periodStart);
  const before = await periodPeaksBefore(db, depot, zone, rate.definition, period, fromDate);
  const set: PeaksFloor = { facility: floor?.facility ?? 0, periods: { ...(floor?.periods ?? {}) } };
  const peaksKw = Math.max(set.facility, before.facility);
  set.facility = Math.max(peaksKw, before.ratchet?.kw ?? 0);
  const ratchet =
    before.ratchet && before.ratchet.kw > peaksKw
      ? {
          kw: before.ratchet.kw,
          percent: before.ratchet.percent,
          baseKw: before.ratchet.base.kw,
          source: before.ratchet.base.source,
        }
      : null;
  for (const [name, kw] of Object.entries(before.periods)) set.periods[name] = Math.max(set.periods[name] ?? 0, kw);

  const nights: PeriodNights['nights'] = [];
  for (let d = DateTime.fromISO(fromDate, { zone }); d < period.end; d = d.plus({ days: 1 })) {
    const date = d.toISODate()!;
    let input: ScenarioInput | Scenario | null = null;
    let basis: PeriodNight['basis'] = 'runs';
    if (own && own.date === date) input = own.scenario;
    else if (enteredSet.has(date)) input = await fromRuns(date);
    // A weekday past the last one entered, or the last entered day whose next service day is not
    // entered yet (a Friday's night runs to Monday): the latest night of its weekday that can be
    // built from its runs, moved here, on this night's own site, limits and tariff.
    if (!input && date >= lastEntered && d.weekday <= 5) {
      let like: { date: string; night: ScenarioInput } | null = null;
      for (const e of entered
        .filter((x) => x < date && DateTime.fromISO(x, { zone }).weekday === d.weekday)
        .reverse()) {
        const night = await fromRuns(e);
        if (night) {
          like = { date: e, night };
          break;
        }
      }
      if (like) {
        const days = Math.round(d.diff(DateTime.fromISO(like.date, { zone }), 'days').days);
        const moved = shiftScenario(like.night, days);
        try {
          const base = await buildScenarioBase(db, caller, depotId, moved.start, moved.end, { periodPeaks: false });
          input = { ...base.scenario, buses: moved.buses } as ScenarioInput;
          basis = 'typical-weekday';
        } catch (err) {
          if (!(err instanceof DomainError)) throw err;
        }
      }
    }
    if (!input) continue;
    const parsed = parseScenario(input);
    if (!parsed.ok) continue;
    const scenario = parsed.scenario;
    const peaks = { ...scenario.tariff.peaksSoFarKw };
    peaks['facility'] = Math.max(peaks['facility'] ?? 0, set.facility);
    for (const p of scenario.tariff.periods) {
      const kw = set.periods[p.name];
      if (kw !== undefined) peaks[p.name] = Math.max(peaks[p.name] ?? 0, kw);
    }
    scenario.tariff.peaksSoFarKw = peaks;
    nights.push({ date, label: label(date, zone), scenario, basis });
  }
  return { nights, periodStart, periodEnd, ratchet };
}

const solved = new Map<string, Promise<PeriodTarget>>();
const MAX_SOLVED = 100;

/** Solves the period LP in the engine's thread, once per distinct set of nights. */
export function solveNights(nights: PeriodNight[], marginal = true): Promise<PeriodTarget> {
  const key = `${marginal}|${createHash('sha256').update(JSON.stringify(nights)).digest('hex')}`;
  const known = solved.get(key);
  if (known) {
    solved.delete(key);
    solved.set(key, known);
    return known;
  }
  const pending = runInPool({ kind: 'period-target', nights, marginal });
  solved.set(key, pending);
  pending.catch(() => solved.delete(key));
  while (solved.size > MAX_SOLVED) solved.delete(solved.keys().next().value!);
  return pending;
}

export function targetView(
  target: PeriodTarget,
  nights: PeriodNights['nights'],
  ratchet: PeriodTargetView['ratchet'] = null,
): PeriodTargetView {
  return {
    currency: target.currency,
    nights: nights.map((n) => ({ date: n.date, basis: n.basis })),
    facilityKw: target.targets.find((t) => t.name === 'facility')?.kw ?? null,
    targets: target.targets,
    cost: target.cost,
    binding: target.binding,
    marginal: target.marginal,
    impossible: target.impossible,
    solveMs: target.stats.ms,
    ratchet,
  };
}

/**
 * The demand target of the billing period holding `now`'s service night, over the nights left in
 * it (the night under way included: before noon, that is last evening's). Null when no night is
 * left or the tariff has no demand charge.
 */
export async function periodTargetOf(
  db: Db,
  caller: Caller,
  depotId: string,
  now: Date,
): Promise<{ target: PeriodTarget; view: PeriodTargetView } | null> {
  const depot = await depotOf(db, caller, depotId);
  // "Which night" from the one night model: the night under way, else the next one.
  const night = (await nightOfDepot(db, depot, now)).tonight.serviceDate;
  return periodTargetFrom(db, caller, depotId, night);
}

/** The demand target over the nights from `fromDate` to the end of its billing period. */
export async function periodTargetFrom(
  db: Db,
  caller: Caller,
  depotId: string,
  fromDate: string,
  own?: { date: string; scenario: ScenarioInput | Scenario },
  options: { marginal?: boolean; floor?: PeaksFloor } = {},
): Promise<{ target: PeriodTarget; view: PeriodTargetView; dates: string[] } | null> {
  const { nights, ratchet } = await periodNightsOf(db, caller, depotId, fromDate, own, options.floor);
  if (!nights.length) return null;
  const target = await solveNights(
    nights.map(({ label: l, scenario, basis }) => ({ label: l, scenario, basis })),
    options.marginal ?? true,
  );
  if (!target.targets.length) return null;
  // The service date of each night, in the order of the target's per-night parts (`charging`).
  return { target, view: targetView(target, nights, ratchet), dates: nights.map((n) => n.date) };
}
