import { and, asc, eq, sql } from 'drizzle-orm';
import { DateTime } from 'luxon';
import type {
  Cabinet,
  Charger,
  ChargerInput,
  DepotDetail,
  DepotSettings,
  LoadReductionWindow,
  PeaksSoFar,
  YardCrew,
} from '@nightyard/contracts';
import type { Db } from '../db/client';
import {
  billingPeaks,
  chargers,
  depotRatePlans,
  depots,
  loadReductionWindows,
  powerCabinets,
  ratePlans,
} from '../db/schema';
import { DomainError, notFound } from '../http/errors';
import { lockTarget } from '../db/locks';
import type { AuthUser } from '../auth/auth-user';
import { depotOf } from './depot-access';
import { liveStatusFor } from '../live/live-charger';

type ChargerRow = typeof chargers.$inferSelect;

export async function depotDetail(db: Db, caller: AuthUser, depotId: string): Promise<DepotDetail> {
  const depot = await depotOf(db, caller, depotId);
  const [cabs, chs, windows, [peaks], plans] = await Promise.all([
    db.select().from(powerCabinets).where(eq(powerCabinets.depotId, depotId)).orderBy(asc(powerCabinets.label)),
    listChargers(db, depotId, depot.timezone),
    db
      .select()
      .from(loadReductionWindows)
      .where(eq(loadReductionWindows.depotId, depotId))
      .orderBy(asc(loadReductionWindows.startsAt)),
    db.select().from(billingPeaks).where(eq(billingPeaks.depotId, depotId)),
    db
      .select({
        ratePlanId: depotRatePlans.ratePlanId,
        name: ratePlans.name,
        effectiveFrom: depotRatePlans.effectiveFrom,
      })
      .from(depotRatePlans)
      .innerJoin(ratePlans, eq(ratePlans.id, depotRatePlans.ratePlanId))
      .where(eq(depotRatePlans.depotId, depotId))
      .orderBy(asc(depotRatePlans.effectiveFrom)),
  ]);
  const local = (d: Date) => DateTime.fromJSDate(d, { zone: depot.timezone }).toFormat("yyyy-MM-dd'T'HH:mm");
  return {
    id: depot.id,
    name: depot.name,
    timezone: depot.timezone,
    serviceLimitKw: depot.serviceLimitKw,
    otherLoadKw: depot.otherLoadKw,
    billingStartDay: depot.billingStartDay,
    cabinets: cabs.map((c): Cabinet => ({
      id: c.id,
      label: c.label,
      limitKw: c.limitKw,
      chargerCount: chs.filter((ch) => ch.cabinetId === c.id).length,
    })),
    chargers: chs,
    loadReductionWindows: windows.map((w) => ({
      id: w.id,
      start: local(w.startsAt),
      end: local(w.endsAt),
      limitKw: w.limitKw,
      note: w.note,
    })),
    peaksSoFar: peaks
      ? { billingPeriodStart: peaks.billingPeriodStart, facilityKw: peaks.facilityKw, periods: peaks.periodsKw }
      : null,
    yardCrew: depot.yardCrew ? { costTolerancePercent: 0.5, costToleranceAmount: 5, ...depot.yardCrew } : null,
    ratePlans: plans,
  };
}

async function listChargers(db: Db, depotId: string, zone: string): Promise<Charger[]> {
  const rows = await db
    .select({ c: chargers, cabinetLabel: powerCabinets.label })
    .from(chargers)
    .leftJoin(powerCabinets, eq(powerCabinets.id, chargers.cabinetId))
    .where(eq(chargers.depotId, depotId))
    .orderBy(asc(chargers.label));
  return rows.map(({ c, cabinetLabel }) => toCharger(c, cabinetLabel, zone));
}

const LOCAL = "yyyy-MM-dd'T'HH:mm";
const toLocal = (d: Date | null, zone: string) => (d ? DateTime.fromJSDate(d, { zone }).toFormat(LOCAL) : null);
const fromLocal = (s: string | null, zone: string) => (s ? DateTime.fromFormat(s, LOCAL, { zone }).toJSDate() : null);

/** The charger's columns from its input: the out-of-service period only while it is out. */
function chargerColumns(input: ChargerInput, zone: string) {
  const out = input.status === 'out_of_service';
  return {
    ...input,
    statusReason: out ? input.statusReason : null,
    outFrom: out ? fromLocal(input.outFrom, zone) : null,
    outUntil: out ? fromLocal(input.outUntil, zone) : null,
  };
}

