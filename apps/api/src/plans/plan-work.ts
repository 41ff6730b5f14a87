import type { Logger } from 'pino';
import type { Config } from '../config';
import type { Db } from '../db/client';
import { startJobQueue, type JobQueue } from '../jobs/job-queue';
import { startWorkPool, warmWorkPool } from '../workers/pool';
import { recoverInterruptedPlans, runPlanJob } from './plan-runner';

/**
 * Starts what works plan jobs, in the API and in `npm run worker` alike: the worker threads (the
 * engine's thread loads and warms its solver before the first plan is asked for) and the queue,
 * with the sweep that re-queues plans whose worker died.
 */
export async function startPlanWork(config: Config, db: Db, log: Logger): Promise<JobQueue> {
  startWorkPool({
    engineThreads: config.ENGINE_THREADS,
    quickThreads: config.QUICK_THREADS,
    onError: (err) => log.error({ err }, 'worker thread failed'),
  });
  await warmWorkPool();
  return startJobQueue({
    databaseUrl: config.DATABASE_URL,
    log,
    work: (id) => runPlanJob(db, log, id),
    recover: (queue) => recoverInterruptedPlans(db, log, queue),
  });
}
