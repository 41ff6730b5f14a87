import { and, eq, inArray, sql } from 'drizzle-orm';
import type { Logger } from 'pino';
import { parseScenario, underTarget, type Plan, type Scenario } from '@nightyard/scheduling';
import { cutOffTarget } from './plan-target';
import { periodTargetFrom, planningJobCaller } from '../costs/period-target';
import type { Db } from '../db/client';
import { plans } from '../db/schema';
import { isDatabaseUnavailable } from '../db/unavailable';
import { planResultSchema, type PlanResult } from '@nightyard/contracts';
import { planFromCutOff } from './night-in-progress';
import { withPlanLock } from './plan-lock';
import { runInPool } from '../workers/pool';

/**
 * The plan published for the night, which a new plan of it (generated again, or a revision before
 * the night starts) keeps wherever it still fits within the depot's tolerance: the yard has its
 * run sheets. Null for a what-if, or with nothing published.
 */
async function publishedFor(
  db: Db,
  plan: typeof plans.$inferSelect,
): Promise<{ version: number; result: Plan } | null> {
  if (plan.kind === 'what-if') return null;
  const [row] = await db
    .select({ id: plans.id, version: plans.version, result: plans.result })
    .from(plans)
    .where(and(eq(plans.depotId, plan.depotId), eq(plans.serviceDate, plan.serviceDate), eq(plans.state, 'published')));
  // A stored result is the engine's whole plan (the contract reads only some of its fields).
  return row?.result && row.id !== plan.id ? { version: row.version, result: row.result as Plan } : null;
}

async function previousResult(db: Db, id: string | null): Promise<PlanResult | null> {
  if (!id) return null;
  const [row] = await db.select({ result: plans.result }).from(plans).where(eq(plans.id, id));
  return row?.result ? planResultSchema.parse(row.result) : null;
}

/**
 * A night planned under the billing period's demand target (generated plans and revisions; a
 * what-if keeps the depot's peaks so far, so it compares with the plan it came from). The target
 * is worked out now, from the data as it is, with this night's own scenario in it.
 */
async function planNight(
  db: Db,
  log: Logger,
  plan: typeof plans.$inferSelect,
  scenario: Scenario,
  from: string | undefined,
): Promise<PlanResult> {
  const cutOff = async (s: Scenario) =>
    planFromCutOff(
      s,
      {
        from: from!,
        previousPlanId: plan.replanState?.previousPlanId ?? null,
        plugged: plan.replanState?.plugged ?? {},
        ...(plan.replanState?.socReadings ? { socReadings: plan.replanState.socReadings } : {}),
      },
      await previousResult(db, plan.replanState?.previousPlanId ?? null),
    );
  const published = from ? null : await publishedFor(db, plan);
  const previous = published ? { previous: published.result } : {};
  const keptFrom = <T extends object>(result: T) =>
    published ? { ...result, keptFrom: { version: published.version } } : result;
  const plain = async () =>
    from ? cutOff(scenario) : keptFrom(await runInPool({ kind: 'plan', scenario, ...previous }));
  if (plan.kind === 'what-if') return plain();
  let target: Awaited<ReturnType<typeof periodTargetFrom>> = null;
  try {
    // A generated plan shares the target the costs month shows (the nights from their runs, solved
    // once); a revision or a night under way brings its own scenario (the yard's reports) into it.
    const own = from || plan.kind === 'revision' ? { date: plan.serviceDate, scenario } : undefined;
    target = await periodTargetFrom(db, planningJobCaller(plan.organisationId), plan.depotId, plan.serviceDate, own);
  } catch (err) {
    if (isDatabaseUnavailable(err)) throw err;
    log.warn({ err, planId: plan.id }, 'no demand target: the night is planned on the peaks so far');
  }
  if (!target) return plain();
  const targets = target.target.targets;
  const why = {
    binding: target.view.binding?.sentence ?? null,
    impossible: target.view.impossible.map((i) => i.sentence),
  };
  if (from) {
    // A night under way: re-planned from its cut-off under the target; the trade is its cost.
    const floor = underTarget(scenario, targets);
    const result = await cutOff(floor);
    return { ...result, target: cutOffTarget(floor, result.slots, targets, why) };
  }
  const { plan: result, peaks, trade } = await runInPool({ kind: 'plan-under-target', scenario, targets, ...previous });
  const aboveKw = trade ? Math.max(...trade.above.map((a) => a.kw)) : 0;
  return keptFrom({ ...result, target: { peaks, aboveKw, trade, ...why } });
}

