import { aliasedTable, and, eq, getTableColumns, sql } from 'drizzle-orm';
import { DateTime } from 'luxon';
import {
  planResultSchema,
  tonightSchema,
  type PlanDetail,
  type PlanResult,
  type Tonight,
  type TonightPlan,
  type YardReport,
  type YardReportResult,
  type YardStep,
  horizonOf,
  pastMidnightAt,
} from '@nightyard/contracts';
import {
  localToMillis,
  parseScenario,
  ReplanStateError,
  underTarget,
  type Plan,
  type ScenarioInput,
} from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { prepared } from '../db/prepared';
import { chargers, depots, plans, shiftAcknowledgements, users, yardConfirmations, yardReports } from '../db/schema';
import { recountFaults } from './fault-counts';
import { revisionEffect } from './revision-effect';
import { DomainError, conflict, notFound } from '../http/errors';
import type { AuthUser } from '../auth/auth-user';
import { assertMayOpenDepot, depotOf, type DepotViewer } from '../depots/depot-access';
import { guessDepot, rememberDepot } from '../depots/depot-guess';
import { markCheckedText } from '../http/checked-answer';
import type { Mailer } from '../mail/mailer';
import { nightMailLink } from '../mail/links';
import { planRevisedMail } from '../mail/templates';
import { nightStaff } from '../plans/night-staff';
import { comparePlans, planDetailOf } from '../plans/plans-service';
import { runInPool } from '../workers/pool';
import { LATE, OVERDUE_AFTER_MS, stepsDueSoon, yardSteps, type StepConfirmation, type StepContext } from './yard-steps';
import { cutOffTarget, targetsOf } from '../plans/plan-target';
import {
  mergeReplan,
  outFromReport,
  readingsAtCutOff,
  stopSessions,
  type SessionStop,
} from '../plans/night-in-progress';
import { nightOfDepot } from '../night/depot-night';
import { publishedNight } from './tonight-query';
import type { NotifiedCache } from '../db/notified-cache';

type PlanRow = typeof plans.$inferSelect;
const confirmer = aliasedTable(users, 'confirmer');
const LOCAL = "yyyy-MM-dd'T'HH:mm";

const creator = aliasedTable(users, 'creator');
const publisher = aliasedTable(users, 'publisher');
const { scenario: _scenario, result: _result, replanState: _replanState, ...planMeta } = getTableColumns(plans);

const publishedPlanQuery = (db: Db, name: string) =>
  db
    .select({ plan: planMeta, createdBy: creator.name, publishedBy: publisher.name })
    .from(plans)
    .leftJoin(creator, eq(creator.id, plans.createdBy))
    .leftJoin(publisher, eq(publisher.id, plans.publishedBy))
    .where(
      and(
        eq(plans.depotId, sql.placeholder('depotId')),
        eq(plans.serviceDate, sql.placeholder('serviceDate')),
        eq(plans.state, 'published'),
      ),
    )
    .prepare(name);

/**
 * The published plan of tonight (the night in force, else the next one), as the night model says.
 * The row is read without its documents (they are read once the caller is known to own the depot).
 */
async function tonightsPlan(db: Db, depotId: string, now: Date) {
  const [depot] = await db
    .select({ id: depots.id, timezone: depots.timezone })
    .from(depots)
    .where(eq(depots.id, depotId));
  if (!depot) return null;
  const { tonight } = await nightOfDepot(db, depot, now);
  const [row] = await prepared(db, 'tonight_published_plan', publishedPlanQuery).execute({
    depotId,
    serviceDate: tonight.serviceDate,
  });
  return row ?? null;
}

/** The re-plan's count of moved buses and its reasons (absent from results of older engines). */
function movedWhy(next: Pick<PlanResult, 'replan'>): { buses: number; reasons: string[] } | undefined {
  const moved = next.replan?.moved;
  return moved ? { buses: moved.buses.length, reasons: moved.reasons } : undefined;
}

/** A published plan's result and scenario never change (a revision is a new plan): kept parsed, by plan id. */
const publishedDocuments = new Map<string, { result: PlanResult; scenario: ScenarioInput }>();

async function documentsOf(db: Db, planId: string) {
  const known = publishedDocuments.get(planId);
  if (known) return known;
  const [row] = await db
    .select({ result: plans.result, scenario: plans.scenario })
    .from(plans)
    .where(eq(plans.id, planId));
  const documents = { result: planResultSchema.parse(row!.result), scenario: row!.scenario };
  publishedDocuments.set(planId, documents);
  if (publishedDocuments.size > 50) publishedDocuments.delete(publishedDocuments.keys().next().value!);
  return documents;
}

