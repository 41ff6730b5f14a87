// `npm run bench:district`: planning scaled out over worker processes. A throwaway database
// (nightyard_bench_district on the test cluster) gets one organisation with DISTRICT_DEPOTS (50)
// generated depots of 40-200 buses, each with a night to plan; the plan jobs go on the PostgreSQL
// queue and `npm run worker` processes (the bundled dist/api/worker.mjs) take them, one job at a
// time each, on their own engine thread. Measured with 1 and then 2 worker processes on this
// machine (the same scenarios, planned afresh), with the time to expect on N such machines.
// Settings: TEST_PGPORT (5434), DISTRICT_DEPOTS (50), DISTRICT_MIN_BUSES (40), DISTRICT_MAX_BUSES (200),
// DISTRICT_WORKERS ("1,2").
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import { availableParallelism, loadavg } from 'node:os';
import { inArray } from 'drizzle-orm';
import pg from 'pg';
import { pino } from 'pino';
import { generateDepot } from '../../libs/scheduling/src/testing/generate-depot';
import { createDb, createPool, type Db } from '../../apps/api/src/db/client';
import { applyMigrations } from '../../apps/api/src/db/migrate';
import { organisations, plans } from '../../apps/api/src/db/schema';
import { startJobQueue } from '../../apps/api/src/jobs/job-queue';
import { createDepot } from '../../apps/api/src/testing/depot-fixture';

const PGPORT = Number(process.env.TEST_PGPORT ?? 5434);
const DEPOTS = Number(process.env.DISTRICT_DEPOTS ?? 50);
const MIN_BUSES = Number(process.env.DISTRICT_MIN_BUSES ?? 40);
const MAX_BUSES = Number(process.env.DISTRICT_MAX_BUSES ?? 200);
const WORKERS = (process.env.DISTRICT_WORKERS ?? '1,2').split(',').map(Number);
const DB_NAME = 'nightyard_bench_district';
const CLUSTER = `postgres://postgres@127.0.0.1:${PGPORT}`;
const DATABASE_URL = `${CLUSTER}/${DB_NAME}`;
const silent = pino({ level: 'silent' });
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const elapsed = (from: number) => (performance.now() - from) / 1000;

async function freshDatabase(): Promise<void> {
  const admin = new pg.Client({ connectionString: `${CLUSTER}/postgres` });
  await admin.connect();
  await admin.query(`drop database if exists ${DB_NAME} with (force)`);
  await admin.query(`create database ${DB_NAME}`);
  await admin.end();
}

/** The district: one depot per night to plan, sizes spread evenly from MIN to MAX buses. */
async function district(db: Db) {
  const [org] = await db.insert(organisations).values({ name: 'Bench district (invented)' }).returning();
  const nights: { depotId: string; buses: number; scenario: ReturnType<typeof generateDepot> }[] = [];
  for (let i = 0; i < DEPOTS; i++) {
    const buses = Math.round(MIN_BUSES + ((MAX_BUSES - MIN_BUSES) * i) / Math.max(1, DEPOTS - 1));
    const { depot } = await createDepot(db, org!.id, `Bench depot ${i + 1}`);
    nights.push({ depotId: depot.id, buses, scenario: generateDepot({ buses, seed: 100 + i }) });
  }
  return { organisationId: org!.id, nights };
}

function startWorker(): ChildProcess {
  return spawn(process.execPath, ['dist/api/worker.mjs'], {
    env: { ...process.env, DATABASE_URL, LOG_LEVEL: 'warn', NODE_ENV: 'test', ENGINE_THREADS: '1' },
    stdio: ['ignore', 'ignore', 'inherit'],
  });
}

