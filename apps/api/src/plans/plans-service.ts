import { aliasedTable, and, desc, eq, sql } from 'drizzle-orm';
import { DateTime } from 'luxon';
import {
  baselineName,
  footedEnergyDemand,
  horizonOf,
  longDate,
  planResultSchema,
  type PlanComparison,
  type PlanDetail,
  type PlanResult,
  type PlanSummary,
} from '@nightyard/contracts';
import { localToMillis, parseScenario, type Scenario, type ScenarioInput } from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { depots, plans, users } from '../db/schema';
import { DomainError, conflict, notFound } from '../http/errors';
import { MAX_WHAT_IF_BUS_SLOTS, formatCount } from '../http/limits';
import type { AuthUser } from '../auth/auth-user';
import { assertMayOpenDepot, depotOf, type DepotViewer } from '../depots/depot-access';
import type { JobQueue } from '../jobs/job-queue';
import type { Mailer } from '../mail/mailer';
import { nightMailLink } from '../mail/links';
import { planPublishedMail } from '../mail/templates';
import { buildNightScenario, refusePublishingInsideANight } from './night-scenario';
import { nightStaff } from './night-staff';
import { cutOffAt, type PlanFrom } from './night-in-progress';
import { movedBetween } from './plan-compare';
import { versionInputChanges } from './version-inputs';
import { runsChanged } from './runs-changed';
import { confirmedPlugged } from '../yard/yard-service';

type PlanRow = typeof plans.$inferSelect;
const creator = aliasedTable(users, 'creator');
const publisher = aliasedTable(users, 'publisher');

const resultOf = (row: PlanRow): PlanResult | null => (row.result ? planResultSchema.parse(row.result) : null);

/** A plan row without its large documents (the engine's input and result). */
export type PlanMeta = Omit<PlanRow, 'scenario' | 'result' | 'replanState'>;

function toSummary(
  row: PlanMeta,
  createdBy: string | null,
  publishedBy: string | null,
  result: PlanResult | null,
): PlanSummary {
  return {
    id: row.id,
    depotId: row.depotId,
    serviceDate: row.serviceDate,
    version: row.version,
    kind: row.kind,
    state: row.state,
    status: row.status,
    stage: row.stage,
    error: row.error,
    includesMidday: row.includesMidday,
    createdAt: row.createdAt.toISOString(),
    createdBy,
    publishedAt: row.publishedAt?.toISOString() ?? null,
    publishedBy,
    totalCost: result?.cost.total ?? null,
    shortBuses: result ? result.buses.filter((b) => b.shortfallKwh > 1e-6).length : null,
  };
}

async function loadPlan(db: Db, caller: DepotViewer, id: string) {
  const [row] = await db
    .select({ plan: plans, createdBy: creator.name, publishedBy: publisher.name })
    .from(plans)
    .leftJoin(creator, eq(creator.id, plans.createdBy))
    .leftJoin(publisher, eq(publisher.id, plans.publishedBy))
    .where(and(eq(plans.id, id), eq(plans.organisationId, caller.organisationId)));
  if (!row) throw notFound('That plan');
  // A plan of a depot the caller may not see does not exist for them either.
  assertMayOpenDepot(caller, row.plan.depotId, 'That plan');
  return row;
}

/** Stores a new draft version for the night and queues the engine run. */
export async function storeDraft(
  db: Db,
  jobs: JobQueue,
  caller: AuthUser,
  depotId: string,
  serviceDate: string,
  values: {
    kind: PlanRow['kind'];
    includesMidday: boolean;
    scenario: ScenarioInput;
    notes: string[];
    planFrom?: PlanFrom;
    /** When it was asked for, by the clock service (not the database's own clock). */
    createdAt: Date;
  },
): Promise<PlanSummary> {
  const row = await db.transaction(async (tx) => {
    // Versions count up per night; the depot row lock keeps two requests from taking one number.
    await tx.select({ id: depots.id }).from(depots).where(eq(depots.id, depotId)).for('update');
    const [last] = await tx
      .select({ v: sql<number>`coalesce(max(${plans.version}), 0)::int` })
      .from(plans)
      .where(and(eq(plans.depotId, depotId), eq(plans.serviceDate, serviceDate)));
    const [created] = await tx
      .insert(plans)
      .values({
        organisationId: caller.organisationId,
        depotId,
        serviceDate,
        version: (last?.v ?? 0) + 1,
        kind: values.kind,
        includesMidday: values.includesMidday,
        scenario: values.scenario,
        notes: values.notes,
        createdBy: caller.id,
        createdAt: values.createdAt,
        ...(values.planFrom ? { replanState: values.planFrom } : {}),
      })
      .returning();
    return created!;
  });
  await jobs.enqueuePlan(row.id);
  return toSummary(row, caller.name, null, resultOf(row));
}