const confirmationsQuery = (db: Db, name: string) =>
  db
    .select({
      key: yardConfirmations.stepKey,
      at: yardConfirmations.confirmedAt,
      by: confirmer.name,
      outcome: yardConfirmations.outcome,
    })
    .from(yardConfirmations)
    .leftJoin(confirmer, eq(confirmer.id, yardConfirmations.confirmedBy))
    .where(
      and(
        eq(yardConfirmations.depotId, sql.placeholder('depotId')),
        eq(yardConfirmations.serviceDate, sql.placeholder('serviceDate')),
      ),
    )
    .prepare(name);

async function confirmationsOf(db: Db, depotId: string, serviceDate: string): Promise<Map<string, StepConfirmation>> {
  const rows = await prepared(db, 'yard_confirmations_of_night', confirmationsQuery).execute({ depotId, serviceDate });
  return new Map(rows.map((r) => [r.key, { at: r.at, by: r.by, outcome: r.outcome }]));
}

const chargersOutQuery = (db: Db, name: string) =>
  db
    .select({ charger: yardReports.charger, at: yardReports.reportedAt, reason: yardReports.reason })
    .from(yardReports)
    .where(
      and(
        eq(yardReports.depotId, sql.placeholder('depotId')),
        eq(yardReports.serviceDate, sql.placeholder('serviceDate')),
        eq(yardReports.kind, 'charger_out'),
      ),
    )
    .prepare(name);

/** What the steps of a night are derived from besides the plan and the confirmations. */
async function stepContextOf(db: Db, depotId: string, serviceDate: string, zone: string): Promise<StepContext> {
  const rows = await prepared(db, 'yard_chargers_out_of_night', chargersOutQuery).execute({ depotId, serviceDate });
  return {
    zone,
    chargersOut: rows.filter((r) => r.charger).map((r) => ({ charger: r.charger!, at: r.at, reason: r.reason })),
  };
}

/** Buses the yard confirmed on a charger (and not yet off it) at `cutAt`, per the plan followed. */
export async function confirmedPlugged(
  db: Db,
  depotId: string,
  serviceDate: string,
  followed: PlanResult,
  cutAt: Date,
): Promise<Record<string, string>> {
  const confirmations = await confirmationsOf(db, depotId, serviceDate);
  const plugged: Record<string, string> = {};
  for (const step of yardSteps(followed, cutAt, confirmations)) {
    const done = confirmations.get(step.key);
    // Counted at the time it really happened (the yard may give it when confirming late).
    if (!done || done.outcome === 'missed' || done.at.getTime() > cutAt.getTime()) continue;
    // A step of another bus on the charger was done: a bus taken as on it was unplugged before,
    // unconfirmed (one bus per charger). Else a charger whose unplug nobody confirmed stayed held
    // all night by a bus that needed nothing, while short buses waited for a charger.
    for (const [bus, charger] of Object.entries(plugged))
      if (charger === step.charger && bus !== step.bus) delete plugged[bus];
    if (step.action === 'connect') plugged[step.bus] = step.charger;
    if (step.action === 'disconnect' && plugged[step.bus] === step.charger) delete plugged[step.bus];
  }
  // A disconnect that did not happen: the bus is still on its charger.
  for (const [key, c] of confirmations) {
    if (c.outcome !== 'missed' || !key.startsWith('disconnect|') || key.endsWith(LATE)) continue;
    // Taken off it since (the late disconnect confirmed before the cut-off).
    const off = confirmations.get(key + LATE);
    if (off && off.outcome !== 'missed' && off.at.getTime() <= cutAt.getTime()) continue;
    const [, bus, charger] = key.split('|') as [string, string, string];
    const laterElsewhere = followed.sessions.some(
      (s) =>
        s.bus === bus &&
        s.charger !== charger &&
        Date.parse(s.start) <= cutAt.getTime() &&
        Date.parse(s.start) > c.at.getTime(),
    );
    if (!laterElsewhere && !Object.values(plugged).includes(charger)) plugged[bus] = charger;
  }
  return plugged;
}

/** What Tonight reads of a depot's night, kept per depot while the database reports its changes. */
export type YardNights = NotifiedCache<NonNullable<Awaited<ReturnType<typeof publishedNight>>>>;

/** The channel the triggers of the yard's tables notify with a depot's id (migration 0014_yard-changes). */
export const YARD_CHANGED = 'nightyard_yard_changed';

