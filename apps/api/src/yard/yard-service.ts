import { aliasedTable, and, desc, eq, getTableColumns, inArray, sql } from 'drizzle-orm';
import { DateTime } from 'luxon';
import {
  planResultSchema, type PlanResult, type Tonight, type YardReport, type YardReportResult,
} from '@nightyard/contracts';
import { parseScenario, ReplanStateError, type Plan, type ScenarioInput } from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { prepared } from '../db/prepared';
import { chargers, depots, plans, shiftAcknowledgements, users, yardConfirmations, yardReports } from '../db/schema';
import { DomainError, conflict, notFound } from '../http/errors';
import type { AuthUser } from '../auth/auth-user';
import { depotOf } from '../depots/depot-access';
import type { Mailer } from '../mail/mailer';
import { nightMailLink } from '../mail/links';
import { planRevisedMail } from '../mail/templates';
import { nightStaff } from '../plans/night-staff';
import { comparePlans, planDetailOf } from '../plans/plans-service';
import { runInPool } from '../workers/pool';
import { yardSteps } from './yard-steps';
import { mergeReplan } from '../plans/night-in-progress';
import { nightOfDepot } from '../night/depot-night';

type PlanRow = typeof plans.$inferSelect;
const confirmer = aliasedTable(users, 'confirmer');
const LOCAL = "yyyy-MM-dd'T'HH:mm";

const horizonOf = (r: PlanResult) => ({ from: Date.parse(r.slots[0]!.start), to: Date.parse(r.slots.at(-1)!.start) + 15 * 60_000 });

const creator = aliasedTable(users, 'creator');
const publisher = aliasedTable(users, 'publisher');
const { scenario: _scenario, result: _result, replanState: _replanState, ...planMeta } = getTableColumns(plans);

const publishedPlanQuery = (db: Db, name: string) => db
  .select({ plan: planMeta, createdBy: creator.name, publishedBy: publisher.name })
  .from(plans)
  .leftJoin(creator, eq(creator.id, plans.createdBy))
  .leftJoin(publisher, eq(publisher.id, plans.publishedBy))
  .where(and(eq(plans.depotId, sql.placeholder('depotId')), eq(plans.serviceDate, sql.placeholder('serviceDate')), eq(plans.state, 'published')))
  .prepare(name);

/**
 * The published plan of tonight (the night in force, else the next one), as the night model says.
 * The row is read without its documents (they are read once the caller is known to own the depot).
 */
async function tonightsPlan(db: Db, depotId: string, now: Date) {
  const [depot] = await db.select({ id: depots.id, timezone: depots.timezone }).from(depots).where(eq(depots.id, depotId));
  if (!depot) return null;
  const { tonight } = await nightOfDepot(db, depot, now);
  const [row] = await prepared(db, 'tonight_published_plan', publishedPlanQuery).execute({ depotId, serviceDate: tonight.serviceDate });
  return row ?? null;
}

/** A published plan's result and scenario never change (a revision is a new plan): kept parsed, by plan id. */
const publishedDocuments = new Map<string, { result: PlanResult; scenario: ScenarioInput }>();

async function documentsOf(db: Db, planId: string) {
  const known = publishedDocuments.get(planId);
  if (known) return known;
  const [row] = await db.select({ result: plans.result, scenario: plans.scenario }).from(plans).where(eq(plans.id, planId));
  const documents = { result: planResultSchema.parse(row!.result), scenario: row!.scenario as unknown as ScenarioInput };
  publishedDocuments.set(planId, documents);
  if (publishedDocuments.size > 50) publishedDocuments.delete(publishedDocuments.keys().next().value!);
  return documents;
}

const confirmationsQuery = (db: Db, name: string) => db
  .select({ key: yardConfirmations.stepKey, at: yardConfirmations.confirmedAt, by: confirmer.name })
  .from(yardConfirmations)
  .leftJoin(confirmer, eq(confirmer.id, yardConfirmations.confirmedBy))
  .where(and(eq(yardConfirmations.depotId, sql.placeholder('depotId')), eq(yardConfirmations.serviceDate, sql.placeholder('serviceDate'))))
  .prepare(name);

async function confirmationsOf(db: Db, depotId: string, serviceDate: string) {
  const rows = await prepared(db, 'yard_confirmations_of_night', confirmationsQuery).execute({ depotId, serviceDate });
  return new Map(rows.map((r) => [r.key, { at: r.at, by: r.by }]));
}