/**
 * Queues a plan for the night after `serviceDate`. A night already under way is planned from now
 * on: what the published plan said before now stands (or, with none, the buses as they came in),
 * buses the yard confirmed on a charger stay there, and the notes say so.
 */
export async function generatePlan(
  db: Db,
  jobs: JobQueue,
  caller: AuthUser,
  depotId: string,
  serviceDate: string,
  includeMidday: boolean,
  now: Date,
): Promise<PlanSummary> {
  const night = await prepareNight(db, caller, depotId, serviceDate, includeMidday, now);
  return storeDraft(db, jobs, caller, depotId, serviceDate, { kind: 'generated', ...night, createdAt: now });
}

/** A night's scenario from the depot's data as it is now, with where a night under way starts. */
export async function prepareNight(
  db: Db,
  caller: AuthUser,
  depotId: string,
  serviceDate: string,
  includeMidday: boolean,
  now: Date,
): Promise<{ includesMidday: boolean; scenario: ScenarioInput; notes: string[]; planFrom?: PlanFrom }> {
  const { scenario, notes } = await buildNightScenario(db, caller, depotId, serviceDate, includeMidday);
  const parsed = parseScenario(scenario);
  if (!parsed.ok) {
    throw new DomainError(
      'validation_failed',
      "The day's data does not make a plannable night",
      Object.fromEntries(parsed.problems.map((p) => [p.path, p.message])),
    );
  }
  const from = cutOffAt(parsed.scenario, now);
  // The engine plans in whole slots from the night's start: from the first boundary at or after the cut-off.
  const startsAt = from ? firstSlotAt(parsed.scenario, from) : null;
  let planFrom: PlanFrom | undefined;
  if (from) {
    const [followed] = await db
      .select()
      .from(plans)
      .where(and(eq(plans.depotId, depotId), eq(plans.serviceDate, serviceDate), eq(plans.state, 'published')));
    const result = followed ? resultOf(followed) : null;
    const plugged = followed && result ? await confirmedPlugged(db, depotId, serviceDate, result, now) : {};
    const socReadings = followed?.replanState?.socReadings;
    planFrom = { from, previousPlanId: result ? followed!.id : null, plugged, ...(socReadings ? { socReadings } : {}) };
    notes.unshift(
      result
        ? `The night was under way at ${from.slice(11)}: this plan starts at ${startsAt}; before it, version ${followed!.version} stands as published${Object.keys(plugged).length ? `, and the ${Object.keys(plugged).length} buses confirmed on a charger stay there` : ''}.`
        : `The night was under way at ${from.slice(11)} with no published plan: this plan starts at ${startsAt} and takes each bus as it arrived (no charging before then).`,
    );
  }
  return { includesMidday: includeMidday, scenario, notes, ...(planFrom ? { planFrom } : {}) };
}

/** Local HH:mm of the first slot boundary of a scenario at or after a local time (YYYY-MM-DDTHH:mm). */
function firstSlotAt(scenario: Scenario, local: string): string {
  const start = localToMillis(scenario.start, scenario.timezone)!;
  const slotMs = scenario.slotMinutes * 60_000;
  const at = localToMillis(local, scenario.timezone)!;
  const first = start + Math.ceil((at - start) / slotMs) * slotMs;
  return DateTime.fromMillis(first, { zone: scenario.timezone }).toFormat('HH:mm');
}

