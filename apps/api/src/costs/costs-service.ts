import { and, asc, eq, gte, lt } from 'drizzle-orm';
import { DateTime } from 'luxon';
import {
  monthCostsSchema,
  planResultSchema,
  type MonthCosts,
  type PeriodTargetView,
  type PlanCosts,
  type PlanResult,
  type RatePlanDefinition,
} from '@nightyard/contracts';
import {
  computeBill,
  quarterHours,
  ratePlanPeriodAtMs,
  type Bill,
  type IntervalDemand,
  type NightCharging,
} from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { billingPeaks, buses, meterIntervals, plans, runs } from '../db/schema';
import { DomainError, notFound } from '../http/errors';
import { periodTargetFrom } from './period-target';
import { nightOfDepot } from '../night/depot-night';
import { chargingBySlot } from '../plans/whole-night';
import { isDatabaseUnavailable } from '../db/unavailable';
import { markChecked, markCheckedText } from '../http/checked-answer';
import type { AuthUser } from '../auth/auth-user';
import { assertMayOpenDepot, depotOf } from '../depots/depot-access';
import { billingPeriodOf, ratePlanOn, type BillingPeriod } from './billing-period';
import { ratchetBaseOf } from './ratchet-base';
import { MonthCostsCache, monthInputs, type MonthInputs } from './month-cache';
import type { NotifiedCache } from '../db/notified-cache';
import { guessDepot, rememberDepot } from '../depots/depot-guess';
import {
  buildingKwAt,
  forecastNights,
  forecastShapes,
  forecastSlot,
  targetShapes,
  type ChargingKw,
  type ForecastNight,
  type ForecastSlot,
} from './month-forecast';

const SLOT_MS = 15 * 60_000;
/** As the bill engine: a later interval equal but for floating-point noise does not move a peak's date. */
const PEAK_EPSILON_KW = 1e-9;
const round2 = (v: number) => Math.round(v * 100) / 100;

/**
 * Tailpipe CO2 of diesel: about 10,180 g per gallon burned (US EPA; value from memory). A diesel
 * school bus does about 7 miles per gallon (assumption; common practice for full-size buses).
 */
export const DIESEL_CO2_KG_PER_GALLON = 10.18;
export const DIESEL_BUS_MPG = 7;
const EMISSIONS_SOURCE =
  "Diesel avoided = miles / 7 mpg (assumed for a full-size diesel school bus). CO2 = 10,180 g per gallon of diesel (US EPA figure). Tailpipe only: the electricity's own emissions are not subtracted.";

/** Miles each bus drives on the first service day after `serviceDate` (what the night charged for). */
async function nextDayMiles(db: Db, depotId: string, serviceDate: string, kwhPerMile: Map<string, number>) {
  const [next] = await db
    .select({ date: runs.serviceDate })
    .from(runs)
    .where(
      and(
        eq(runs.depotId, depotId),
        gte(runs.serviceDate, DateTime.fromISO(serviceDate).plus({ days: 1 }).toISODate()!),
      ),
    )
    .orderBy(asc(runs.serviceDate))
    .limit(1);
  const miles = new Map<string, number>();
  if (!next) return miles;
  const rows = await db
    .select({ number: buses.number, miles: runs.miles, kwh: runs.kwh })
    .from(runs)
    .innerJoin(buses, eq(buses.id, runs.busId))
    .where(and(eq(runs.depotId, depotId), eq(runs.serviceDate, next.date)));
  for (const r of rows) {
    const m = r.miles ?? (r.kwh !== null ? r.kwh / (kwhPerMile.get(r.number) ?? 1) : 0);
    miles.set(r.number, (miles.get(r.number) ?? 0) + m);
  }
  return miles;
}