/** Buses the yard confirmed on a charger (and not yet off it) at `cutAt`, per the plan followed. */
export async function confirmedPlugged(db: Db, depotId: string, serviceDate: string, followed: PlanResult, cutAt: Date): Promise<Record<string, string>> {
  const confirmations = await confirmationsOf(db, depotId, serviceDate);
  const plugged: Record<string, string> = {};
  for (const step of yardSteps(followed, cutAt, confirmations)) {
    const done = confirmations.has(step.key);
    if (step.action === 'connect' && done && Date.parse(step.at) <= cutAt.getTime()) plugged[step.bus] = step.charger;
    if (step.action === 'disconnect' && done && plugged[step.bus] === step.charger) delete plugged[step.bus];
  }
  return plugged;
}

const acknowledgementQuery = (db: Db, name: string) => db
  .select({ userId: shiftAcknowledgements.userId })
  .from(shiftAcknowledgements)
  .where(and(eq(shiftAcknowledgements.userId, sql.placeholder('userId')), eq(shiftAcknowledgements.depotId, sql.placeholder('depotId')),
    eq(shiftAcknowledgements.serviceDate, sql.placeholder('serviceDate'))))
  .prepare(name);

const reporter = aliasedTable(users, 'reporter');
const revisionPlan = aliasedTable(plans, 'revision');
const reportsQuery = (db: Db, name: string) => db
  .select({ r: yardReports, by: reporter.name, version: revisionPlan.version })
  .from(yardReports)
  .leftJoin(reporter, eq(reporter.id, yardReports.reportedBy))
  .leftJoin(revisionPlan, eq(revisionPlan.id, yardReports.revisionId))
  .where(and(eq(yardReports.depotId, sql.placeholder('depotId')), eq(yardReports.serviceDate, sql.placeholder('serviceDate'))))
  .orderBy(desc(yardReports.reportedAt))
  .prepare(name);

export async function tonight(db: Db, caller: AuthUser, depotId: string, now: Date): Promise<Tonight> {
  // The depot check and the plan's look-up at once: nothing is returned unless the depot is the caller's.
  const [depot, found] = await Promise.all([depotOf(db, caller, depotId), tonightsPlan(db, depotId, now)]);
  const base = { depot: { id: depot.id, name: depot.name, timezone: depot.timezone }, now: now.toISOString() };
  if (!found) return { ...base, plan: null, steps: [], acknowledged: false, reports: [] };
  const { plan, createdBy, publishedBy } = found;
  const night = { depotId, serviceDate: plan.serviceDate };
  const [documents, [ack], reports, confirmations] = await Promise.all([
    documentsOf(db, plan.id),
    prepared(db, 'shift_acknowledgement', acknowledgementQuery).execute({ ...night, userId: caller.id }),
    prepared(db, 'yard_reports_of_night', reportsQuery).execute(night),
    confirmationsOf(db, depotId, plan.serviceDate),
  ]);
  return {
    ...base,
    plan: planDetailOf(plan, createdBy, publishedBy, documents.result, documents.scenario),
    steps: yardSteps(documents.result, now, confirmations),
    acknowledged: Boolean(ack),
    reports: reports.map(({ r, by, version }) => ({
      kind: r.kind, bus: r.bus, charger: r.charger, reason: r.reason, reportedAt: r.reportedAt.toISOString(), reportedBy: by, revisionVersion: version,
    })),
  };
}

async function publishedPlanOf(db: Db, caller: AuthUser, planId: string): Promise<PlanRow> {
  const [plan] = await db.select().from(plans).where(and(eq(plans.id, planId), eq(plans.organisationId, caller.organisationId)));
  if (!plan) throw notFound('That plan');
  if (plan.state !== 'published') {
    const [current] = await db.select().from(plans).where(and(eq(plans.depotId, plan.depotId), eq(plans.serviceDate, plan.serviceDate), eq(plans.state, 'published')));
    throw conflict(current
      ? `This plan was replaced by version ${current.version}: reload to see the current steps`
      : 'This plan is no longer in force: reload');
  }
  return plan;
}

/** Confirms a step once: sending the same confirmation again returns the first one. */
export async function confirmStep(db: Db, caller: AuthUser, planId: string, key: string, now: Date) {
  const plan = await publishedPlanOf(db, caller, planId);
  const result = planResultSchema.parse(plan.result);
  if (!yardSteps(result, now, new Map()).some((s) => s.key === key)) throw notFound('That step (it is not in this plan)');
  await db
    .insert(yardConfirmations)
    .values({ organisationId: caller.organisationId, depotId: plan.depotId, serviceDate: plan.serviceDate, stepKey: key, planId, confirmedBy: caller.id, confirmedAt: now })
    .onConflictDoNothing();
  const done = (await confirmationsOf(db, plan.depotId, plan.serviceDate)).get(key)!;
  return { stepKey: key, confirmedAt: done.at.toISOString(), confirmedBy: done.by };
}