/** The engine's work grows with buses x slots: a what-if larger than the limit is refused before it is queued. */
function refuseLargeScenario(scenario: Scenario): void {
  const horizonMs =
    (localToMillis(scenario.end, scenario.timezone) ?? 0) - (localToMillis(scenario.start, scenario.timezone) ?? 0);
  const slots = Math.round(horizonMs / (scenario.slotMinutes * 60_000));
  const size = scenario.buses.length * slots;
  if (size > MAX_WHAT_IF_BUS_SLOTS) {
    throw new DomainError(
      'payload_too_large',
      `The scenario has ${formatCount(scenario.buses.length)} buses x ${formatCount(slots)} slots = ${formatCount(size)}; at most ${formatCount(MAX_WHAT_IF_BUS_SLOTS)} bus-slots are planned at once: use longer slots, a shorter horizon or fewer buses`,
      { buses: `Buses x slots at most ${formatCount(MAX_WHAT_IF_BUS_SLOTS)}` },
    );
  }
}

/** A what-if draft from an uploaded scenario file; its night is the day its horizon starts. */
export async function createWhatIf(
  db: Db,
  jobs: JobQueue,
  caller: AuthUser,
  depotId: string,
  file: unknown,
  now: Date,
): Promise<PlanSummary> {
  const depot = await depotOf(db, caller, depotId);
  const parsed = parseScenario(file);
  if (!parsed.ok) {
    throw new DomainError(
      'validation_failed',
      `The scenario file has ${parsed.problems.length} problem(s); nothing was saved`,
      Object.fromEntries(parsed.problems.map((p) => [p.path, p.message])),
    );
  }
  refuseLargeScenario(parsed.scenario);
  if (parsed.scenario.timezone !== depot.timezone) {
    throw new DomainError(
      'validation_failed',
      `The file is for ${parsed.scenario.timezone}; ${depot.name} is in ${depot.timezone}`,
      { timezone: `Must be ${depot.timezone}` },
    );
  }
  const serviceDate = parsed.scenario.start.slice(0, 10);
  return storeDraft(db, jobs, caller, depotId, serviceDate, {
    kind: 'what-if',
    createdAt: now,
    includesMidday: true,
    scenario: file as ScenarioInput,
    notes: [
      'What-if: a study from an uploaded scenario file. It is never published; adopt it to make a draft from the depot as it is now.',
    ],
  });
}

export async function listPlans(
  db: Db,
  caller: AuthUser,
  depotId: string,
  serviceDate?: string,
): Promise<PlanSummary[]> {
  await depotOf(db, caller, depotId);
  const rows = await db
    .select({ plan: plans, createdBy: creator.name, publishedBy: publisher.name })
    .from(plans)
    .leftJoin(creator, eq(creator.id, plans.createdBy))
    .leftJoin(publisher, eq(publisher.id, plans.publishedBy))
    .where(and(eq(plans.depotId, depotId), serviceDate ? eq(plans.serviceDate, serviceDate) : undefined))
    .orderBy(desc(plans.serviceDate), desc(plans.version))
    .limit(200);
  return rows.map((r) => toSummary(r.plan, r.createdBy, r.publishedBy, resultOf(r.plan)));
}

export async function getPlan(db: Db, caller: AuthUser, id: string): Promise<PlanDetail> {
  const { plan, createdBy, publishedBy } = await loadPlan(db, caller, id);
  return {
    ...planDetailOf(plan, createdBy, publishedBy, resultOf(plan), plan.scenario, plan.replanState?.from ?? null),
    runsChanged: await runsChangedOf(db, caller, plan),
  };
}

/**
 * The buses whose runs changed since a plan of the night was made (see `runsChanged`): a colder
 * forecast or a run moved after publishing left "Every bus leaves with the energy its runs need"
 * standing over a plan that no longer serves them. Superseded versions and what-ifs are history
 * and studies; a night whose data no longer builds says nothing here (generating says why).
 */
async function runsChangedOf(db: Db, caller: AuthUser, plan: PlanRow) {
  if (plan.kind === 'what-if' || plan.state === 'superseded' || plan.status !== 'done') return [];
  const planned = parseScenario(plan.scenario);
  if (!planned.ok) return [];
  try {
    const built = await buildNightScenario(db, caller, plan.depotId, plan.serviceDate, plan.includesMidday);
    const now = parseScenario(built.scenario);
    return now.ok ? runsChanged(planned.scenario, now.scenario, plan.replanState?.absent ?? []) : [];
  } catch (err) {
    if (err instanceof DomainError) return [];
    throw err;
  }
}