/** A plan's cost per bus and per mile: energy by the bus's own sessions, demand shared by kWh. */
export async function planCosts(db: Db, caller: AuthUser, planId: string): Promise<PlanCosts> {
  const [plan] = await db
    .select()
    .from(plans)
    .where(and(eq(plans.id, planId), eq(plans.organisationId, caller.organisationId)));
  if (!plan) throw notFound('That plan');
  assertMayOpenDepot(caller, plan.depotId, 'That plan');
  if (!plan.result) throw notFound("The plan's result (it is not finished)");
  const result = planResultSchema.parse(plan.result);
  const scenario = plan.scenario;
  const fleet = await db.select().from(buses).where(eq(buses.depotId, plan.depotId));
  const miles = await nextDayMiles(
    db,
    plan.depotId,
    plan.serviceDate,
    new Map(fleet.map((b) => [b.number, b.kwhPerMile])),
  );
  const priceAt = new Map(result.slots.map((s) => [Date.parse(s.start), s.price]));
  const perBus = new Map<string, { kwh: number; energy: number }>();
  for (const s of result.sessions) {
    const t0 = Date.parse(s.start);
    const acc = perBus.get(s.bus) ?? { kwh: 0, energy: 0 };
    s.kw.forEach((kw, k) => {
      acc.kwh += kw * 0.25;
      acc.energy += kw * 0.25 * (priceAt.get(t0 + k * SLOT_MS) ?? 0);
    });
    perBus.set(s.bus, acc);
  }
  const totalKwh = [...perBus.values()].reduce((a, b) => a + b.kwh, 0);
  const totalMiles = [...miles.values()].reduce((a, b) => a + b, 0);
  const rows = result.buses.map((b) => {
    const use = perBus.get(b.id) ?? { kwh: 0, energy: 0 };
    const cost = use.energy + (totalKwh > 0 ? (result.cost.demand * use.kwh) / totalKwh : 0);
    const m = miles.get(b.id) ?? 0;
    return { bus: b.id, kwh: use.kwh, cost, miles: m, costPerMile: m > 0 ? cost / m : null, unrounded: cost };
  });
  // One set of numbers: the night's total is the sum of its buses' unrounded costs, and per mile divides that.
  const total = rows.reduce((a, r) => a + r.unrounded, 0);
  const base = result.baseline;
  const otherKind = base.kind === 'arrival' ? 'timer' : base.kind === 'timer' ? 'arrival' : null;
  const other = otherKind && result.baselines ? result.baselines[otherKind] : null;
  // A night's saving is its charging energy against the baseline's (a shortfall valued at the
  // plan's price, in the baseline's figure): demand is billed once a billing period, so the
  // period's saving is the month's (costs/month), never a night's marginal demand.
  const baselineEnergy = base.total - base.demand;
  const energySaving = baselineEnergy - result.cost.energy;
  return {
    planId,
    serviceDate: plan.serviceDate,
    currency: scenario.tariff.currency ?? 'USD',
    energy: result.cost.energy,
    demand: result.cost.demand,
    total,
    peakKw: result.slots.reduce((a, s) => Math.max(a, s.loadKw), 0),
    baseline: {
      kind: base.kind ?? null,
      energy: base.energy,
      demand: base.demand,
      total: base.total,
      peakKw: base.peakKw,
      shortfallKwh: base.shortfallKwh ?? 0,
    },
    otherBaseline:
      other && otherKind
        ? {
            kind: otherKind,
            total: other.total,
            energy: other.total - other.demand,
            peakKw: other.peakKw,
            shortfallKwh: other.shortfallKwh ?? 0,
          }
        : null,
    savings: energySaving,
    savingsShare: baselineEnergy > 0 ? energySaving / baselineEnergy : 0,
    chargingKwh: totalKwh,
    miles: totalMiles,
    costPerMile: totalMiles > 0 ? total / totalMiles : null,
    perBus: rows
      .map(({ unrounded: _, ...r }) => r)
      .sort((a, b) => a.bus.localeCompare(b.bus, undefined, { numeric: true })),
  };
}

type Depot = Awaited<ReturnType<typeof depotOf>>;
type Period = ReturnType<typeof billingPeriodOf>;
type SourcedInterval = IntervalDemand & { source: 'actual' | 'planned' | 'forecast' | 'building' };
type Peaks = MonthCosts['peaks'];
/** The month to date and its peaks: what has passed by a moment. */
interface SoFar {
  monthToDate: Bill;
  peaks: Peaks;
  /** How many of the series' intervals have begun. */
  begun: number;
}

/** The projected bill, its range and the savings: from the peaks so far and the demand target. */
interface Projection {
  projected: Bill;
  projectedRange: MonthCosts['projectedRange'];
  savings: MonthCosts['savings'];
}

/**
 * A published night inside a billing period, as its plan and as its baseline (the one its plan
 * reports savings against) would charge: the baseline's site load per interval is the plan's
 * minus the plan's charging plus the baseline's. Plans made before the baselines existed have
 * none (`kind` null) and count as charged the same.
 */
