import { Piscina } from 'piscina';
import { ReplanStateError } from '@nightyard/scheduling';
import { DomainError } from '../http/errors';
import type { PoolOutputs, PoolReply, PoolTask } from './pool-worker';

/**
 * Worker threads for the work that would stall the API's request thread. Two lanes, so a long
 * solve never makes a sign-in wait:
 * - engine: plans and re-plans (HiGHS loads once per thread); ENGINE_THREADS, default 1;
 * - quick: password hashing and file parses; QUICK_THREADS, default 1.
 * On a 2-core machine that leaves a core for the request thread and the database. The API and the
 * job worker start the pool with their settings; elsewhere (tests, the seed) the first task
 * starts it with one thread a lane. Threads that sit idle do not keep the process alive.
 */
export interface WorkPoolOptions {
  engineThreads?: number;
  quickThreads?: number;
  /** Told about a worker thread that failed outside a task. */
  onError?: (err: unknown) => void;
}

type Lane = 'engine' | 'quick';
const LANE_OF: Record<PoolTask['kind'], Lane> = {
  warm: 'engine',
  plan: 'engine',
  'period-target': 'engine',
  'plan-under-target': 'engine',
  replan: 'engine',
  'runs-csv': 'quick',
  'meter-file': 'quick',
  'hash-password': 'quick',
  'check-password': 'quick',
};

/** Bundled (dist/api/main.mjs): the worker is bundled beside it. From source: tsx compiles it. */
function workerFile(): string {
  const fromSource = import.meta.url.endsWith('.ts');
  return new URL(fromSource ? './pool-worker-source.mjs' : './pool-worker.mjs', import.meta.url).href;
}

let lanes: Record<Lane, Piscina> | null = null;

/** Starts the pool with these settings (main.ts does, with its logger); otherwise the first task does. */
export function startWorkPool(options: WorkPoolOptions = {}): void {
  if (lanes) return;
  const filename = workerFile();
  const lane = (threads: number) => {
    const pool = new Piscina({
      filename,
      minThreads: 1,
      maxThreads: threads,
      // Keep extra threads a while: starting one costs module loading (and HiGHS for the engine).
      idleTimeout: 60_000,
    });
    // eslint-disable-next-line no-console -- the fallback when started without main.ts's logger (tests, scripts)
    pool.on('error', (err) => (options.onError ?? ((e) => console.error('worker pool error', e)))(err));
    return pool;
  };
  lanes = {
    engine: lane(options.engineThreads ?? 1),
    quick: lane(options.quickThreads ?? 1),
  };
}

/** Runs a task in its lane and gives back its value, or raises the error the task raised. */
export async function runInPool<K extends PoolTask['kind']>(
  task: Extract<PoolTask, { kind: K }>,
): Promise<PoolOutputs[K]> {
  if (!lanes) startWorkPool();
  const reply = (await lanes![LANE_OF[task.kind]].run(task)) as PoolReply;
  if (reply.ok) return reply.value as PoolOutputs[K];
  if ('domain' in reply)
    throw new DomainError(reply.domain.code, reply.domain.message, reply.domain.fields, reply.domain.headers);
  throw new ReplanStateError(reply.replanProblems);
}

/** Loads the solver in the engine thread before the first plan is asked for. */
export const warmWorkPool = () => runInPool({ kind: 'warm' });

/** How many tasks each lane has finished (tests prove work went through the pool). */
export function workPoolCompleted(): Record<Lane, number> {
  return { engine: lanes?.engine.completed ?? 0, quick: lanes?.quick.completed ?? 0 };
}

export async function stopWorkPool(): Promise<void> {
  const current = lanes;
  lanes = null;
  if (current) await Promise.all([current.engine.destroy(), current.quick.destroy()]);
}