/** A plan with its result, from a row and its documents already read (and the result parsed). */
export function planDetailOf(
  plan: PlanMeta,
  createdBy: string | null,
  publishedBy: string | null,
  result: PlanResult | null,
  scenario: ScenarioInput,
  plannedFrom: string | null = null,
): PlanDetail {
  return {
    ...toSummary(plan, createdBy, publishedBy, result),
    timezone: scenario.timezone,
    currency: scenario.tariff.currency ?? 'USD',
    notes: plan.notes,
    result,
    busCapacityKwh: Object.fromEntries(scenario.buses.map((b) => [b.id, b.usableKwh])),
    plannedFrom,
    runsChanged: [],
  };
}

export async function planScenarioFile(
  db: Db,
  caller: AuthUser,
  id: string,
): Promise<{ name: string; scenario: unknown }> {
  const { plan } = await loadPlan(db, caller, id);
  return { name: `scenario-${plan.serviceDate}-v${plan.version}.json`, scenario: plan.scenario };
}

/** Why a what-if is never published, and what to do instead. */
export const WHAT_IF_NOT_PUBLISHED = (version: number) =>
  `Version ${version} is a what-if, a study from an uploaded scenario file: it is never published, e-mailed or sent to chargers. ` +
  'Adopt it to make a draft re-checked against the depot as it is now, then publish that draft';

/**
 * Publishes a finished draft, superseding the night's published plan. The caller names the
 * published plan they reviewed against; if another was published meanwhile, they get a conflict.
 */
export async function publishPlan(
  db: Db,
  mailer: Mailer,
  caller: AuthUser,
  id: string,
  expectedPublishedId: string | null,
  link: (path: string) => string,
  now: Date,
): Promise<PlanSummary> {
  const published = await db.transaction(async (tx) => {
    const [plan] = await tx
      .select()
      .from(plans)
      .where(and(eq(plans.id, id), eq(plans.organisationId, caller.organisationId)));
    if (!plan) throw notFound('That plan');
    assertMayOpenDepot(caller, plan.depotId, 'That plan');
    const [depot] = await tx
      .select({ id: depots.id, timezone: depots.timezone })
      .from(depots)
      .where(eq(depots.id, plan.depotId))
      .for('update');
    const [fresh] = await tx.select().from(plans).where(eq(plans.id, id));
    if (fresh!.kind === 'what-if') throw conflict(WHAT_IF_NOT_PUBLISHED(fresh!.version));
    if (fresh!.state !== 'draft')
      throw conflict(`Version ${fresh!.version} is already ${fresh!.state}: a published plan never changes`);
    if (fresh!.status !== 'done') throw conflict('The plan is not finished yet: wait until it has been generated');
    if (fresh!.kind !== 'revision')
      await refusePublishingInsideANight(tx, plan.depotId, plan.serviceDate, fresh!.version, depot!.timezone);
    const [current] = await tx
      .select({ id: plans.id, version: plans.version, at: plans.publishedAt, by: users.name })
      .from(plans)
      .leftJoin(users, eq(users.id, plans.publishedBy))
      .where(
        and(eq(plans.depotId, plan.depotId), eq(plans.serviceDate, plan.serviceDate), eq(plans.state, 'published')),
      );
    if ((current?.id ?? null) !== expectedPublishedId) {
      // Its own code: the page offers to reload and compare for this refusal only.
      throw new DomainError(
        'published_meanwhile',
        current
          ? `Version ${current.version} was published by ${current.by ?? 'someone'} at ${current.at ? DateTime.fromJSDate(current.at, { zone: depot!.timezone }).toFormat('HH:mm') : '?'} (depot time) while you were reviewing: compare with it, then publish again`
          : 'The plan you reviewed against is no longer published: reload and compare again',
      );
    }
    if (current) await tx.update(plans).set({ state: 'superseded' }).where(eq(plans.id, current.id));
    const [row] = await tx
      .update(plans)
      .set({ state: 'published', publishedAt: now, publishedBy: caller.id })
      .where(eq(plans.id, id))
      .returning();
    return row!;
  });
  await notifyPublished(db, mailer, caller, published, link).catch(() => undefined);
  const { plan, createdBy, publishedBy } = await loadPlan(db, caller, published.id);
  return toSummary(plan, createdBy, publishedBy, resultOf(plan));
}