function comparedNight(result: PlanResult, fromMs: number, toMs: number) {
  const planCharging = chargingBySlot(result.sessions);
  const kind = result.baselines && result.baseline.kind ? result.baseline.kind : null;
  const charging = kind ? result.baselines![kind].chargingKw : null;
  // A plan made from a cut-off (a yard report, a night planned again while under way) has the
  // night's slots from its start; its baseline's charging is the whole night's too (the part
  // before the cut-off as it happened), or in plans stored before that, the re-plan's alone: the
  // last slots. Read by index from the night's start, such a baseline fell hours early.
  const offset = charging ? Math.max(0, result.slots.length - charging.length) : 0;
  const baselineKw = new Map<number, number>();
  let planEnergy = 0;
  let baselineEnergy = 0;
  let baselinePeak = 0;
  result.slots.forEach((s, i) => {
    const t = Date.parse(s.start);
    if (t < fromMs || t >= toMs) return;
    const planKw = planCharging.get(t) ?? 0;
    planEnergy += planKw * 0.25 * s.price;
    if (!charging) return;
    const baseKw = i < offset ? planKw : (charging[i - offset] ?? 0);
    const kw = s.loadKw - planKw + baseKw;
    baselineKw.set(t, kw);
    baselineEnergy += baseKw * 0.25 * s.price;
    baselinePeak = Math.max(baselinePeak, kw);
  });
  return { kind, baselineKw, planEnergy, baselineEnergy, baselinePeak };
}

/** The period's demand target as the month's projection reads it. */
interface MonthTarget {
  view: PeriodTargetView;
  /** The period LP's charging of each night it covered, by service date. */
  charging: Map<string, NightCharging>;
}

/** How the nights not yet begun at `fromMs` are forecast: under the demand target. */
interface UnderTarget {
  fromMs: number;
  /** The site-load cap by interval (the lowest target that applies there). */
  capKw: (t: number) => number;
  /** The target LP's charging of a night, where it covered it (see `targetShapes`). */
  charging: Map<string, NightCharging>;
  slotOf: (t: number) => ForecastSlot;
}

/**
 * The forecast nights' charging, both shapes, summed by interval. Under a target, a night not yet
 * begun is charged as the target's LP charged it, else held under the target's cap; a night under
 * way keeps its shape (its energy whole).
 */
function forecastCharging(
  nights: readonly ForecastNight[],
  under?: UnderTarget,
): { even: ChargingKw; cheapest: ChargingKw } {
  const even: ChargingKw = new Map();
  const cheapest: ChargingKw = new Map();
  for (const n of nights) {
    const toCome = under && (n.slots[0]?.t ?? -Infinity) >= under.fromMs ? under : undefined;
    const lp = toCome?.charging.get(n.date);
    const shapes = lp ? targetShapes(n, lp, toCome!.slotOf, toCome!.capKw) : forecastShapes(n, toCome?.capKw);
    for (const [t, v] of shapes.even) even.set(t, (even.get(t) ?? 0) + v);
    for (const [t, v] of shapes.cheapest) cheapest.set(t, (cheapest.get(t) ?? 0) + v);
  }
  return { even, cheapest };
}

/** What a billing period's costs are, whatever the time now: built from the rows the cache versions. */
interface PeriodBase {
  rate: { name: string; definition: RatePlanDefinition };
  /** The period's intervals, each forecast night's energy spread evenly over it (the projected bill's shape). */
  series: SourcedInterval[];
  actualIntervals: number;
  /** The nights nobody planned or metered, forecast from the runs. */
  forecastNights: ForecastNight[];
  /** The series with the forecast nights charging as given (a planned or metered interval stays as it is). */
  seriesWith: (charging: ChargingKw) => SourcedInterval[];
  /** kW a compared night's baseline would have drawn more (or less) than its plan, by interval. */
  baselineDeltaKw: Map<number, number>;
  nightsCompared: number;
  nights: MonthCosts['nights'];
  forecast: MonthCosts['forecast'];
  plannedDates: Set<string>;
  entered: typeof billingPeaks.$inferSelect | undefined;
  recordedPeaksKw: { facility: number; periods: Record<string, number> } | undefined;
  ratchetBase: { kw: number; source: string } | null;
  /** The bills and peaks that depend on how much of the period has passed (see `soFarOf`). */
  soFar: Map<string, SoFar>;
  /** The projection from each moment's peaks so far, under the demand target it was given. */
  projections: WeakMap<SoFar, { target: MonthTarget | null; value: Projection }>;
}

/** One per process; exported so tests can compare against a fresh computation. */
export const monthCostsCache = new MonthCostsCache<PeriodBase>();
const periodsComputing = new Map<string, Promise<PeriodBase>>();
export const newMonthCostsCache = () => new MonthCostsCache<PeriodBase>();

