import { and, desc, eq, gt, lt, lte } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { ratePlanDefinitionSchema, type RatePlanDefinition, type YardCrew } from '@nightyard/contracts';
import type { ScenarioInput } from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { billingPeaks, chargers, depotRatePlans, loadReductionWindows, powerCabinets, ratePlans } from '../db/schema';
import { outDuring } from '../depots/charger-out';
import { DomainError } from '../http/errors';
import type { AuthUser } from '../auth/auth-user';
import { depotOf } from '../depots/depot-access';
import { pricedSlots, seasonOf, type PricedSlot } from '@nightyard/scheduling';
import { billingPeriodOf } from '../costs/billing-period';
import { periodPeaksBefore } from '../costs/period-peaks';

/** Grid-to-battery efficiency of DC charging: about 0.90-0.95 (common practice). */
export const DEFAULT_EFFICIENCY = 0.92;
const MAX_HORIZON_DAYS = 7;

export type ScenarioBase = Omit<ScenarioInput, 'buses'>;
export interface ScenarioBaseResult {
  scenario: ScenarioBase;
  /** Where the depot's data had to be simplified to fit the scenario format. */
  notes: string[];
}

const LOCAL = "yyyy-MM-dd'T'HH:mm";

/**
 * The site and tariff part of a scenario file for a depot over [start, end), from its chargers,
 * power cabinets, limits, rate plan and the billing period's peaks so far.
 */
