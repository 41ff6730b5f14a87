import { eq } from 'drizzle-orm';
import type { Logger } from 'pino';
import { parseScenario } from '@nightyard/scheduling';
import type { Db } from '../db/client';
import { plans } from '../db/schema';
import { runInPool } from '../workers/pool';

/** Runs the engine on a stored plan's scenario and stores the result (the background job). */
export async function runPlanJob(db: Db, log: Logger, planId: string): Promise<void> {
  const [plan] = await db.select().from(plans).where(eq(plans.id, planId));
  if (!plan || plan.status === 'done') return;
  await db.update(plans).set({ status: 'running', stage: 'Solving: choosing chargers and power' }).where(eq(plans.id, planId));
  try {
    const parsed = parseScenario(plan.scenario);
    if (!parsed.ok) throw new Error(`The stored scenario is not valid: ${parsed.problems.map((p) => `${p.path}: ${p.message}`).join('; ')}`);
    // The engine runs in a worker thread: the API keeps answering while it solves.
    const result = await runInPool({ kind: 'plan', scenario: parsed.scenario });
    await db.update(plans).set({ status: 'done', stage: 'Done', result: result as unknown as Record<string, unknown> }).where(eq(plans.id, planId));
    log.info({ planId, ms: result.solveMs, status: result.status }, 'plan generated');
  } catch (err) {
    log.error({ err, planId }, 'plan generation failed');
    await db.update(plans).set({ status: 'failed', stage: 'Failed', error: (err as Error).message }).where(eq(plans.id, planId));
  }
}