export async function tonight(
  db: Db,
  caller: AuthUser,
  depotId: string,
  now: Date,
  kept?: YardNights,
): Promise<Tonight> {
  // No round trip while the depot's night is kept (`kept`, told of every change by the database),
  // one when the depot's zone is known (the depot with the night's plan, checked against the zone
  // guessed), two on the first ask: the Yard and Tonight ask on every load and refresh. The
  // night's run times are remembered per depot and day.
  // Checked in memory before the one query: the caller's depots came with the caller.
  assertMayOpenDepot(caller, depotId);
  let zone = guessDepot(depotId)?.timezone ?? (await depotOf(db, caller, depotId)).timezone;
  for (;;) {
    const { tonight: night } = await nightOfDepot(db, { id: depotId, timezone: zone }, now);
    const key = `${night.serviceDate}|${caller.id}|${caller.organisationId}`;
    const load = () => publishedNight(db, { depotId, serviceDate: night.serviceDate }, caller);
    const answer = kept ? await kept.read(depotId, key, load) : await load();
    if (!answer) throw notFound('That depot');
    rememberDepot(answer.depot);
    if (answer.depot.timezone === zone) return tonightOf(db, answer.depot, answer.night, now);
    zone = answer.depot.timezone;
  }
}

type NightFound = NonNullable<Awaited<ReturnType<typeof publishedNight>>>['night'];

/**
 * Tonight's answers as last computed, per depot and acknowledgement. Steps depend on the instant
 * only through "overdue" (ten minutes past a step's time), so an answer holds, with only its
 * instant renewed, from when it was computed until the next upcoming step turns overdue, while
 * the plan, the depot's name and zone and what the yard has said (reports, confirmations) are
 * as they were. Each request still reads those from the database, so nothing here goes stale.
 */
const tonightAnswers = new Map<
  string,
  { key: string; fromMs: number; untilMs: number; answer: Tonight; text: { before: Buffer; after: Buffer } }
>();
const MAX_TONIGHT_ANSWERS = 200;

async function tonightOf(
  db: Db,
  depot: { id: string; name: string; timezone: string },
  found: NightFound,
  now: Date,
): Promise<Tonight> {
  const base = { depot: { id: depot.id, name: depot.name, timezone: depot.timezone }, now: now.toISOString() };
  if (!found) return { ...base, plan: null, steps: [], acknowledged: false, reports: [] };
  const slot = `${depot.id}|${found.acknowledged}`;
  const key = `${found.plan.id}|${depot.name}|${depot.timezone}|${found.stamp}`;
  const nowMs = now.getTime();
  const known = tonightAnswers.get(slot);
  if (known && known.key === key && known.fromMs <= nowMs && nowMs < known.untilMs) {
    // The remembered JSON text with the instant put in (an ISO instant needs no escaping).
    const { before, after } = known.text;
    return markCheckedText({ ...known.answer, now: base.now }, [before, Buffer.from(base.now, 'latin1'), after]);
  }

  const answer = tonightSchema.parse(await computeTonight(db, base, depot.timezone, found));
  const untilMs = Math.min(
    Infinity,
    ...answer.steps.filter((s) => s.status === 'upcoming').map((s) => Date.parse(s.at) + OVERDUE_AFTER_MS),
  );
  const json = JSON.stringify(answer);
  // The answer's first key after the depot (whose text, escaped, cannot hold this).
  const nowAt = json.indexOf(`"now":"${answer.now}"`) + '"now":"'.length;
  if (nowAt < '"now":"'.length) throw new Error("Tonight's answer has no instant");
  const text = { before: Buffer.from(json.slice(0, nowAt)), after: Buffer.from(json.slice(nowAt + answer.now.length)) };
  tonightAnswers.delete(slot);
  tonightAnswers.set(slot, { key, fromMs: nowMs, untilMs, answer, text });
  while (tonightAnswers.size > MAX_TONIGHT_ANSWERS) tonightAnswers.delete(tonightAnswers.keys().next().value!);
  return markCheckedText(answer, json);
}

async function computeTonight(
  db: Db,
  base: Pick<Tonight, 'depot' | 'now'>,
  zone: string,
  found: NonNullable<NightFound>,
): Promise<Tonight> {
  const { plan, createdBy, publishedBy, acknowledged, reports, confirmations } = found;
  const documents = await documentsOf(db, plan.id);
  // The chargers reported out tonight, from the same reports: the steps stop on them at that instant.
  const chargersOut = reports
    .filter((r) => r.kind === 'charger_out' && r.charger)
    .map((r) => ({ charger: r.charger!, at: new Date(r.reportedAt), reason: r.reason }))
    .sort((x, y) => x.at.getTime() - y.at.getTime());
  return {
    ...base,
    plan: tonightPlanOf(planDetailOf(plan, createdBy, publishedBy, documents.result, documents.scenario)),
    steps: yardSteps(documents.result, new Date(base.now), confirmations, { zone, chargersOut }),
    acknowledged,
    reports,
  };
}