async function periodBase(db: Db, depot: Depot, period: Period): Promise<PeriodBase> {
  const zone = depot.timezone;
  const rate = await ratePlanOn(db, depot, period.start.toISODate()!);
  const fromMs = period.start.toMillis();
  const toMs = period.end.toMillis();

  const published = await db
    .select()
    .from(plans)
    .where(
      and(
        eq(plans.depotId, depot.id),
        eq(plans.state, 'published'),
        gte(plans.serviceDate, period.start.minus({ days: 4 }).toISODate()!),
        lt(plans.serviceDate, period.end.toISODate()!),
      ),
    )
    .orderBy(asc(plans.serviceDate));
  const actual = await db
    .select()
    .from(meterIntervals)
    .where(
      and(
        eq(meterIntervals.depotId, depot.id),
        gte(meterIntervals.startsAt, period.start.toJSDate()),
        lt(meterIntervals.startsAt, period.end.toJSDate()),
      ),
    );

  // The readings as the quarter hours the plans and the demand charge use (one rule: quarterHours).
  const actualKwh = new Map(
    quarterHours(actual.map((a) => ({ startMs: a.startsAt.getTime(), minutes: a.minutes, kwh: a.kwh }))).map((q) => [
      q.startMs,
      q.kwh,
    ]),
  );
  const plannedKw = new Map<number, number>();
  // What the site would have drawn more with the night charged as its baseline (nights compared only).
  const baselineDeltaKw = new Map<number, number>();
  let nightsCompared = 0;
  const nights: MonthCosts['nights'] = [];
  for (const p of published) {
    const result: PlanResult = planResultSchema.parse(p.result);
    const compared = comparedNight(result, fromMs, toMs);
    if (compared.kind) nightsCompared++;
    let projectedEnergy = 0;
    let projectedPeak = 0;
    let actualEnergy = 0;
    let projectedMetered = 0;
    let actualPeak = 0;
    let covered = 0;
    for (const s of result.slots) {
      const t = Date.parse(s.start);
      if (t < fromMs || t >= toMs) continue;
      plannedKw.set(t, s.loadKw);
      // The latest published night at an instant is the one billed there, and the one compared.
      const baseKw = compared.baselineKw.get(t);
      if (baseKw === undefined) baselineDeltaKw.delete(t);
      else baselineDeltaKw.set(t, baseKw - s.loadKw);
      projectedEnergy += s.loadKw * 0.25 * s.price;
      projectedPeak = Math.max(projectedPeak, s.loadKw);
      const a = actualKwh.get(t);
      if (a !== undefined) {
        covered++;
        actualEnergy += a * s.price;
        projectedMetered += s.loadKw * 0.25 * s.price;
        actualPeak = Math.max(actualPeak, a * 4);
      }
    }
    if (!result.slots.some((s) => Date.parse(s.start) >= fromMs && Date.parse(s.start) < toMs)) continue;
    const inPeriod = result.slots.filter((s) => Date.parse(s.start) >= fromMs && Date.parse(s.start) < toMs).length;
    nights.push({
      date: p.serviceDate,
      planId: p.id,
      version: p.version,
      planEnergyCost: compared.planEnergy,
      baselineEnergyCost: compared.kind ? compared.baselineEnergy : null,
      baselineKind: compared.kind,
      baselinePeakKw: compared.kind ? round2(compared.baselinePeak) : null,
      projectedSiteEnergyCost: projectedEnergy,
      actualSiteEnergyCost: covered ? actualEnergy : null,
      projectedMeteredSiteEnergyCost: covered ? projectedMetered : null,
      projectedPeakKw: round2(projectedPeak),
      actualPeakKw: covered ? round2(actualPeak) : null,
      actualCoverage: inPeriod ? covered / inPeriod : 0,
      // Billed by interval: its plan, baseline and saving here are this period's part only.
      periodPart:
        Date.parse(result.slots[0]!.start) < fromMs
          ? 'start'
          : Date.parse(result.slots.at(-1)!.start) >= toMs
            ? 'end'
            : null,
    });
  }

  const buildingKwh = (t: number) => buildingKwAt(depot.otherLoadKw, t, zone) * 0.25;
  // Peaks the utility's meter recorded earlier in this period, entered in Depot: every bill of the
  // period bills at least these (the card of peaks so far shows the same figures).
  const [entered] = await db.select().from(billingPeaks).where(eq(billingPeaks.depotId, depot.id));
  const recordedPeaksKw =
    entered && entered.billingPeriodStart === period.start.toISODate()
      ? { facility: entered.facilityKw, periods: entered.periodsKw }
      : undefined;
  const ratchetBase = rate.definition.demandRatchet
    ? await ratchetBaseOf(db, depot, period, rate.definition.demandRatchet.months)
    : null;
  const plannedDates = new Set(published.map((p) => p.serviceDate));
  const forecast = await forecastNights(db, depot, period, rate.definition, plannedDates);
  const seriesWith = (charging: ChargingKw): SourcedInterval[] => {
    const series: SourcedInterval[] = [];
    for (let t = fromMs; t < toMs; t += SLOT_MS) {
      const a = actualKwh.get(t);
      if (a !== undefined) series.push({ startMs: t, kwh: a, source: 'actual' });
      else if (plannedKw.has(t)) series.push({ startMs: t, kwh: plannedKw.get(t)! * 0.25, source: 'planned' });
      else if (charging.has(t))
        series.push({ startMs: t, kwh: buildingKwh(t) + charging.get(t)! * 0.25, source: 'forecast' });
      else series.push({ startMs: t, kwh: buildingKwh(t), source: 'building' });
    }
    return series;
  };
  const series = seriesWith(forecastCharging(forecast).even);
  return {
    rate,
    series,
    forecastNights: forecast,
    seriesWith,
    baselineDeltaKw,
    nightsCompared,
    actualIntervals: series.filter((s) => s.source === 'actual').length,
    recordedPeaksKw,
    ratchetBase,
    nights,
    plannedDates,
    entered,
    soFar: new Map(),
    projections: new WeakMap(),
    forecast: forecast.map((n) => ({ date: n.date, needKwh: n.needKwh, basis: n.basis })),
  };
}