export async function acknowledgeShift(db: Db, caller: AuthUser, depotId: string, now: Date): Promise<void> {
  await depotOf(db, caller, depotId);
  const found = await tonightsPlan(db, depotId, now);
  if (!found) throw conflict('There is no plan for tonight to start a shift on');
  await db.insert(shiftAcknowledgements).values({ userId: caller.id, depotId, serviceDate: found.plan.serviceDate }).onConflictDoNothing();
}

/**
 * Applies what the yard reports to the rest of the night: the engine re-plans from now with the
 * energy delivered so far, the buses already connected kept where they are, and the problem
 * applied; the result is published at once as a revision and everyone on the night is told.
 */
export async function reportProblem(
  deps: { db: Db; mailer: Mailer; publicUrl: (p: string) => string; onPlanPublished?: (id: string) => void },
  caller: AuthUser, depotId: string, report: YardReport, now: Date,
): Promise<YardReportResult> {
  const { db } = deps;
  const depot = await depotOf(db, caller, depotId);
  const plan = await publishedPlanOf(db, caller, report.planId);
  if (plan.depotId !== depotId) throw notFound('That plan (it is for another depot)');
  const parsed = parseScenario(plan.scenario);
  if (!parsed.ok) throw new DomainError('internal', 'The plan\'s scenario is no longer valid');
  const scenario = parsed.scenario;
  const previous = planResultSchema.parse(plan.result);
  const zone = depot.timezone;
  const h = horizonOf(previous);
  if (now.getTime() >= h.to) throw conflict('This plan has ended: there is nothing left to re-plan');
  // Reported before the night has started: the whole night is planned again.
  const cutAt = new Date(Math.max(now.getTime(), h.from));

  const state = { outOfService: [...(plan.replanState?.outOfService ?? [])], lateArrivals: { ...(plan.replanState?.lateArrivals ?? {}) }, absent: [...(plan.replanState?.absent ?? [])] };
  const energyKwh: Record<string, number> = {};
  const busIds = new Set(scenario.buses.map((b) => b.id));
  if ('bus' in report && !busIds.has(report.bus)) {
    throw new DomainError('validation_failed', `Bus ${report.bus} is not in tonight's plan for ${depot.name}`, { bus: 'Not in tonight\'s plan' });
  }
  switch (report.kind) {
    case 'charger_out': {
      const [c] = await db.select().from(chargers).where(and(eq(chargers.depotId, depotId), eq(chargers.label, report.charger)));
      if (!c) throw new DomainError('validation_failed', `Charger ${report.charger} is not at ${depot.name}`, { charger: 'Not at this depot' });
      if (!state.outOfService.includes(report.charger)) state.outOfService.push(report.charger);
      break;
    }
    case 'bus_late': {
      const at = DateTime.fromISO(report.expectedAt, { zone });
      if (at.toMillis() <= cutAt.getTime()) throw new DomainError('validation_failed', 'The new arrival time must be later than now', { expectedAt: 'In the past' });
      state.lateArrivals[report.bus] = report.expectedAt;
      break;
    }
    case 'bus_absent':
      state.absent.push(report.bus);
      break;
    case 'soc_reading': {
      const bus = scenario.buses.find((b) => b.id === report.bus)!;
      energyKwh[report.bus] = Math.round((report.socPct / 100) * bus.usableKwh * 100) / 100;
      break;
    }
  }

  // Connected buses stay where they are, unless their charger has just failed.
  const plugged = await confirmedPlugged(db, depotId, plan.serviceDate, previous, cutAt);
  for (const [bus, charger] of Object.entries(plugged)) {
    if (state.outOfService.includes(charger) || state.absent.includes(bus) || state.lateArrivals[bus]) delete plugged[bus];
  }

  const absent = new Set(state.absent);
  const kept = { ...scenario, buses: scenario.buses.filter((b) => !absent.has(b.id)) };
  const previousPlan = {
    ...previous,
    sessions: previous.sessions.filter((s) => !absent.has(s.bus)),
    buses: previous.buses.filter((b) => !absent.has(b.id)),
  } as unknown as Plan;
  const cutoff = DateTime.fromJSDate(cutAt, { zone });
  const t0 = performance.now();
  let next;
  try {
    next = await runInPool({ kind: 'replan', scenario: kept, state: {
      now: cutoff.toFormat(LOCAL), energyKwh, plugged, outOfService: state.outOfService,
      lateArrivals: Object.fromEntries(Object.entries(state.lateArrivals).filter(([b]) => !absent.has(b))), previous: previousPlan,
    } });
  } catch (err) {
    if (err instanceof ReplanStateError) {
      throw new DomainError('validation_failed', 'The report does not fit tonight\'s plan', Object.fromEntries(err.problems.map((p) => [p.path, p.message])));
    }
    throw err;
  }
  const replanMs = Math.round(performance.now() - t0);

  // The night as a whole: what was kept before the cut-off, then the re-plan.
  const merged = mergeReplan(previous, next);
  const describe = {
    charger_out: () => `charger ${'charger' in report ? report.charger : ''} out of service${'reason' in report && report.reason ? ` (${report.reason})` : ''}`,
    bus_late: () => `bus ${'bus' in report ? report.bus : ''} late, expected ${'expectedAt' in report ? report.expectedAt.slice(11) : ''}`,
    bus_absent: () => `bus ${'bus' in report ? report.bus : ''} absent tonight`,
    soc_reading: () => `bus ${'bus' in report ? report.bus : ''} measured at ${'socPct' in report ? report.socPct : ''} %`,
  }[report.kind]();

  const revision = await db.transaction(async (tx) => {
    await tx.select({ id: depots.id }).from(depots).where(eq(depots.id, depotId)).for('update');
    const [current] = await tx.select().from(plans).where(and(eq(plans.depotId, depotId), eq(plans.serviceDate, plan.serviceDate), eq(plans.state, 'published')));
    if (current?.id !== plan.id) throw conflict(`The plan was revised meanwhile (version ${current?.version ?? '?'}): reload and report again if still needed`);
    const [last] = await tx.select({ v: sql<number>`max(${plans.version})::int` }).from(plans).where(and(eq(plans.depotId, depotId), eq(plans.serviceDate, plan.serviceDate)));
    await tx.update(plans).set({ state: 'superseded' }).where(eq(plans.id, plan.id));
    const [row] = await tx.insert(plans).values({
      organisationId: caller.organisationId, depotId, serviceDate: plan.serviceDate, version: (last?.v ?? 0) + 1, kind: 'revision',
      state: 'published', status: 'done', stage: 'Done', includesMidday: plan.includesMidday, scenario: plan.scenario,
      notes: [...plan.notes, `Revised at ${cutoff.toFormat('HH:mm')}: ${describe}.`], result: merged as unknown as Record<string, unknown>,
      replanState: state, createdBy: caller.id, publishedBy: caller.id, publishedAt: now,
    }).returning();
    if (report.kind === 'charger_out') {
      await tx.update(chargers).set({ status: 'out_of_service', statusReason: report.reason, statusSince: now })
        .where(and(eq(chargers.depotId, depotId), eq(chargers.label, report.charger)));
    }
    await tx.insert(yardReports).values({
      organisationId: caller.organisationId, depotId, serviceDate: plan.serviceDate, kind: report.kind,
      bus: 'bus' in report ? report.bus : null, charger: 'charger' in report ? report.charger : null,
      expectedAt: report.kind === 'bus_late' ? DateTime.fromISO(report.expectedAt, { zone }).toJSDate() : null,
      socPct: report.kind === 'soc_reading' ? report.socPct : null, reason: 'reason' in report ? report.reason || null : null,
      planId: plan.id, revisionId: row!.id, reportedBy: caller.id, reportedAt: now,
    });
    return row!;
  });

  const { moved } = await comparePlans(db, caller, revision.id, plan.id);
  deps.onPlanPublished?.(revision.id);
  const recipients = await nightStaff(db, caller.organisationId);
  let notified = 0;
  for (const r of recipients) {
    await deps.mailer.send(planRevisedMail({
      to: r.email, name: r.name, depot: depot.name, version: revision.version, at: cutoff.toFormat('HH:mm'), reportedBy: caller.name,
      what: describe, moved: moved.map((m) => `${m.bus}: ${m.after}`), link: nightMailLink(r.roles, { planId: revision.id, serviceDate: revision.serviceDate }, deps.publicUrl),
    })).then(() => notified++, () => undefined);
  }
  return {
    revision: {
      id: revision.id, depotId, serviceDate: revision.serviceDate, version: revision.version, kind: revision.kind, state: revision.state,
      status: revision.status, stage: revision.stage, error: null, includesMidday: revision.includesMidday,
      createdAt: revision.createdAt.toISOString(), createdBy: caller.name, publishedAt: now.toISOString(), publishedBy: caller.name,
      totalCost: next.cost.total, shortBuses: next.buses.filter((b) => b.shortfallKwh > 1e-6).length,
    },
    moved, replanMs, notified,
  };
}