/** The plan as the yard uses it (see tonightPlanSchema). */
function tonightPlanOf(detail: PlanDetail): TonightPlan {
  const { result, notes, ...facts } = detail;
  return {
    ...facts,
    horizon: result ? horizonOf(result) : null,
    sessions: (result?.sessions ?? []).map(({ kw: _kw, ...session }) => session),
    revisionNote: notes.findLast((n) => n.startsWith('Revised at ')) ?? null,
    moved: result?.replan?.moved
      ? { ...result.replan.moved, againstVersion: null }
      : result?.moved && result.keptFrom
        ? { ...result.moved, againstVersion: result.keptFrom.version }
        : null,
  };
}

async function publishedPlanOf(db: Db, caller: DepotViewer, planId: string): Promise<PlanRow> {
  const [plan] = await db
    .select()
    .from(plans)
    .where(and(eq(plans.id, planId), eq(plans.organisationId, caller.organisationId)));
  if (!plan) throw notFound('That plan');
  assertMayOpenDepot(caller, plan.depotId, 'That plan');
  if (plan.state !== 'published') {
    const [current] = await db
      .select()
      .from(plans)
      .where(
        and(eq(plans.depotId, plan.depotId), eq(plans.serviceDate, plan.serviceDate), eq(plans.state, 'published')),
      );
    throw conflict(
      current
        ? `This plan was replaced by version ${current.version}: reload to see the current steps`
        : 'This plan is no longer in force: reload',
    );
  }
  return plan;
}

/**
 * Confirms a step once: sending the same confirmation again returns the first one. `at` (depot
 * time HH:mm) is when it really happened, for a step confirmed late: the last such time up to now,
 * not before the night began.
 */
export async function confirmStep(db: Db, caller: AuthUser, planId: string, key: string, now: Date, at?: string) {
  const plan = await publishedPlanOf(db, caller, planId);
  const result = planResultSchema.parse(plan.result);
  const confirmations = await confirmationsOf(db, plan.depotId, plan.serviceDate);
  if (!yardSteps(result, now, confirmations).some((s) => s.key === key))
    throw notFound('That step (it is not in this plan)');
  const [depot] = await db.select({ timezone: depots.timezone }).from(depots).where(eq(depots.id, plan.depotId));
  const doneAt = at === undefined ? now : realTime(at, now, depot!.timezone, horizonOf(result)!.start);
  const existing = confirmations.get(key);
  if (existing?.outcome === 'missed')
    throw conflict('That step was reported as not done: the night was re-planned from it');
  await db
    .insert(yardConfirmations)
    .values({
      organisationId: caller.organisationId,
      depotId: plan.depotId,
      serviceDate: plan.serviceDate,
      stepKey: key,
      planId,
      confirmedBy: caller.id,
      confirmedAt: doneAt,
    })
    .onConflictDoNothing();
  const done = (await confirmationsOf(db, plan.depotId, plan.serviceDate)).get(key)!;
  return { stepKey: key, confirmedAt: done.at.toISOString(), confirmedBy: done.by };
}

/** "23:40" at the depot as the last such instant up to now; refused before the night's start. */
function realTime(at: string, now: Date, zone: string, nightStart: number): Date {
  const [hour, minute] = at.split(':').map(Number) as [number, number];
  const local = DateTime.fromJSDate(now, { zone });
  let t = local.set({ hour, minute, second: 0, millisecond: 0 });
  if (t.toMillis() > now.getTime() && t.toMillis() - now.getTime() < 60 * 60_000) {
    throw new DomainError(
      'validation_failed',
      `${at} is later than now (${local.toFormat('HH:mm')}): give the time it happened`,
      { at: 'Later than now' },
    );
  }
  if (t.toMillis() > now.getTime()) t = t.minus({ days: 1 });
  if (t.toMillis() < nightStart) {
    throw new DomainError(
      'validation_failed',
      `${at} is before tonight's plan began (${DateTime.fromMillis(nightStart, { zone }).toFormat('HH:mm')}): give the time it happened`,
      { at: 'Before the night began' },
    );
  }
  return t.toJSDate();
}

export async function acknowledgeShift(db: Db, caller: AuthUser, depotId: string, now: Date): Promise<void> {
  await depotOf(db, caller, depotId);
  const found = await tonightsPlan(db, depotId, now);
  if (!found) throw conflict('There is no plan for tonight to start a shift on');
  await db
    .insert(shiftAcknowledgements)
    .values({ userId: caller.id, depotId, serviceDate: found.plan.serviceDate })
    .onConflictDoNothing();
}