/** The month to date and its peaks: they change only when another interval has passed or another day begun. */
/** How many intervals of a time-ordered series start before `ms`. */
function sortedIndex(series: readonly { startMs: number }[], ms: number): number {
  let lo = 0;
  let hi = series.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (series[mid]!.startMs < ms) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** The facility demand a bill charges (after entered peaks and a ratchet), the peak shown beside it. */
const billedFacilityKw = (bill: Bill) => bill.demand.find((d) => d.name === 'Facility demand')?.quantity ?? 0;

/**
 * Everything that depends on how much of the period has passed: it changes only when another
 * interval has begun or another day. An interval begun is time gone by: where it is a forecast
 * (a night nobody planned or metered) it bills its energy but sets no peak, so the peaks so far
 * are what was recorded (meter data, peaks entered in Depot, published plans, the building's own
 * load), and the month to date, the projected bill and the savings bill demand on those same
 * peaks (a forecast night still to come sets a projected peak).
 */
function soFarOf(base: PeriodBase, depot: Depot, period: Period, nowMs: number): SoFar {
  const zone = depot.timezone;
  const fromMs = period.start.toMillis();
  const toMs = period.end.toMillis();
  // The series runs in time order: the intervals begun by now are a prefix of it.
  const begun = sortedIndex(base.series, nowMs);
  const elapsedDays = Math.min(period.days, Math.max(0, Math.ceil((Math.min(nowMs, toMs) - fromMs) / 86_400_000)));
  const key = `${begun}:${elapsedDays}`;
  const known = base.soFar.get(key);
  if (known) return known;
  const toDate = asOf(base.series, begun).slice(0, begun);
  const { rate, recordedPeaksKw, ratchetBase } = base;
  const options = { zone, intervalMinutes: 15, days: elapsedDays, recordedPeaksKw, ratchetBase };
  const monthToDate = computeBill(rate.definition, toDate, options);

  // Peaks so far: the highest of the intervals begun that set a peak (metered, planned or the
  // building alone; a forecast of time gone by sets none) and what was entered by hand, the same
  // figures the month to date bills. A ratchet's floor is a billing minimum, not a peak: not here.
  const SOURCE = { actual: 'actual', planned: 'planned', forecast: 'forecast', building: 'building' } as const;
  let facility: Peaks['facility'] = { kw: 0, at: null, source: 'planned' };
  const periodPeaks = new Map<string, { kw: number; at: string | null }>();
  for (const s of toDate) {
    if (s.energyOnly) continue;
    const kw = s.kwh * 4;
    if (kw > facility.kw + PEAK_EPSILON_KW)
      facility = { kw, at: new Date(s.startMs).toISOString(), source: SOURCE[s.source] };
    const period = demandPeriodAt(rate.definition, s.startMs, zone);
    if (period === null) continue;
    if (kw > (periodPeaks.get(period)?.kw ?? 0) + PEAK_EPSILON_KW)
      periodPeaks.set(period, { kw, at: new Date(s.startMs).toISOString() });
  }
  if ((recordedPeaksKw?.facility ?? 0) > facility.kw)
    facility = { kw: recordedPeaksKw!.facility, at: null, source: 'entered' };
  for (const [name, kw] of Object.entries(recordedPeaksKw?.periods ?? {})) {
    if (kw > (periodPeaks.get(name)?.kw ?? 0)) periodPeaks.set(name, { kw, at: null });
  }
  const value: SoFar = {
    monthToDate,
    peaks: { facility, periods: [...periodPeaks].map(([name, p]) => ({ name, ...p })) },
    begun,
  };
  // Only the latest few moments are asked for again.
  if (base.soFar.size >= 4) base.soFar.delete(base.soFar.keys().next().value!);
  base.soFar.set(key, value);
  return value;
}

/** The demand period that bills an instant's peak, by name; null off-peak or where it has no demand charge. */
function demandPeriodAt(definition: RatePlanDefinition, ms: number, zone: string): string | null {
  const p = ratePlanPeriodAtMs(definition, ms, zone);
  return p.offPeak || p.demandCharge <= 0 ? null : p.period;
}

/** The series as of a moment: a forecast interval begun bills its energy but sets no peak. */
const asOf = (series: SourcedInterval[], begun: number): SourcedInterval[] =>
  series.map((s, i) => (i < begun && s.source === 'forecast' ? { ...s, energyOnly: true } : s));

/**
 * The demand target as a cap on a forecast night's site load at each interval: the lowest target
 * that applies there (the facility's; the tariff period's where it has a demand charge). Nights
 * not yet planned are then forecast as they will be planned, under the peaks the target chose,
 * not setting a peak no plan would (undefined: no target, no cap).
 */
function underTarget(base: PeriodBase, depot: Depot, target: MonthTarget | null, fromMs: number) {
  if (!target || target.view.targets.length === 0) return undefined;
  const byName = new Map(target.view.targets.map((t) => [t.name, t.kw]));
  const facilityKw = byName.get('facility') ?? Infinity;
  const capKw = (t: number) => {
    const period = demandPeriodAt(base.rate.definition, t, depot.timezone);
    const periodKw = period === null ? Infinity : (byName.get(period) ?? Infinity);
    return Math.min(facilityKw, periodKw);
  };
  const slotOf = (t: number) => forecastSlot(depot, base.rate.definition, t);
  return { fromMs, capKw, charging: target.charging, slotOf } satisfies UnderTarget;
}

/**
 * The projected bill, its range and the savings at a moment. The nights nobody planned yet are
 * forecast under the demand target (both shapes of the range); the bills all count the same
 * peaks so far, entered peaks and ratchet.
 */
function projectionOf(
  base: PeriodBase,
  depot: Depot,
  period: Period,
  soFar: SoFar,
  target: MonthTarget | null,
): Projection {
  const known = base.projections.get(soFar);
  if (known && known.target === target) return known.value;
  const { rate, recordedPeaksKw, ratchetBase } = base;
  const options = { zone: depot.timezone, intervalMinutes: 15, days: period.days, recordedPeaksKw, ratchetBase };
  const nowMs = base.series[soFar.begun]?.startMs ?? period.end.toMillis();
  const charging = forecastCharging(base.forecastNights, underTarget(base, depot, target, nowMs));
  const series = asOf(base.seriesWith(charging.even), soFar.begun);
  const projected = computeBill(rate.definition, series, options);
  const projectedRange = base.forecastNights.length
    ? (() => {
        const cheapest = computeBill(rate.definition, asOf(base.seriesWith(charging.cheapest), soFar.begun), options);
        return { low: Math.min(cheapest.total, projected.total), high: Math.max(cheapest.total, projected.total) };
      })()
    : null;
  // The saving: the projected bill itself (with the plans) against the same bill with each
  // compared night charged as its baseline would have (its charging in place of the plan's,
  // metered or not), both on the same peaks so far, entered peaks and ratchet: the period's
  // demand is billed once, so the saving is the difference of the two whole-period bills.
  const onBaselines = series.map((s) => {
    const delta = base.baselineDeltaKw.get(s.startMs);
    return delta === undefined ? s : { ...s, kwh: s.kwh + delta * 0.25 };
  });
  const baselineBill = computeBill(rate.definition, onBaselines, options);
  const savings: MonthCosts['savings'] = {
    total: baselineBill.total - projected.total,
    planBill: projected.total,
    baselineBill: baselineBill.total,
    nightsCompared: base.nightsCompared,
    planPeakKw: billedFacilityKw(projected),
    baselinePeakKw: billedFacilityKw(baselineBill),
  };

  const value: Projection = { projected, projectedRange, savings };
  base.projections.set(soFar, { target, value });
  return value;
}

/** A billing period's inputs kept per depot while the database reports changes to what they come from. */
export type CostsInputs = NotifiedCache<MonthInputs>;

/** The channel the triggers of the costs' tables notify with a depot's id (migration 0015_costs-changes). */
export const COSTS_CHANGED = 'nightyard_costs_changed';
/** Notified when a rate plan (shared by depots) changes: every depot's inputs are forgotten. */
export const RATE_PLAN_CHANGED = 'nightyard_rate_plan_changed';

/** A period's dates and instants as the inputs' query takes them, worked out once per period (luxon's zone arithmetic is dear). */
const boundsOfPeriods = new WeakMap<
  BillingPeriod,
  { plansFrom: string; periodStart: string; periodEnd: string; fromAt: Date; toAt: Date }
>();
function periodBounds(period: BillingPeriod) {
  let bounds = boundsOfPeriods.get(period);
  if (!bounds) {
    bounds = {
      plansFrom: period.start.minus({ days: 4 }).toISODate()!,
      periodStart: period.start.toISODate()!,
      periodEnd: period.end.toISODate()!,
      fromAt: period.start.toJSDate(),
      toAt: period.end.toJSDate(),
    };
    boundsOfPeriods.set(period, bounds);
  }
  return bounds;
}

/**
 * The caller's depot, its billing period holding `date` and that period's inputs, in one round
 * trip: the period is guessed from the depot as last read and checked against the row the query
 * returns (a depot whose zone or billing day changed is asked again, with the right period).
 */
async function monthInputsOf(db: Db, caller: AuthUser, depotId: string, date: string, kept?: CostsInputs) {
  // Checked in memory before the one query: the caller's depots came with the caller.
  assertMayOpenDepot(caller, depotId);
  let guess: { timezone: string; billingStartDay: number } =
    guessDepot(depotId) ?? (await depotOf(db, caller, depotId));
  for (;;) {
    const period = billingPeriodOf(date, guess.billingStartDay, guess.timezone);
    const bounds = periodBounds(period);
    const key = `${bounds.periodStart}|${caller.organisationId}`;
    const load = () => monthInputs(db, caller.organisationId, depotId, bounds);
    const found = kept ? await kept.read(depotId, key, load) : await load();
    if (!found) throw notFound('That depot');
    rememberDepot(found.depot);
    if (found.depot.timezone === guess.timezone && found.depot.billingStartDay === guess.billingStartDay)
      return { ...found, period };
    guess = found.depot;
  }
}

/**
 * The billing period's costs: every 15-minute interval takes the metered value where one was
 * imported, else the published plan's site load, else the depot's building load alone. The bills
 * are remembered per depot and period until one of the rows they come from changes (`cache`
 * null computes afresh).
 */
export async function monthCosts(
  db: Db,
  caller: AuthUser,
  depotId: string,
  date: string,
  now: Date,
  mpg = DIESEL_BUS_MPG,
  cache: MonthCostsCache<PeriodBase> | null = monthCostsCache,
  inputsKept?: CostsInputs,
): Promise<MonthCosts> {
  const inputs = await monthInputsOf(db, caller, depotId, date, inputsKept);
  const { depot, period, serviceDays } = inputs;
  const miles = inputs.milesBy(now.getTime());
  const { periodStart, periodEnd } = periodBounds(period);
  const version = cache ? inputs.version : undefined;
  const key = `${depot.id}|${periodStart}`;
  let base = cache && version ? cache.get(key, version) : undefined;
  if (!base) {
    // Requests that miss together share one computation (a page opened by many at once).
    const pendingKey = `${key}|${version ?? ''}`;
    let pending = cache && version ? periodsComputing.get(pendingKey) : undefined;
    if (!pending) {
      pending = periodBase(db, depot, period);
      if (cache && version) {
        periodsComputing.set(pendingKey, pending);
        pending
          .then(
            (value) => cache.set(key, version, value),
            () => undefined,
          )
          .finally(() => periodsComputing.delete(pendingKey));
      }
    }
    base = await pending;
  }
  const soFar = soFarOf(base, depot, period, now.getTime());
  const target = await monthTargetOf(db, caller, depot, period, now, version, soFar.peaks, base);
  const projection = projectionOf(base, depot, period, soFar, target);
  const withoutPlan = serviceDays.filter((d) => !base.plannedDates.has(d)).length;
  // The same inputs give the same answer: sent again as the bytes it was, not built, checked and
  // written out once more (finance and Tonight's cards ask for it on every page load).
  const kept = monthAnswers.get(key);
  if (
    kept &&
    kept.base === base &&
    kept.soFar === soFar &&
    kept.miles === miles &&
    kept.mpg === mpg &&
    kept.withoutPlan === withoutPlan &&
    kept.target === target
  ) {
    return markCheckedText(kept.answer, kept.text);
  }
  const { monthToDate, peaks } = soFar;
  const gallons = miles / mpg;
  const answer = monthCostsSchema.parse({
    currency: base.rate.definition.currency,
    period: { start: periodStart, end: periodEnd, days: period.days },
    ratePlanName: base.rate.name,
    projected: projection.projected,
    projectedRange: projection.projectedRange,
    forecast: base.forecast,
    monthToDate,
    savings: projection.savings,
    peaks,
    nights: base.nights,
    sources: {
      actualIntervals: base.actualIntervals,
      plannedNights: base.nights.length,
      forecastNights: base.forecast.length,
      schoolNightsWithoutPlan: withoutPlan,
    },
    emissions: {
      miles: round2(miles),
      dieselMpg: mpg,
      dieselGallonsAvoided: round2(gallons),
      co2KgAvoided: round2(gallons * DIESEL_CO2_KG_PER_GALLON),
      source: EMISSIONS_SOURCE,
    },
    target: target?.view ?? null,
  } satisfies MonthCosts);
  if (cache) {
    const text = Buffer.from(JSON.stringify(answer));
    monthAnswers.delete(key);
    monthAnswers.set(key, { base, soFar, miles, mpg, withoutPlan, target, answer, text });
    while (monthAnswers.size > MAX_MONTH_ANSWERS) monthAnswers.delete(monthAnswers.keys().next().value!);
    return markCheckedText(answer, text);
  }
  return markChecked(answer);
}

/** The last answer per depot and period, with what it was made from (compared by identity). */
const monthAnswers = new Map<
  string,
  {
    base: PeriodBase;
    soFar: ReturnType<typeof soFarOf>;
    miles: number;
    mpg: number;
    withoutPlan: number;
    target: MonthTarget | null;
    answer: MonthCosts;
    text: Buffer;
  }
>();
const MAX_MONTH_ANSWERS = 200;

/** The last demand target per depot and period, with the inputs' version and night it came from. */
const monthTargets = new Map<string, { stamp: string; target: MonthTarget | null }>();

/**
 * The period's demand target over its nights left (from the night under way, or from the start of
 * a period still to come; none for a period past). Remembered while the period's inputs keep
 * their version; without one (no cache) computed afresh, the period LP itself being remembered
 * by its nights' content.
 */
async function monthTargetOf(
  db: Db,
  caller: AuthUser,
  depot: Depot,
  period: Period,
  now: Date,
  version: string | undefined,
  peaksSoFar: Peaks,
  base: PeriodBase,
): Promise<MonthTarget | null> {
  // "Which night" from the one night model: the night under way, else the next one.
  const night = (await nightOfDepot(db, depot, now)).tonight.serviceDate;
  const tonight = DateTime.fromISO(night, { zone: depot.timezone }).startOf('day');
  if (tonight >= period.end) return null;
  const from = (tonight < period.start ? period.start : tonight).toISODate()!;
  const key = `${depot.id}|${period.start.toISODate()}`;
  // The month's peaks so far (metered, entered, planned and forecast intervals passed) are the floor.
  const floor = {
    facility: peaksSoFar.facility.kw,
    periods: Object.fromEntries(peaksSoFar.periods.map((p) => [p.name, p.kw])),
  };
  // The night under way is carried out as published: the peaks its plan has still to draw are
  // billed in the projection whatever the target says, so they are the target's floor too (the
  // card read "target 185 kW, no night needs more" beside a projected 261.2 kW from tonight's plan).
  // A published plan covers now: the intervals it plans from now on, up to the end of its night
  // (the first interval no published plan covers), count.
  const current = sortedIndex(base.series, now.getTime());
  if (base.series[current - 1]?.source === 'planned') {
    for (let i = current; i < base.series.length && base.series[i]!.source === 'planned'; i++) {
      const s = base.series[i]!;
      const kw = s.kwh * 4;
      floor.facility = Math.max(floor.facility, kw);
      const period = demandPeriodAt(base.rate.definition, s.startMs, depot.timezone);
      if (period !== null) floor.periods[period] = Math.max(floor.periods[period] ?? 0, kw);
    }
  }
  const stamp = `${version ?? ''}|${from}|${depot.serviceLimitKw}|${depot.otherLoadKw.join(',')}|${JSON.stringify(floor)}`;
  const kept = version ? monthTargets.get(key) : undefined;
  if (kept && kept.stamp === stamp) return kept.target;
  let target: MonthTarget | null = null;
  try {
    const solved = await periodTargetFrom(db, caller, depot.id, from, undefined, { floor });
    target = solved && {
      view: solved.view,
      charging: new Map(solved.dates.map((date, i) => [date, solved.target.charging[i]!])),
    };
  } catch (err) {
    // No target (no rate plan for a night, an engine failure) leaves the month as it was; only a
    // database gone away is the request's failure.
    if (isDatabaseUnavailable(err)) throw err;
    if (!(err instanceof DomainError)) return null;
  }
  if (version) {
    monthTargets.delete(key);
    monthTargets.set(key, { stamp, target });
    while (monthTargets.size > MAX_MONTH_ANSWERS) monthTargets.delete(monthTargets.keys().next().value!);
  }
  return target;
}