async function notifyPublished(
  db: Db,
  mailer: Mailer,
  caller: AuthUser,
  plan: PlanRow,
  link: (path: string) => string,
) {
  const [depot] = await db.select().from(depots).where(eq(depots.id, plan.depotId));
  const recipients = await nightStaff(db, plan.organisationId, plan.depotId);
  const result = resultOf(plan)!;
  const scenario = plan.scenario;
  const short = result.buses.filter((b) => b.shortfallKwh > 1e-6);
  const changed = result.keptFrom && result.moved ? await changesAgainst(db, plan, result) : null;
  for (const r of recipients) {
    await mailer.send(
      planPublishedMail({
        to: r.email,
        name: r.name,
        depot: depot!.name,
        night: longDate(plan.serviceDate),
        version: plan.version,
        publishedBy: caller.name,
        buses: scenario.buses.length,
        sessions: result.sessions.length,
        currency: scenario.tariff.currency ?? 'USD',
        cost: result.cost.total,
        // The night's energy against the baseline's, as the review compares them: demand is billed
        // on the month's peak, so a night's demand is no saving of its own. The energy is the
        // review's to the cent: its share of the total shown (footedCents, the one rounding rule).
        energy: footedEnergyDemand(result.cost).energy,
        baseline: result.baseline.energy + (result.baseline.shortfallCost ?? 0),
        baselineName: baselineName(result.baseline.kind),
        short: short.map((b) => `${b.id} (${b.shortfallKwh.toFixed(1)} kWh short: ${b.reason})`),
        ...(changed ? { changed } : {}),
        link: nightMailLink(r.roles, { planId: plan.id, serviceDate: plan.serviceDate }, link),
      }),
    );
  }
}

const DAY_MS = 24 * 3_600_000;
/** A night longer than a day (a weekend): its times name the days. */
const spanOf = (r: PlanResult) => {
  const h = horizonOf(r);
  return h ? h.end - h.start : 0;
};

/**
 * What a plan changes against the version it kept (the published e-mail lists it, so the yard
 * knows which run sheets changed): each bus's plug-ins before and after, as Compare shows them.
 */
async function changesAgainst(db: Db, plan: PlanRow, result: PlanResult) {
  const version = result.keptFrom!.version;
  const [kept] = await db
    .select()
    .from(plans)
    .where(and(eq(plans.depotId, plan.depotId), eq(plans.serviceDate, plan.serviceDate), eq(plans.version, version)));
  const before = kept ? resultOf(kept) : null;
  const lines = before
    ? movedBetween(before, result, plan.scenario.timezone, Math.max(spanOf(before), spanOf(result)) > DAY_MS)
    : [];
  // The engine's list decides which buses changed; the kept version gives their old plug-ins.
  const moved = new Set(result.moved!.buses);
  return {
    version,
    buses: result.moved!.buses,
    lines: lines.filter((m) => moved.has(m.bus)).map((m) => `${m.bus}: ${m.before} → ${m.after}`),
  };
}

/** Which buses changed charger or plug-in times between two versions. */
export async function comparePlans(db: Db, caller: DepotViewer, id: string, otherId: string): Promise<PlanComparison> {
  const [a, b] = await Promise.all([loadPlan(db, caller, otherId), loadPlan(db, caller, id)]);
  const ra = resultOf(a.plan);
  const rb = resultOf(b.plan);
  if (!ra || !rb) throw conflict('Both plans must be finished to compare them');
  const zone = b.plan.scenario.timezone;
  const moved = movedBetween(ra, rb, zone, Math.max(spanOf(ra), spanOf(rb)) > DAY_MS);
  const sa = parseScenario(a.plan.scenario);
  const sb = parseScenario(b.plan.scenario);
  return {
    from: { id: a.plan.id, version: a.plan.version, kind: a.plan.kind },
    to: { id: b.plan.id, version: b.plan.version, kind: b.plan.kind },
    moved,
    costChange: rb.cost.total - ra.cost.total,
    // A stored scenario was valid when it was planned; one that no longer parses has nothing to say.
    inputChanges:
      sa.ok && sb.ok
        ? versionInputChanges(
            { version: a.plan.version, scenario: sa.scenario, result: ra, includesMidday: a.plan.includesMidday },
            { version: b.plan.version, scenario: sb.scenario, result: rb, includesMidday: b.plan.includesMidday },
          )
        : [],
  };
}
