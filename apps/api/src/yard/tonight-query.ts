import { aliasedTable, and, eq, getTableColumns, sql } from 'drizzle-orm';
import type { Tonight } from '@nightyard/contracts';
import type { Db } from '../db/client';
import { prepared } from '../db/prepared';
import { depots, plans, shiftAcknowledgements, users, yardConfirmations, yardReports } from '../db/schema';

const creator = aliasedTable(users, 'creator');
const publisher = aliasedTable(users, 'publisher');
const { scenario: _scenario, result: _result, replanState: _replanState, ...planMeta } = getTableColumns(plans);

const depotId = sql.placeholder('depotId');
const serviceDate = sql.placeholder('serviceDate');

interface ReportRow {
  kind: Tonight['reports'][number]['kind'];
  bus: string | null;
  charger: string | null;
  reason: string | null;
  reportedAt: string;
  reportedBy: string | null;
  revisionVersion: number | null;
}

/**
 * The caller's depot and its night's published plan with everything the yard sees beside it (the
 * caller's shift acknowledgement, the night's reports and confirmations) in one round trip: the
 * Yard asks on every page load and refresh, and each extra query is a write to the database's
 * socket. The plan columns are null when none is published.
 */
const tonightQuery = (db: Db, name: string) =>
  db
    .select({
      // The depot's few columns the yard's answer and the zone guess use (not its jsonb settings).
      depot: { id: depots.id, name: depots.name, timezone: depots.timezone, billingStartDay: depots.billingStartDay },
      plan: planMeta,
      createdBy: creator.name,
      publishedBy: publisher.name,
      acknowledged: sql<boolean>`exists (
      select 1 from ${shiftAcknowledgements}
      where ${shiftAcknowledgements.userId} = ${sql.placeholder('userId')}
        and ${shiftAcknowledgements.depotId} = ${depotId} and ${shiftAcknowledgements.serviceDate} = ${serviceDate})`,
      reports: sql<ReportRow[]>`coalesce((
      select json_agg(json_build_object(
        'kind', r.kind, 'bus', r.bus, 'charger', r.charger, 'reason', r.reason, 'reportedAt', r.reported_at,
        'reportedBy', reporter.name, 'revisionVersion', revision.version) order by r.reported_at desc)
      from ${yardReports} r
      left join ${users} reporter on reporter.id = r.reported_by
      left join ${plans} revision on revision.id = r.revision_id
      where r.depot_id = ${depotId} and r.service_date = ${serviceDate}), '[]'::json)`,
      confirmations: sql<{ key: string; at: string; by: string | null; outcome: 'done' | 'missed' }[]>`coalesce((
      select json_agg(json_build_object('key', c.step_key, 'at', c.confirmed_at, 'by', confirmer.name, 'outcome', c.outcome))
      from ${yardConfirmations} c
      left join ${users} confirmer on confirmer.id = c.confirmed_by
      where c.depot_id = ${depotId} and c.service_date = ${serviceDate}), '[]'::json)`,
    })
    .from(depots)
    .leftJoin(
      plans,
      and(eq(plans.depotId, depots.id), eq(plans.serviceDate, serviceDate), eq(plans.state, 'published')),
    )
    .leftJoin(creator, eq(creator.id, plans.createdBy))
    .leftJoin(publisher, eq(publisher.id, plans.publishedBy))
    .where(and(eq(depots.id, depotId), eq(depots.organisationId, sql.placeholder('organisationId'))))
    .prepare(name);

/**
 * The caller's depot (null when it is not theirs) with the published plan of one of its nights
 * and the yard's side of it (plan null when none is published).
 */
export async function publishedNight(
  db: Db,
  night: { depotId: string; serviceDate: string },
  caller: { id: string; organisationId: string },
) {
  const [row] = await prepared(db, 'tonight_published_night', tonightQuery).execute({
    ...night,
    userId: caller.id,
    organisationId: caller.organisationId,
  });
  if (!row) return null;
  const found = row.plan
    ? {
        plan: row.plan,
        createdBy: row.createdBy,
        publishedBy: row.publishedBy,
        acknowledged: row.acknowledged,
        /** What the yard has said of the night so far, as read: equal stamps, equal steps. */
        stamp: JSON.stringify([row.reports, row.confirmations]),
        // JSON carries instants as text: the same instants as Dates, as the other queries give them.
        confirmations: new Map(
          row.confirmations.map((c) => [c.key, { at: new Date(c.at), by: c.by, outcome: c.outcome }]),
        ),
        reports: row.reports.map((r) => ({ ...r, reportedAt: new Date(r.reportedAt).toISOString() })),
      }
    : null;
  return { depot: row.depot, night: found };
}