export async function buildScenarioBase(
  db: Db,
  caller: AuthUser,
  depotId: string,
  start: string,
  end: string,
  options: { periodPeaks?: boolean } = {},
): Promise<ScenarioBaseResult> {
  const depot = await depotOf(db, caller, depotId);
  const zone = depot.timezone;
  const from = DateTime.fromISO(start, { zone });
  const to = DateTime.fromISO(end, { zone });
  if (!from.isValid || !to.isValid)
    throw new DomainError('validation_failed', 'Check the horizon', { start: 'Write local times as YYYY-MM-DDTHH:mm' });
  if (to <= from)
    throw new DomainError('validation_failed', 'The horizon must end after it starts', { end: 'Must be after start' });
  if (to.diff(from, 'days').days > MAX_HORIZON_DAYS) {
    throw new DomainError('validation_failed', `Plan at most ${MAX_HORIZON_DAYS} days at a time`, {
      end: `At most ${MAX_HORIZON_DAYS} days after start`,
    });
  }
  const notes: string[] = [];

  const [assignment] = await db
    .select({ definition: ratePlans.definition, name: ratePlans.name })
    .from(depotRatePlans)
    .innerJoin(ratePlans, eq(ratePlans.id, depotRatePlans.ratePlanId))
    .where(and(eq(depotRatePlans.depotId, depotId), lte(depotRatePlans.effectiveFrom, from.toISODate()!)))
    .orderBy(desc(depotRatePlans.effectiveFrom))
    .limit(1);
  if (!assignment) {
    throw new DomainError(
      'validation_failed',
      `No rate plan applies to ${depot.name} on ${from.toISODate()}: assign one under Rates`,
    );
  }
  const definition = ratePlanDefinitionSchema.parse(assignment.definition);
  const tariff = tariffFor(definition, from, to);

  const [peaks] = await db.select().from(billingPeaks).where(eq(billingPeaks.depotId, depotId));
  const peaksSoFarKw: Record<string, number> = {};
  if (peaks) {
    const periodStart = DateTime.fromISO(peaks.billingPeriodStart, { zone });
    if (from >= periodStart && from < periodStart.plus({ months: 1 })) {
      peaksSoFarKw.facility = peaks.facilityKw;
      for (const p of tariff.periods) {
        const kw = peaks.periodsKw[tariff.originalName.get(p.name)!];
        if (kw !== undefined) peaksSoFarKw[p.name] = kw;
      }
    } else {
      notes.push(
        `The peaks so far are for the billing period from ${peaks.billingPeriodStart}, not this night's: no peaks so far are assumed.`,
      );
    }
  }

  // The period's own peaks before this night (meter readings, the nights published before it) and
  // a demand ratchet's floor are peaks so far: the month's bill charges its highest once, and at
  // least the ratchet's share of the previous months' highest (costs-service.ts), so a night pays
  // only for what it adds above them, as Costs counts it. Without the floor the plan would price
  // the whole peak at the demand rate and pay for energy to lower a peak the bill never charges.
  // (The demand target counts them once for the whole period: its nights pass periodPeaks: false.)
  if (options.periodPeaks !== false) {
    const period = billingPeriodOf(from.toISODate()!, depot.billingStartDay, zone);
    const before = await periodPeaksBefore(db, depot, zone, definition, period, from.toISODate()!);
    const floor = before.ratchet;
    if (floor && tariff.facilityDemandCharge > 0 && floor.kw > (peaksSoFarKw.facility ?? 0)) {
      peaksSoFarKw.facility = floor.kw;
      notes.push(
        `The facility demand is billed at least at ${floor.kw} kW this period (the rate plan's ratchet: ${floor.percent} % of ${Math.round(floor.base.kw * 10) / 10} kW ${floor.base.source}): the night's peak costs demand only above it.`,
      );
    }
    const raised: string[] = [];
    if (before.facility > (peaksSoFarKw.facility ?? 0) + 1e-9) {
      peaksSoFarKw.facility = before.facility;
      raised.push(`facility ${Math.round(before.facility * 10) / 10} kW`);
    }
    for (const p of tariff.periods) {
      const kw = before.periods[tariff.originalName.get(p.name)!];
      if (kw !== undefined && kw > (peaksSoFarKw[p.name] ?? 0) + 1e-9) {
        peaksSoFarKw[p.name] = kw;
        raised.push(`${p.name} ${Math.round(kw * 10) / 10} kW`);
      }
    }
    if (raised.length)
      notes.push(
        `Peaks so far this billing period from the meter readings and the nights published before this one: ${raised.join(', ')}; the night's peak costs demand only above them.`,
      );
  }

  const cabs = await db.select().from(powerCabinets).where(eq(powerCabinets.depotId, depotId));
  const chs = await db.select().from(chargers).where(eq(chargers.depotId, depotId));
  // A charger out of service for a period is left out of the nights that period covers; a night
  // it covers only in part plans the charger outside it (scenario extension `outOfService`), so a
  // weekend with a day of maintenance keeps the charger's Friday and Sunday.
  const [nightStart, nightEnd] = [from.toJSDate(), to.toJSDate()];
  const isOut = (c: (typeof chs)[number]) => outDuring(c, nightStart, nightEnd);
  const local = (at: Date) => DateTime.fromJSDate(at, { zone });
  // The part of the night a charger is out of service, when it is not the whole night.
  const partOf = (c: (typeof chs)[number]) => {
    const a = c.outFrom && c.outFrom > nightStart ? c.outFrom : null;
    const b = c.outUntil && c.outUntil < nightEnd ? c.outUntil : null;
    return a || b ? { from: local(a ?? nightStart).toFormat(LOCAL), to: local(b ?? nightEnd).toFormat(LOCAL) } : null;
  };
  const inService = chs.filter((c) => !isOut(c) || partOf(c));
  const outSpan = new Map<string, { from: string; to: string }>();
  for (const c of chs.filter(isOut)) {
    const period =
      c.outFrom || c.outUntil
        ? ` ${[c.outFrom ? `from ${local(c.outFrom).toFormat('ccc HH:mm')}` : '', c.outUntil ? `until ${local(c.outUntil).toFormat('ccc HH:mm')}` : ''].filter(Boolean).join(' ')}`
        : '';
    const reason = c.statusReason ? ` (${c.statusReason})` : '';
    const part = partOf(c);
    if (part) {
      outSpan.set(c.id, part);
      notes.push(`Charger ${c.label} is out of service${period}${reason}: no bus is planned on it then.`);
    } else
      notes.push(
        `Charger ${c.label} is out of service${period}${reason} and is left out${period ? ' for the night' : ''}.`,
      );
  }
  if (!inService.length) throw new DomainError('validation_failed', `${depot.name} has no charger in service`);
  const cabinetLabel = new Map(cabs.map((c) => [c.id, c.label]));
  const usedCabinets = new Set(inService.map((c) => c.cabinetId).filter((id): id is string => id !== null));

  // Load-reduction windows lower the site limit only while they last (scenario extension).
  const limitKw = depot.serviceLimitKw;
  const reductions = await db
    .select()
    .from(loadReductionWindows)
    .where(
      and(
        eq(loadReductionWindows.depotId, depotId),
        lt(loadReductionWindows.startsAt, nightEnd),
        gt(loadReductionWindows.endsAt, nightStart),
      ),
    );
  const limitWindows = reductions.map((r) => {
    const a = DateTime.fromJSDate(r.startsAt, { zone });
    const b = DateTime.fromJSDate(r.endsAt, { zone });
    return { from: (a < from ? from : a).toFormat(LOCAL), to: (b > to ? to : b).toFormat(LOCAL), limitKw: r.limitKw };
  });
  const yard = depot.yardCrew ? yardFor(depot.yardCrew, from, to) : null;
  const profile = depot.otherLoadKw;
  const hourly = profile.length === 24 ? profile : null;
  return {
    scenario: {
      version: 1,
      timezone: zone,
      start: from.toFormat(LOCAL),
      end: to.toFormat(LOCAL),
      slotMinutes: 15,
      efficiency: DEFAULT_EFFICIENCY,
      site: {
        limitKw,
        otherLoadKw: hourly ? Math.max(...hourly) : profile[0]!,
        ...(hourly ? { otherLoadByHourKw: hourly } : {}),
        ...(limitWindows.length ? { limitWindows } : {}),
      },
      cabinets: cabs.filter((c) => usedCabinets.has(c.id)).map((c) => ({ id: c.label, limitKw: c.limitKw })),
      chargers: inService.map((c) => ({
        id: c.label,
        maxKw: c.maxKw,
        ...(c.cabinetId ? { cabinet: cabinetLabel.get(c.cabinetId)! } : {}),
        ...(outSpan.has(c.id) ? { outOfService: [outSpan.get(c.id)!] } : {}),
      })),
      tariff: {
        currency: definition.currency,
        offPeakPrice: tariff.offPeakPrice,
        periods: tariff.periods,
        facilityDemandCharge: tariff.facilityDemandCharge,
        peaksSoFarKw,
      },
      ...(yard ? { yard } : {}),
    },
    notes,
  };
}

