import { eq } from 'drizzle-orm';
import type { Logger } from 'pino';
import { parseScenario, planScenario } from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { plans } from '../db/schema';
import { planResultSchema, type PlanResult } from '@nightyard/contracts';
import { planFromCutOff } from './night-in-progress';

async function previousResult(db: Db, id: string | null): Promise<PlanResult | null> {
  if (!id) return null;
  const [row] = await db.select({ result: plans.result }).from(plans).where(eq(plans.id, id));
  return row?.result ? planResultSchema.parse(row.result) : null;
}

/** Runs the engine on a stored plan's scenario and stores the result (the background job). */
export async function runPlanJob(db: Db, log: Logger, planId: string): Promise<void> {
  const [plan] = await db.select().from(plans).where(eq(plans.id, planId));
  if (!plan || plan.status === 'done') return;
  await db.update(plans).set({ status: 'running', stage: 'Solving: choosing chargers and power' }).where(eq(plans.id, planId));
  try {
    const parsed = parseScenario(plan.scenario);
    if (!parsed.ok) throw new Error(`The stored scenario is not valid: ${parsed.problems.map((p) => `${p.path}: ${p.message}`).join('; ')}`);
    const from = plan.replanState?.from;
    const result = from
      ? await planFromCutOff(parsed.scenario, { from, previousPlanId: plan.replanState?.previousPlanId ?? null, plugged: plan.replanState?.plugged ?? {} },
        await previousResult(db, plan.replanState?.previousPlanId ?? null))
      : await planScenario(parsed.scenario);
    await db.update(plans).set({ status: 'done', stage: 'Done', result: result as unknown as Record<string, unknown> }).where(eq(plans.id, planId));
    log.info({ planId, ms: result.solveMs, status: result.status }, 'plan generated');
  } catch (err) {
    log.error({ err, planId }, 'plan generation failed');
    await db.update(plans).set({ status: 'failed', stage: 'Failed', error: (err as Error).message }).where(eq(plans.id, planId));
  }
}