const toCharger = (c: ChargerRow, cabinetLabel: string | null, zone: string): Charger => ({
  id: c.id,
  label: c.label,
  maxKw: c.maxKw,
  connector: c.connector,
  cabinetId: c.cabinetId,
  cabinetLabel,
  status: c.status,
  statusReason: c.statusReason,
  statusSince: c.statusSince?.toISOString() ?? null,
  outFrom: toLocal(c.outFrom, zone),
  outUntil: toLocal(c.outUntil, zone),
  ocppIdentity: c.ocppIdentity,
  live: c.ocppIdentity
    ? {
        status: liveStatusFor(c),
        powerKw: c.liveConnected && c.livePowerW !== null ? Math.round(c.livePowerW / 100) / 10 : null,
        seenAt: c.liveSeenAt?.toISOString() ?? null,
      }
    : null,
});

export async function updateDepotSettings(db: Db, caller: AuthUser, depotId: string, s: DepotSettings): Promise<void> {
  await depotOf(db, caller, depotId);
  await db.update(depots).set(s).where(eq(depots.id, depotId));
}

export async function saveYardCrew(db: Db, caller: AuthUser, depotId: string, crew: YardCrew): Promise<YardCrew> {
  await depotOf(db, caller, depotId);
  await db.update(depots).set({ yardCrew: crew }).where(eq(depots.id, depotId));
  return crew;
}

async function cabinetOfDepot(db: Db, depotId: string, cabinetId: string | null): Promise<string | null> {
  if (!cabinetId) return null;
  const [cab] = await db
    .select()
    .from(powerCabinets)
    .where(and(eq(powerCabinets.id, cabinetId), eq(powerCabinets.depotId, depotId)));
  if (!cab)
    throw new DomainError('validation_failed', 'That power cabinet is not in this depot', {
      cabinetId: 'Choose a cabinet of this depot',
    });
  return cab.label;
}

function uniqueLabel(err: unknown, what: string): never {
  if ((err as { code?: string }).code === '23505' || (err as { cause?: { code?: string } }).cause?.code === '23505') {
    throw new DomainError('conflict', `This depot already has a ${what} with that label`, {
      label: 'Already used in this depot',
    });
  }
  throw err;
}

export async function createCharger(
  db: Db,
  caller: AuthUser,
  depotId: string,
  input: ChargerInput,
  now: Date,
): Promise<Charger> {
  const depot = await depotOf(db, caller, depotId);
  const cabinetLabel = await cabinetOfDepot(db, depotId, input.cabinetId);
  const [row] = await db
    .insert(chargers)
    .values({
      ...chargerColumns(input, depot.timezone),
      organisationId: caller.organisationId,
      depotId,
      statusSince: input.status === 'out_of_service' ? now : null,
    })
    .returning()
    .catch((e) => uniqueLabel(e, 'charger'));
  return toCharger(row!, cabinetLabel, depot.timezone);
}

export async function updateCharger(
  db: Db,
  caller: AuthUser,
  depotId: string,
  id: string,
  input: ChargerInput,
  now: Date,
): Promise<Charger> {
  const depot = await depotOf(db, caller, depotId);
  const [existing] = await db
    .select()
    .from(chargers)
    .where(and(eq(chargers.id, id), eq(chargers.depotId, depotId)));
  if (!existing) throw notFound('That charger');
  const cabinetLabel = await cabinetOfDepot(db, depotId, input.cabinetId);
  // "Since when" moves only when the status itself changes.
  const statusSince = existing.status === input.status ? existing.statusSince : now;
  const [row] = await db
    .update(chargers)
    .set({ ...chargerColumns(input, depot.timezone), statusSince })
    .where(eq(chargers.id, id))
    .returning()
    .catch((e) => uniqueLabel(e, 'charger'));
  return toCharger(row!, cabinetLabel, depot.timezone);
}

export async function deleteCharger(db: Db, caller: AuthUser, depotId: string, id: string): Promise<void> {
  await depotOf(db, caller, depotId);
  const gone = await db
    .delete(chargers)
    .where(and(eq(chargers.id, id), eq(chargers.depotId, depotId)))
    .returning({ id: chargers.id });
  if (!gone.length) throw notFound('That charger');
}

export async function createCabinet(
  db: Db,
  caller: AuthUser,
  depotId: string,
  input: { label: string; limitKw: number },
): Promise<Cabinet> {
  await depotOf(db, caller, depotId);
  const [row] = await db
    .insert(powerCabinets)
    .values({ ...input, organisationId: caller.organisationId, depotId })
    .returning()
    .catch((err: unknown) => uniqueLabel(err, 'power cabinet'));
  return { id: row!.id, label: row!.label, limitKw: row!.limitKw, chargerCount: 0 };
}

