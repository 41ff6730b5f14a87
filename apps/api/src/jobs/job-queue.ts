import PgBoss from 'pg-boss';
import type { Logger } from 'pino';

export const PLAN_QUEUE = 'plan-generate';
/** How often a worker process looks for plans whose run was cut short (also once at start). */
const RECOVER_EVERY_MS = 60_000;

export interface JobQueue {
  /** Queues the engine run for a stored plan; any worker process may take it. */
  enqueuePlan(planId: string): Promise<void>;
  stop(): Promise<void>;
}

export interface RecoveryContext {
  /** Plans with a job waiting to be taken. */
  waiting: Set<string>;
  enqueue: (planId: string) => Promise<void>;
}

export interface JobOptions {
  databaseUrl: string;
  log: Logger;
  /** Also work jobs in this process (the API does, so `npm start` needs nothing else). */
  work?: (planId: string) => Promise<void>;
  /** Re-queues interrupted plans; run at start and every minute by processes that work jobs. */
  recover?: (ctx: RecoveryContext) => Promise<unknown>;
  recoverEveryMs?: number;
}

/**
 * Background jobs through pg-boss on the same PostgreSQL: a plan request survives a restart and
 * is worked once, by whichever process (API or `npm run worker`) fetches it first. A job whose
 * run throws is retried once (retryLimit); a run cut short by a killed process is found by the
 * recovery sweep rather than waiting for the job's expiry.
 */
export async function startJobQueue(opts: JobOptions): Promise<JobQueue> {
  const boss = new PgBoss({ connectionString: opts.databaseUrl, max: 4, application_name: 'nightyard-jobs' });
  // pg-boss reports lost connections and failed maintenance here; without a listener Node would
  // stop the process. It reconnects by itself once the database is back.
  boss.on('error', (err) => opts.log.warn({ err }, 'job queue error'));
  await boss.start();
  const queueOptions = { name: PLAN_QUEUE, retryLimit: 1, retryDelay: 2, expireInSeconds: 15 * 60 } as PgBoss.Queue;
  await boss.createQueue(PLAN_QUEUE, queueOptions);
  // A queue made by an older version keeps its settings unless told otherwise.
  await boss.updateQueue(PLAN_QUEUE, queueOptions);
  let workerId: string | undefined;
  if (opts.work) {
    const work = opts.work;
    workerId = await boss.work<{ planId: string }>(
      PLAN_QUEUE,
      { batchSize: 1, pollingIntervalSeconds: 0.5 },
      async ([job]) => {
        if (!job) return;
        try {
          await work(job.data.planId);
        } finally {
          // pg-boss waits out the rest of its polling interval after each job; the next job is
          // taken at once instead (an empty queue then waits the interval as usual). A district's
          // small nights were spending most of their time in that wait.
          if (workerId) boss.notifyWorker(workerId);
        }
      },
    );
  }
  const enqueuePlan = async (planId: string) => {
    await boss.send(PLAN_QUEUE, { planId }, { singletonKey: planId });
    // Wake this process's own worker rather than waiting for its next poll.
    if (workerId) boss.notifyWorker(workerId);
  };
  const waitingPlanIds = async () => {
    const { rows } = (await boss
      .getDb()
      .executeSql(
        `select data->>'planId' as "planId" from pgboss.job where name = $1 and state in ('created', 'retry')`,
        [PLAN_QUEUE],
      )) as { rows: { planId: string }[] };
    return new Set(rows.map((r) => r.planId));
  };
  let timer: NodeJS.Timeout | undefined;
  if (opts.recover) {
    const recover = opts.recover;
    let sweeping = false;
    const sweep = async () => {
      if (sweeping) return;
      sweeping = true;
      try {
        await recover({ waiting: await waitingPlanIds(), enqueue: enqueuePlan });
      } catch (err) {
        opts.log.warn({ err }, 'interrupted-plan sweep failed; the next one retries');
      } finally {
        sweeping = false;
      }
    };
    await sweep();
    timer = setInterval(() => void sweep(), opts.recoverEveryMs ?? RECOVER_EVERY_MS);
    timer.unref();
  }
  return {
    enqueuePlan,
    async stop() {
      clearInterval(timer);
      await boss.stop({ graceful: true, wait: true, timeout: 10_000 });
    },
  };
}