/** Engine runs a plan gets: one more after a run cut short (a killed or restarted worker). */
export const MAX_PLAN_ATTEMPTS = 2;
export const INTERRUPTED_TWICE =
  'The plan could not be generated: the planning worker stopped twice while working on it. Ask for the plan again; if it stops again, tell your administrator.';

const OPEN = ['queued', 'running'] as const;

/** Runs the engine on a stored plan's scenario and stores the result (the background job). */
export async function runPlanJob(db: Db, log: Logger, planId: string): Promise<void> {
  const outcome = await withPlanLock(db, planId, async () => {
    // Claims the run and counts it in one statement; a plan already done or failed is left alone.
    const [plan] = await db
      .update(plans)
      .set({ status: 'running', stage: 'Solving: choosing chargers and power', attempts: sql`${plans.attempts} + 1` })
      .where(and(eq(plans.id, planId), inArray(plans.status, OPEN)))
      .returning();
    if (!plan) return;
    if (plan.attempts > MAX_PLAN_ATTEMPTS) {
      await markFailed(db, planId, INTERRUPTED_TWICE);
      return;
    }
    try {
      const parsed = parseScenario(plan.scenario);
      if (!parsed.ok)
        throw new Error(
          `The stored scenario is not valid: ${parsed.problems.map((p) => `${p.path}: ${p.message}`).join('; ')}`,
        );
      const from = plan.replanState?.from;
      // The engine runs in a worker thread: the API keeps answering while it solves.
      const result = await planNight(db, log, plan, parsed.scenario, from);
      await db.update(plans).set({ status: 'done', stage: 'Done', result }).where(eq(plans.id, planId));
      log.info({ planId, ms: result.solveMs, status: result.status, attempt: plan.attempts }, 'plan generated');
    } catch (err) {
      // The database went away mid-run: not the plan's fault. The job fails, pg-boss retries it
      // and the recovery sweep picks it up if that retry is lost too.
      if (isDatabaseUnavailable(err)) throw err;
      log.error({ err, planId }, 'plan generation failed');
      await markFailed(db, planId, (err as Error).message);
    }
  });
  if (outcome === 'busy') log.info({ planId }, 'plan already being generated by another worker');
}

async function markFailed(db: Db, planId: string, message: string) {
  await db
    .update(plans)
    .set({ status: 'failed', stage: 'Failed', error: message })
    .where(and(eq(plans.id, planId), inArray(plans.status, OPEN)));
}

export interface RecoveryQueue {
  /** Plans that have a job waiting in the queue (not yet taken by a worker). */
  waiting: Set<string>;
  enqueue: (planId: string) => Promise<void>;
}

/**
 * Finds plans left "queued" or "running" that nobody works and nothing will: their worker was
 * killed (the job stays "active" in pg-boss until it expires) or the job was lost. Each is queued
 * again once; one that was already interrupted twice is marked failed with a message the
 * supervisor sees. Run at start-up and every minute.
 */
export async function recoverInterruptedPlans(
  db: Db,
  log: Logger,
  queue: RecoveryQueue,
): Promise<{ requeued: string[]; failed: string[] }> {
  const open = await db
    .select({ id: plans.id, attempts: plans.attempts })
    .from(plans)
    .where(inArray(plans.status, OPEN));
  const requeued: string[] = [];
  const failed: string[] = [];
  for (const p of open) {
    if (queue.waiting.has(p.id)) continue;
    const idle = await withPlanLock(db, p.id, async () => true);
    if (idle === 'busy') continue;
    if (p.attempts >= MAX_PLAN_ATTEMPTS) {
      await markFailed(db, p.id, INTERRUPTED_TWICE);
      failed.push(p.id);
    } else {
      await db
        .update(plans)
        .set({ status: 'queued', stage: 'Queued again after an interruption' })
        .where(and(eq(plans.id, p.id), inArray(plans.status, OPEN)));
      await queue.enqueue(p.id);
      requeued.push(p.id);
    }
  }
  if (requeued.length || failed.length) log.warn({ requeued, failed }, 'interrupted plans recovered');
  return { requeued, failed };
}
