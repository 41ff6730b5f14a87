import { and, eq, gte, lt } from 'drizzle-orm';
import { DateTime } from 'luxon';
import type { MeterImportResult } from '@nightyard/contracts';
import type { Db } from '../db/client';
import { billingPeaks, meterImports, meterIntervals } from '../db/schema';
import { lockTarget } from '../db/locks';
import { DomainError } from '../http/errors';
import type { AuthUser } from '../auth/auth-user';
import { depotOf } from '../depots/depot-access';
import { billingPeriodOf, ratePlanOn } from './billing-period';
import { MAX_METER_FILE_BYTES, refuseLargerThan } from '../http/limits';
import { runInPool } from '../workers/pool';

/**
 * Imports a billing period's utility interval data (Green Button XML or CSV), all or nothing:
 * it replaces earlier readings of the same intervals and raises the period's peaks so far.
 */
export async function importMeterData(
  db: Db,
  caller: AuthUser,
  depotId: string,
  req: { fileName: string; content: string; billingPeriodStart: string },
  now: Date,
): Promise<MeterImportResult> {
  refuseLargerThan(req.content, MAX_METER_FILE_BYTES, 'The meter file', 'content');
  const depot = await depotOf(db, caller, depotId);
  const zone = depot.timezone;
  const period = billingPeriodOf(req.billingPeriodStart, depot.billingStartDay, zone);
  if (period.start.toISODate() !== req.billingPeriodStart) {
    throw new DomainError(
      'validation_failed',
      `${depot.name}'s billing periods start on day ${depot.billingStartDay}`,
      {
        billingPeriodStart: `Choose a period start such as ${period.start.toISODate()}`,
      },
    );
  }
  const rate = await ratePlanOn(db, depot, req.billingPeriodStart);
  // Reading, checking and measuring a month of readings runs in a worker thread.
  const { format, checked, measured } = await runInPool({
    kind: 'meter-file',
    content: req.content,
    zone,
    periodStartMs: period.start.toMillis(),
    periodEndMs: period.end.toMillis(),
    nowMs: now.getTime(),
    rate: rate.definition,
  });
  const file = { format };
  const local = (ms: number) => DateTime.fromMillis(ms, { zone }).toFormat("yyyy-MM-dd'T'HH:mm");
  const gaps = checked.gaps.map((g) => ({ from: local(g.fromMs), to: local(g.toMs) }));

  const result = await db.transaction(async (tx) => {
    // One import at a time per depot: concurrent imports of overlapping intervals would each
    // delete nothing and then clash on the same interval keys; peaks are raised from what is read.
    await lockTarget(tx, 'billing-peaks', depotId);
    const [imp] = await tx
      .insert(meterImports)
      .values({
        organisationId: caller.organisationId,
        depotId,
        fileName: req.fileName,
        format: file.format,
        billingPeriodStart: req.billingPeriodStart,
        intervals: checked.intervals.length,
        duplicates: checked.duplicates,
        gaps,
        importedBy: caller.id,
      })
      .returning();
    const first = checked.intervals[0]!.startMs;
    const last = checked.intervals.at(-1)!.startMs;
    await tx
      .delete(meterIntervals)
      .where(
        and(
          eq(meterIntervals.depotId, depotId),
          gte(meterIntervals.startsAt, new Date(first)),
          lt(meterIntervals.startsAt, new Date(last + 1)),
        ),
      );
    for (let k = 0; k < checked.intervals.length; k += 1000) {
      await tx.insert(meterIntervals).values(
        checked.intervals.slice(k, k + 1000).map((i) => ({
          organisationId: caller.organisationId,
          depotId,
          startsAt: new Date(i.startMs),
          minutes: i.minutes,
          kwh: i.kwh,
          importId: imp!.id,
        })),
      );
    }
    const [existing] = await tx.select().from(billingPeaks).where(eq(billingPeaks.depotId, depotId));
    const same = existing?.billingPeriodStart === req.billingPeriodStart;
    const periods: Record<string, number> = { ...(same ? existing!.periodsKw : {}) };
    for (const [name, p] of Object.entries(measured.periods)) periods[name] = Math.max(periods[name] ?? 0, p.kw);
    const facilityKw = Math.max(same ? existing!.facilityKw : 0, measured.facility.kw);
    const values = {
      organisationId: caller.organisationId,
      billingPeriodStart: req.billingPeriodStart,
      facilityKw,
      periodsKw: periods,
      updatedAt: now,
    };
    await tx
      .insert(billingPeaks)
      .values({ depotId, ...values })
      .onConflictDoUpdate({ target: billingPeaks.depotId, set: values });
    return { id: imp!.id, facilityKw, periods };
  });
  return {
    id: result.id,
    format: file.format,
    intervals: checked.intervals.length,
    minutes: checked.minutes,
    duplicates: checked.duplicates,
    gaps,
    kwh: Math.round(checked.intervals.reduce((a, b) => a + b.kwh, 0) * 1000) / 1000,
    peaks: { facilityKw: result.facilityKw, periods: result.periods },
  };
}
