import PgBoss from 'pg-boss';
import type { Logger } from 'pino';

export const PLAN_QUEUE = 'plan-generate';

export interface JobQueue {
  /** Queues the engine run for a stored plan; any worker process may take it. */
  enqueuePlan(planId: string): Promise<void>;
  stop(): Promise<void>;
}

export interface JobOptions {
  databaseUrl: string;
  log: Logger;
  /** Also work jobs in this process (the API does, so `npm start` needs nothing else). */
  work?: (planId: string) => Promise<void>;
}

/**
 * Background jobs through pg-boss on the same PostgreSQL: a plan request survives a restart and
 * is worked once, by whichever process (API or `npm run worker`) fetches it first.
 */
export async function startJobQueue(opts: JobOptions): Promise<JobQueue> {
  const boss = new PgBoss({ connectionString: opts.databaseUrl, max: 4, application_name: 'nightyard-jobs' });
  boss.on('error', (err) => opts.log.error({ err }, 'job queue error'));
  await boss.start();
  await boss.createQueue(PLAN_QUEUE, { name: PLAN_QUEUE, retryLimit: 1, expireInMinutes: 15 } as PgBoss.Queue);
  let workerId: string | undefined;
  if (opts.work) {
    const work = opts.work;
    workerId = await boss.work<{ planId: string }>(PLAN_QUEUE, { batchSize: 1, pollingIntervalSeconds: 0.5 }, async ([job]) => {
      if (job) await work(job.data.planId);
    });
  }
  return {
    async enqueuePlan(planId) {
      await boss.send(PLAN_QUEUE, { planId }, { singletonKey: planId });
      // Wake this process's own worker rather than waiting for its next poll.
      if (workerId) boss.notifyWorker(workerId);
    },
    async stop() {
      await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
    },
  };
}