/**
 * The depot's yard crew over the horizon: each shift written as dated crew windows on the days it
 * starts (a shift that ends at or before its start runs past midnight), cut to the horizon. No shift
 * listed: the crew can make moves at any hour (the scenario's `crew` is left out).
 */
export function yardFor(
  crew: Omit<YardCrew, 'costTolerancePercent' | 'costToleranceAmount'> & Partial<YardCrew>,
  from: DateTime,
  to: DateTime,
): NonNullable<ScenarioInput['yard']> {
  const windows: { from: string; to: string; movesPerSlot: number }[] = [];
  for (let day = from.startOf('day').minus({ days: 1 }); day < to; day = day.plus({ days: 1 })) {
    for (const shift of crew.shifts) {
      // A shift on some days only (no one on weekends): a shift past midnight belongs to the day it starts.
      if (shift.days && !shift.days.includes(day.weekday)) continue;
      const [fh, fm] = shift.from.split(':').map(Number);
      const [th, tm] = shift.to.split(':').map(Number);
      const a = day.set({ hour: fh!, minute: fm! });
      let b = day.set({ hour: th!, minute: tm! });
      if (b <= a) b = b.plus({ days: 1 });
      const x = a < from ? from : a;
      const y = b > to ? to : b;
      if (y > x) windows.push({ from: x.toFormat(LOCAL), to: y.toFormat(LOCAL), movesPerSlot: shift.movesPerSlot });
    }
  }
  windows.sort((p, q) => (p.from < q.from ? -1 : p.from > q.from ? 1 : 0));
  return {
    minPlugInMinutes: crew.minPlugInMinutes,
    driversPlugIn: crew.driversPlugIn,
    ...(crew.shifts.length ? { crew: windows } : {}),
    costTolerancePercent: crew.costTolerancePercent ?? 0.5,
    costToleranceAmount: crew.costToleranceAmount ?? 5,
  };
}

type ScenarioPeriod = NonNullable<ScenarioBase['tariff']['periods']>[number];

/**
 * Writes the rate plan's periods over the horizon as scenario windows. The horizon spans at most
 * a week, so each weekday number stands for one date and holidays and season changes stay exact.
 */
export function tariffFor(def: RatePlanDefinition, from: DateTime, to: DateTime) {
  const main = seasonOf(def, from.month);
  const slots = pricedSlots(def, from, to);
  const seasons = new Set(slots.map((s) => s.season));
  // Same period name with other prices in another season: keep them apart.
  const clash = new Set<string>();
  const seen = new Map<string, string>();
  for (const s of slots) {
    const sig = `${s.price}/${s.demandCharge}`;
    if (seen.has(s.period) && seen.get(s.period) !== sig) clash.add(s.period);
    seen.set(s.period, sig);
  }
  const label = (s: PricedSlot) =>
    clash.has(s.period) || (s.offPeak && seasons.size > 1) ? `${s.period} (${s.season})` : s.period;
  const implicit = (s: PricedSlot) => s.offPeak && s.season === main.name;

  const periods = new Map<string, ScenarioPeriod & { windows: { days: number[]; from: string; to: string }[] }>();
  const originalName = new Map<string, string>();
  let i = 0;
  while (i < slots.length) {
    const s = slots[i]!;
    const day = s.start.toISODate();
    let j = i + 1;
    while (
      j < slots.length &&
      slots[j]!.start.toISODate() === day &&
      label(slots[j]!) === label(s) &&
      implicit(slots[j]!) === implicit(s)
    )
      j++;
    if (!implicit(s)) {
      const name = label(s);
      const endAt = slots[j - 1]!.start.plus({ minutes: 15 });
      const window = {
        days: [s.start.weekday],
        from: s.start.toFormat('HH:mm'),
        to: endAt.toISODate() !== day ? '24:00' : endAt.toFormat('HH:mm'),
      };
      const period = periods.get(name) ?? { name, price: s.price, demandCharge: s.demandCharge, windows: [] };
      const same = period.windows.find((w) => w.from === window.from && w.to === window.to);
      if (same) same.days.push(...window.days);
      else period.windows.push(window);
      periods.set(name, period);
      originalName.set(name, s.period);
    }
    i = j;
  }
  return {
    offPeakPrice: main.offPeakPrice,
    facilityDemandCharge: main.facilityDemandCharge,
    periods: [...periods.values()],
    originalName,
  };
}