export async function updateCabinet(
  db: Db,
  caller: AuthUser,
  depotId: string,
  id: string,
  input: { label: string; limitKw: number },
): Promise<Cabinet> {
  await depotOf(db, caller, depotId);
  const [row] = await db
    .update(powerCabinets)
    .set(input)
    .where(and(eq(powerCabinets.id, id), eq(powerCabinets.depotId, depotId)))
    .returning()
    .catch((err: unknown) => uniqueLabel(err, 'power cabinet'));
  if (!row) throw notFound('That power cabinet');
  const [n] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(chargers)
    .where(eq(chargers.cabinetId, id));
  return { id: row.id, label: row.label, limitKw: row.limitKw, chargerCount: n?.n ?? 0 };
}

export async function deleteCabinet(db: Db, caller: AuthUser, depotId: string, id: string): Promise<void> {
  await depotOf(db, caller, depotId);
  // Another depot's (or organisation's) cabinet is "not found" before anything is said about it.
  const [cab] = await db
    .select({ id: powerCabinets.id })
    .from(powerCabinets)
    .where(and(eq(powerCabinets.id, id), eq(powerCabinets.depotId, depotId)));
  if (!cab) throw notFound('That power cabinet');
  const [n] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(chargers)
    .where(and(eq(chargers.cabinetId, id), eq(chargers.depotId, depotId)));
  if ((n?.n ?? 0) > 0) throw new DomainError('conflict', `${n!.n} chargers are on this cabinet: move them first`);
  const gone = await db
    .delete(powerCabinets)
    .where(and(eq(powerCabinets.id, id), eq(powerCabinets.depotId, depotId)))
    .returning({ id: powerCabinets.id });
  if (!gone.length) throw notFound('That power cabinet');
}

/** Replaces the depot's load-reduction windows as a whole: all are saved, or none. */
export async function replaceLoadReductionWindows(
  db: Db,
  caller: AuthUser,
  depotId: string,
  windows: { start: string; end: string; limitKw: number; note: string }[],
): Promise<LoadReductionWindow[]> {
  await depotOf(db, caller, depotId);
  await db.transaction(async (tx) => {
    // One writer per depot; the service limit is read again under the lock.
    await lockTarget(tx, 'load-reduction-windows', depotId);
    const depot = await depotOf(tx as unknown as Db, caller, depotId);
    const at = (local: string) => DateTime.fromISO(local, { zone: depot.timezone });
    const fields: Record<string, string> = {};
    const sorted = windows
      .map((w, i) => ({ ...w, i, s: at(w.start), e: at(w.end) }))
      .sort((a, b) => a.s.toMillis() - b.s.toMillis());
    for (let k = 1; k < sorted.length; k++) {
      if (sorted[k]!.s < sorted[k - 1]!.e)
        fields[`[${sorted[k]!.i}].start`] = `Overlaps the window starting ${sorted[k - 1]!.start}`;
    }
    windows.forEach((w, i) => {
      if (w.limitKw > depot.serviceLimitKw)
        fields[`[${i}].limitKw`] =
          `Above the service limit (${depot.serviceLimitKw} kW): a reduced limit must be lower`;
    });
    if (Object.keys(fields).length)
      throw new DomainError('validation_failed', 'Check the load-reduction windows', fields);
    await tx.delete(loadReductionWindows).where(eq(loadReductionWindows.depotId, depotId));
    if (sorted.length) {
      await tx.insert(loadReductionWindows).values(
        sorted.map((w) => ({
          organisationId: caller.organisationId,
          depotId,
          startsAt: w.s.toJSDate(),
          endsAt: w.e.toJSDate(),
          limitKw: w.limitKw,
          note: w.note,
        })),
      );
    }
  });
  return (await depotDetail(db, caller, depotId)).loadReductionWindows;
}

export async function savePeaksSoFar(
  db: Db,
  caller: AuthUser,
  depotId: string,
  p: PeaksSoFar,
  now: Date,
): Promise<PeaksSoFar> {
  await depotOf(db, caller, depotId);
  const values = {
    organisationId: caller.organisationId,
    billingPeriodStart: p.billingPeriodStart,
    facilityKw: p.facilityKw,
    periodsKw: p.periods,
    updatedAt: now,
  };
  await db.transaction(async (tx) => {
    // Meter-data imports raise the same row from what they read: they share this lock.
    await lockTarget(tx, 'billing-peaks', depotId);
    await tx
      .insert(billingPeaks)
      .values({ depotId, ...values })
      .onConflictDoUpdate({ target: billingPeaks.depotId, set: values });
  });
  return p;
}