export interface PublishDeps {
  db: Db;
  mailer: Mailer;
  publicUrl: (p: string) => string;
  onPlanPublished?: (id: string) => void;
}

/**
 * What a report or a step that did not happen changes in the night, before the re-plan. A
 * charger's state of charge reading comes with a reason in words (what it read and when).
 */
type Change =
  | YardReport
  | { kind: 'step_missed'; planId: string; step: YardStep }
  | (Extract<YardReport, { kind: 'soc_reading' }> & { reason: string });

/** Who reports: a signed-in person, or a charger (no person; `name` says which, as in "charger D2"). */
export type Reporter = Pick<AuthUser, 'organisationId' | 'name' | 'roles' | 'depotIds'> & { id: string | null };

/**
 * Applies what the yard reports to the rest of the night: the engine re-plans from now with the
 * energy delivered so far, the buses already connected kept where they are, and the problem
 * applied; the result is published at once as a revision and everyone on the night is told.
 *
 * The cut-off is the instant of the report, not the end of its slot: a charger reported out at
 * 23:07 charges nobody after 23:07 (see `stopSessions` for why the current slot's remainder is
 * no-charge rather than a partial first slot of the re-plan).
 */
export function reportProblem(
  deps: PublishDeps,
  caller: AuthUser,
  depotId: string,
  report: YardReport,
  now: Date,
): Promise<YardReportResult> {
  return replanAndPublish(deps, caller, depotId, report, now);
}

/**
 * A step that did not happen, re-planned like a report: a connect that did not happen leaves the
 * bus unplugged (nothing was delivered on that session); a disconnect that did not happen leaves
 * the bus on its charger. The step is marked `missed` in the same transaction as the revision.
 */
export async function missedStep(
  deps: PublishDeps,
  caller: AuthUser,
  depotId: string,
  planId: string,
  key: string,
  now: Date,
): Promise<YardReportResult> {
  const plan = await publishedPlanOf(deps.db, caller, planId);
  if (plan.depotId !== depotId) throw notFound('That plan (it is for another depot)');
  const confirmations = await confirmationsOf(deps.db, depotId, plan.serviceDate);
  const step = yardSteps(planResultSchema.parse(plan.result), now, confirmations).find((s) => s.key === key);
  if (!step) throw notFound('That step (it is not in this plan)');
  if (step.status === 'done') throw conflict('That step is already confirmed as done');
  if (step.status === 'missed') throw conflict('That step is already reported as not done');
  if (key.endsWith(LATE))
    throw conflict('The bus is already taken as still on the charger: confirm it when it is unplugged');
  if (Date.parse(step.at) > now.getTime()) {
    throw new DomainError(
      'validation_failed',
      'That step is not due yet: only a step whose time has come can be reported as not done',
      { stepKey: 'Not due yet' },
    );
  }
  return replanAndPublish(deps, caller, depotId, { kind: 'step_missed', planId, step }, now);
}