/** Plans every night with `workers` processes; the wall time from the first job queued to the last done. */
async function round(db: Db, d: Awaited<ReturnType<typeof district>>, workers: number, version: number) {
  const processes = Array.from({ length: workers }, startWorker);
  const queue = await startJobQueue({ databaseUrl: DATABASE_URL, log: silent });
  try {
    // Workers up and waiting before the clock starts: their start-up is not planning time.
    await sleep(4000);
    const rows = await db
      .insert(plans)
      .values(
        d.nights.map((n) => ({
          organisationId: d.organisationId,
          depotId: n.depotId,
          serviceDate: '2026-12-09',
          version,
          scenario: n.scenario,
        })),
      )
      .returning({ id: plans.id });
    const ids = rows.map((r) => r.id);
    const start = performance.now();
    for (const id of ids) await queue.enqueuePlan(id);
    for (;;) {
      const states = await db.select({ status: plans.status }).from(plans).where(inArray(plans.id, ids));
      if (states.every((s) => s.status === 'done' || s.status === 'failed')) break;
      if (processes.some((p) => p.exitCode !== null)) throw new Error('a worker process ended during the bench');
      await sleep(200);
    }
    const wall = elapsed(start);
    const done = await db
      .select({ status: plans.status, result: plans.result })
      .from(plans)
      .where(inArray(plans.id, ids));
    const solveS = done.map((p) => ((p.result as { solveMs?: number } | null)?.solveMs ?? 0) / 1000);
    return {
      wall,
      failed: done.filter((p) => p.status === 'failed').length,
      solveSum: solveS.reduce((a, b) => a + b, 0),
      longest: Math.max(...solveS),
    };
  } finally {
    await queue.stop();
    for (const p of processes) p.kill('SIGTERM');
    await Promise.all(processes.map((p) => (p.exitCode !== null ? null : new Promise((r) => p.once('exit', r)))));
  }
}

async function main() {
  spawnSync('tools/pg.sh', ['start', '.test-data/pg', String(PGPORT), 'fast'], { stdio: 'inherit' });
  const built = spawnSync(process.execPath, ['tools/build-api.mjs'], { stdio: 'inherit' });
  if (built.status !== 0) throw new Error('the API did not build');
  await freshDatabase();
  const pool = createPool(DATABASE_URL);
  const db = createDb(pool);
  await applyMigrations(db, 'drizzle');
  const d = await district(db);
  const totalBuses = d.nights.reduce((s, n) => s + n.buses, 0);
  console.log(
    `District bench: ${DEPOTS} generated depots of ${MIN_BUSES}-${MAX_BUSES} buses (${totalBuses} buses), one night each, node ${process.version}, ${availableParallelism()} CPUs`,
  );
  console.log('workers   wall s   plans/min   engine s (sum)   longest plan s   failed   speed-up   load avg');
  const results: { workers: number; wall: number; longest: number }[] = [];
  let version = 0;
  for (const workers of WORKERS) {
    const r = await round(db, d, workers, ++version);
    results.push({ workers, wall: r.wall, longest: r.longest });
    const speedup = results[0]!.wall / r.wall;
    console.log(
      `${String(workers).padStart(7)}   ${r.wall.toFixed(1).padStart(6)}   ${((DEPOTS / r.wall) * 60).toFixed(1).padStart(9)}   ${r.solveSum.toFixed(1).padStart(14)}   ${r.longest.toFixed(1).padStart(14)}   ${String(r.failed).padStart(6)}   ${speedup.toFixed(2).padStart(8)}   ${loadavg()[0]!.toFixed(1).padStart(8)}`,
    );
  }
  // N machines like this one, each running as many workers as it has CPUs, share one queue: the
  // work divides among them until the longest single plan (one engine thread) sets the floor.
  const best = results.reduce((a, b) => (b.wall < a.wall ? b : a));
  const perMachine = DEPOTS / best.wall;
  console.log(
    `\nExpected wall time on N machines like this one (${best.workers} worker${best.workers === 1 ? '' : 's'} each, ${perMachine.toFixed(2)} plans/s per machine), floor = the longest plan (${best.longest.toFixed(1)} s):`,
  );
  console.log(
    [1, 2, 4, 8, 16]
      .map((n) => `  N=${n}: ${Math.max(best.longest, DEPOTS / (n * perMachine)).toFixed(1)} s`)
      .join('\n'),
  );
  await pool.end();
  const admin = new pg.Client({ connectionString: `${CLUSTER}/postgres` });
  await admin.connect();
  await admin.query(`drop database if exists ${DB_NAME} with (force)`);
  await admin.end();
}

await main();