export async function replanAndPublish(
  deps: PublishDeps,
  caller: Reporter,
  depotId: string,
  report: Change,
  now: Date,
): Promise<YardReportResult> {
  const { db } = deps;
  const depot = await depotOf(db, caller, depotId);
  const plan = await publishedPlanOf(db, caller, report.planId);
  if (plan.depotId !== depotId) throw notFound('That plan (it is for another depot)');
  const parsed = parseScenario(plan.scenario);
  if (!parsed.ok) throw new DomainError('internal', "The plan's scenario is no longer valid");
  const scenario = parsed.scenario;
  const followed = planResultSchema.parse(plan.result);
  const zone = depot.timezone;
  const h = horizonOf(followed)!;
  if (now.getTime() >= h.end) throw conflict('This plan has ended: there is nothing left to re-plan');
  // Reported before the night has started: the whole night is planned again.
  const cutAt = new Date(Math.max(now.getTime(), h.start));

  const state = {
    outOfService: [...(plan.replanState?.outOfService ?? [])],
    lateArrivals: { ...(plan.replanState?.lateArrivals ?? {}) },
    absent: [...(plan.replanState?.absent ?? [])],
    socReadings: { ...(plan.replanState?.socReadings ?? {}) },
  };
  const energyKwh: Record<string, number> = {};
  const stops: SessionStop[] = [];
  const extraPlugged: Record<string, string> = {};
  const busIds = new Set(scenario.buses.map((b) => b.id));
  if ('bus' in report && !busIds.has(report.bus)) {
    throw new DomainError('validation_failed', `Bus ${report.bus} is not in tonight's plan for ${depot.name}`, {
      bus: "Not in tonight's plan",
    });
  }
  switch (report.kind) {
    case 'charger_out': {
      const [c] = await db
        .select()
        .from(chargers)
        .where(and(eq(chargers.depotId, depotId), eq(chargers.label, report.charger)));
      if (!c)
        throw new DomainError('validation_failed', `Charger ${report.charger} is not at ${depot.name}`, {
          charger: 'Not at this depot',
        });
      // Reported again tonight: the plan already keeps off it, and a revision would only send
      // everyone the same night again and move the Depot's "out of service since" time.
      if (state.outOfService.includes(report.charger))
        throw conflict(`Charger ${report.charger} is already out of service tonight: the plan keeps off it`);
      state.outOfService.push(report.charger);
      // Nothing charges on it from this instant, the rest of the current slot included.
      stops.push({ charger: report.charger, at: cutAt });
      break;
    }
    case 'bus_late': {
      const at = DateTime.fromISO(report.expectedAt, { zone });
      if (at.toMillis() <= cutAt.getTime())
        throw new DomainError('validation_failed', 'The new arrival time must be later than now', {
          expectedAt: 'In the past',
        });
      // Later than its next pull-out is not late but gone: said in the depot's time, with the fix.
      const stay = scenario.buses
        .find((b) => b.id === report.bus)!
        .stays.find((st) => localToMillis(st.depart, zone)! > cutAt.getTime());
      if (stay && at.toMillis() >= localToMillis(stay.depart, zone)!)
        throw new DomainError(
          'validation_failed',
          `Bus ${report.bus} pulls out at ${stay.depart.slice(11)}: give a time before then` +
            // The hint helps in the evening only: past midnight the morning is today's.
            (pastMidnightAt(cutAt, zone) ? '' : ' (after midnight means tomorrow morning)'),
          { expectedAt: `Before its ${stay.depart.slice(11)} pull-out` },
        );
      state.lateArrivals[report.bus] = report.expectedAt;
      break;
    }
    case 'bus_absent':
      state.absent.push(report.bus);
      break;
    case 'soc_reading': {
      const bus = scenario.buses.find((b) => b.id === report.bus)!;
      energyKwh[report.bus] = Math.round((report.socPct / 100) * bus.usableKwh * 100) / 100;
      state.socReadings[report.bus] = { kwh: energyKwh[report.bus]!, at: cutAt.toISOString() };
      break;
    }
    case 'step_missed': {
      const session = followed.sessions.find(
        (s) =>
          s.bus === report.step.bus &&
          s.charger === report.step.charger &&
          Date.parse(report.step.action === 'connect' ? s.start : s.end) === Date.parse(report.step.at),
      );
      // A connect that did not happen: nothing was delivered on that session, and the bus is not on the charger.
      if (report.step.action === 'connect' && session)
        stops.push({ charger: session.charger, bus: session.bus, start: session.start, at: new Date(session.start) });
      // A disconnect that did not happen: the bus is still on its charger.
      if (report.step.action === 'disconnect') extraPlugged[report.step.bus] = report.step.charger;
      break;
    }
  }

  // Connected buses stay where they are, unless their charger has just failed.
  const plugged = { ...(await confirmedPlugged(db, depotId, plan.serviceDate, followed, cutAt)), ...extraPlugged };
  for (const [bus, charger] of Object.entries(plugged)) {
    const stopped = stops.some((x) => x.charger === charger && (x.bus === undefined || x.bus === bus));
    if (stopped || state.outOfService.includes(charger) || state.absent.includes(bus) || state.lateArrivals[bus])
      delete plugged[bus];
  }
  for (const [bus, charger] of Object.entries(extraPlugged)) {
    const other = Object.entries(plugged).find(([b, c]) => c === charger && b !== bus);
    if (other) {
      throw new DomainError(
        'validation_failed',
        `Bus ${other[0]} is confirmed on charger ${charger}: bus ${bus} cannot still be on it`,
        { stepKey: 'Charger taken' },
      );
    }
  }

  const previous = stopSessions(followed, stops, zone, scenario.slotMinutes);
  // Readings taken earlier tonight stand: the energy at the cut-off is the reading plus what was
  // delivered since, not the scenario's estimate (a bus that has left since drops its reading).
  // This report's own reading, or a bus reported absent, comes first.
  const earlier = Object.fromEntries(
    Object.entries(state.socReadings).filter(([bus]) => !(bus in energyKwh) && !state.absent.includes(bus)),
  );
  const since = readingsAtCutOff(scenario, previous, earlier, cutAt.getTime(), zone);
  for (const bus of Object.keys(earlier)) if (!(bus in since.standing)) delete state.socReadings[bus];
  Object.assign(energyKwh, since.energyKwh);
  const absent = new Set(state.absent);
  const kept = { ...scenario, buses: scenario.buses.filter((b) => !absent.has(b.id)) };
  const previousPlan = {
    ...previous,
    sessions: previous.sessions.filter((s) => !absent.has(s.bus)),
    buses: previous.buses.filter((b) => !absent.has(b.id)),
  } as Plan; // the stored result is the engine's whole plan (see planFromCutOff)
  const cutoff = DateTime.fromJSDate(cutAt, { zone });
  // The time the revision is named by: the report's. Once the night is under way it is the
  // cut-off; a report before the night begins re-plans from the night's start, but was made now.
  const revisedAt = DateTime.fromJSDate(now, { zone }).toFormat('HH:mm');
  // The night stays under the demand target its plan was made under (the period's target is
  // worked out again from the revision for the nights after it).
  const targets = targetsOf(followed);
  const floor = targets ? underTarget(kept, targets) : kept;
  const t0 = performance.now();
  let next;
  try {
    next = await runInPool({
      kind: 'replan',
      scenario: floor,
      state: {
        now: cutoff.toFormat(LOCAL),
        energyKwh,
        plugged,
        outOfService: state.outOfService,
        lateArrivals: Object.fromEntries(Object.entries(state.lateArrivals).filter(([b]) => !absent.has(b))),
        previous: previousPlan,
      },
    });
  } catch (err) {
    if (err instanceof ReplanStateError) {
      throw new DomainError(
        'validation_failed',
        "The report does not fit tonight's plan",
        Object.fromEntries(err.problems.map((p) => [p.path, p.message])),
      );
    }
    throw err;
  }
  const replanMs = Math.round(performance.now() - t0);
  const describe =
    report.kind === 'step_missed'
      ? `"${report.step.text}" (due ${DateTime.fromISO(report.step.at, { zone }).toFormat('HH:mm')}) did not happen`
      : {
          charger_out: () =>
            `charger ${'charger' in report ? report.charger : ''} out of service${'reason' in report && report.reason ? ` (${report.reason})` : ''}`,
          bus_late: () =>
            `bus ${'bus' in report ? report.bus : ''} late, expected ${'expectedAt' in report ? report.expectedAt.slice(11) : ''}`,
          bus_absent: () => `bus ${'bus' in report ? report.bus : ''} absent tonight`,
          soc_reading: () =>
            `bus ${'bus' in report ? report.bus : ''} measured at ${'socPct' in report ? report.socPct : ''} %`,
        }[report.kind]();
  // The revision's reasons are this report's: the plan followed already allowed for earlier ones
  // (the engine names every late bus and every reading the night has had).
  if (next.replan.moved)
    next.replan.moved = recountFaults(
      next.replan.moved,
      followed,
      state.outOfService,
      'bus' in report && (report.kind === 'bus_late' || report.kind === 'bus_absent') ? [report.bus] : [],
      cutAt.getTime(),
      report.kind === 'charger_out' ? null : describe,
    );

  // The night as a whole: what was kept before the cut-off, then the re-plan.
  const replanned = mergeReplan(previous, next, floor);
  const whole = report.kind === 'charger_out' ? outFromReport(replanned, report.charger, cutAt, zone) : replanned;
  const merged =
    targets && followed.target
      ? {
          ...whole,
          target: cutOffTarget(floor, whole.slots, targets, {
            binding: followed.target.binding,
            impossible: followed.target.impossible,
          }),
        }
      : whole;

  const revision = await db.transaction(async (tx) => {
    await tx.select({ id: depots.id }).from(depots).where(eq(depots.id, depotId)).for('update');
    const [current] = await tx
      .select()
      .from(plans)
      .where(and(eq(plans.depotId, depotId), eq(plans.serviceDate, plan.serviceDate), eq(plans.state, 'published')));
    if (current?.id !== plan.id)
      throw conflict(
        `The plan was revised meanwhile (version ${current?.version ?? '?'}): reload and report again if still needed`,
      );
    const [last] = await tx
      .select({ v: sql<number>`max(${plans.version})::int` })
      .from(plans)
      .where(and(eq(plans.depotId, depotId), eq(plans.serviceDate, plan.serviceDate)));
    await tx.update(plans).set({ state: 'superseded' }).where(eq(plans.id, plan.id));
    const [row] = await tx
      .insert(plans)
      .values({
        organisationId: caller.organisationId,
        depotId,
        serviceDate: plan.serviceDate,
        version: (last?.v ?? 0) + 1,
        kind: 'revision',
        state: 'published',
        status: 'done',
        stage: 'Done',
        includesMidday: plan.includesMidday,
        scenario: plan.scenario,
        notes: [...plan.notes, `Revised at ${revisedAt}: ${describe}.`],
        result: merged,
        replanState: state,
        createdBy: caller.id,
        createdAt: now,
        publishedBy: caller.id,
        publishedAt: now,
      })
      .returning();
    if (report.kind === 'charger_out') {
      await tx
        .update(chargers)
        .set({ status: 'out_of_service', statusReason: report.reason, statusSince: now, outFrom: null, outUntil: null })
        .where(and(eq(chargers.depotId, depotId), eq(chargers.label, report.charger)));
    }
    if (report.kind === 'step_missed') {
      const inserted = await tx
        .insert(yardConfirmations)
        .values({
          organisationId: caller.organisationId,
          depotId,
          serviceDate: plan.serviceDate,
          stepKey: report.step.key,
          planId: plan.id,
          confirmedBy: caller.id,
          confirmedAt: now,
          outcome: 'missed',
        })
        .onConflictDoNothing()
        .returning({ id: yardConfirmations.id });
      if (!inserted.length) throw conflict('That step was confirmed meanwhile: reload');
    }
    await tx.insert(yardReports).values({
      organisationId: caller.organisationId,
      depotId,
      serviceDate: plan.serviceDate,
      kind: report.kind,
      bus: report.kind === 'step_missed' ? report.step.bus : 'bus' in report ? report.bus : null,
      charger: report.kind === 'step_missed' ? report.step.charger : 'charger' in report ? report.charger : null,
      expectedAt: report.kind === 'bus_late' ? DateTime.fromISO(report.expectedAt, { zone }).toJSDate() : null,
      socPct: report.kind === 'soc_reading' ? report.socPct : null,
      reason:
        report.kind === 'step_missed'
          ? `${report.step.text} (due ${DateTime.fromISO(report.step.at, { zone }).toFormat('HH:mm')}) did not happen`
          : 'reason' in report
            ? report.reason || null
            : null,
      planId: plan.id,
      revisionId: row!.id,
      reportedBy: caller.id,
      reportedAt: now,
    });
    return row!;
  });

  const { moved } = await comparePlans(db, caller, revision.id, plan.id);
  deps.onPlanPublished?.(revision.id);
  // The e-mail names the steps exactly as the yard page does: the same derivation, at the same instant.
  const [confirmations, context] = await Promise.all([
    confirmationsOf(db, depotId, plan.serviceDate),
    stepContextOf(db, depotId, plan.serviceDate, zone),
  ]);
  const soon = stepsDueSoon(yardSteps(merged, now, confirmations, context), now).map(
    (s) => `${DateTime.fromISO(s.at, { zone }).toFormat('HH:mm')} ${s.text}`,
  );
  const effect = revisionEffect(followed, merged, scenario.tariff.currency);
  const recipients = await nightStaff(db, caller.organisationId, depotId);
  let notified = 0;
  for (const r of recipients) {
    await deps.mailer
      .send(
        planRevisedMail({
          to: r.email,
          name: r.name,
          depot: depot.name,
          version: revision.version,
          at: revisedAt,
          reportedBy: caller.name,
          what: describe,
          // In the words the yard's answer uses: "Bus 211: D1 05:00-05:45 → C4 05:00-06:00".
          moved: moved.map((m) => `Bus ${m.bus}: ${m.before} → ${m.after}`),
          steps: soon,
          why: movedWhy(next),
          effect: effect.lines,
          link: nightMailLink(r.roles, { planId: revision.id, serviceDate: revision.serviceDate }, deps.publicUrl),
        }),
      )
      .then(
        () => notified++,
        () => undefined,
      );
  }
  return {
    revision: {
      id: revision.id,
      depotId,
      serviceDate: revision.serviceDate,
      version: revision.version,
      kind: revision.kind,
      state: revision.state,
      status: revision.status,
      stage: revision.stage,
      error: null,
      includesMidday: revision.includesMidday,
      createdAt: revision.createdAt.toISOString(),
      createdBy: caller.name,
      publishedAt: now.toISOString(),
      publishedBy: caller.name,
      totalCost: merged.cost.total,
      shortBuses: merged.buses.filter((b) => b.shortfallKwh > 1e-6).length,
    },
    moved,
    replanMs,
    notified,
    effect,
  };
}
