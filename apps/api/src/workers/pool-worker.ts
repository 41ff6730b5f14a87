import { readlinkSync } from 'node:fs';
import { setPriority } from 'node:os';
import bcrypt from 'bcryptjs';
import type { RatePlanDefinition } from '@nightyard/contracts';
import {
  ReplanStateError,
  loadSolver,
  peaksOf,
  quarterHours,
  planScenario,
  planUnderTarget,
  solvePeriodTarget,
  type DemandTarget,
  type PeriodNight,
  type PeriodTarget,
  type PlanUnderTarget,
  replan,
  type Plan,
  type Replan,
  type ReplanState,
  type Scenario,
  type ScenarioProblem,
} from '@nightyard/scheduling';
import { parseRunsCsv } from '../fleet/runs-csv';
import {
  checkIntervals,
  parseGreenButtonCsv,
  parseGreenButtonXml,
  type IntervalCheck,
  type MeterFile,
} from '../costs/green-button';
import { DomainError } from '../http/errors';
import { MAX_RUNS_CSV_ROWS, formatCount } from '../http/limits';

// The work that would hold the API's one thread for long: the engine, large file parses and
// password hashing. Piscina runs this module in worker threads (./pool.ts); each task gets a
// copy of its input and sends back a copy of its output.

export type PoolTask =
  | { kind: 'warm' }
  | { kind: 'plan'; scenario: Scenario; previous?: Plan }
  | { kind: 'period-target'; nights: PeriodNight[]; marginal: boolean }
  | { kind: 'plan-under-target'; scenario: Scenario; targets: DemandTarget[]; previous?: Plan }
  | { kind: 'replan'; scenario: Scenario; state: ReplanState }
  | { kind: 'runs-csv'; text: string; date: string }
  | {
      kind: 'meter-file';
      content: string;
      zone: string;
      periodStartMs: number;
      periodEndMs: number;
      nowMs: number;
      rate: RatePlanDefinition;
    }
  | { kind: 'hash-password'; password: string; rounds: number }
  | { kind: 'check-password'; password: string; hash: string };

export interface MeterFileReading {
  format: MeterFile['format'];
  checked: IntervalCheck;
  measured: ReturnType<typeof peaksOf>;
}

export interface PoolOutputs {
  warm: null;
  plan: Plan;
  'period-target': PeriodTarget;
  'plan-under-target': PlanUnderTarget;
  replan: Replan;
  'runs-csv': ReturnType<typeof parseRunsCsv>;
  'meter-file': MeterFileReading;
  'hash-password': string;
  'check-password': boolean;
}

/** Errors cross the thread boundary as plain data: the pool raises them again as the same classes. */
export type PoolReply =
  | { ok: true; value: unknown }
  | {
      ok: false;
      domain: {
        code: DomainError['code'];
        message: string;
        fields?: Record<string, string>;
        headers?: Record<string, string>;
      };
    }
  | { ok: false; replanProblems: ScenarioProblem[] };

/** Counts the lines that hold something, so a huge file is refused before it is parsed. */
function filledLines(text: string): number {
  let n = 0;
  let filled = false;
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c === 10) {
      if (filled) n++;
      filled = false;
    } else if (c !== 13 && c !== 32 && c !== 9 && c !== 44) filled = true;
  }
  return filled ? n + 1 : n;
}

let yielding = false;

/**
 * An engine thread gives way to the request thread: on a machine with few cores a solve would
 * otherwise take CPU time that requests wait for. Linux keeps a nice value per thread, so this
 * thread alone is lowered (elsewhere it runs at normal priority).
 */
function yieldToRequests(): void {
  if (yielding) return;
  yielding = true;
  try {
    const tid = Number(readlinkSync('/proc/thread-self').split('/').pop());
    if (Number.isInteger(tid) && tid > 0) setPriority(tid, 10);
  } catch {
    // No /proc/thread-self: not Linux.
  }
}

async function perform(task: PoolTask): Promise<unknown> {
  switch (task.kind) {
    case 'warm':
      yieldToRequests();
      await loadSolver();
      return null;
    case 'plan':
      yieldToRequests();
      return planScenario(task.scenario, task.previous ? { previous: task.previous } : {});
    case 'period-target':
      yieldToRequests();
      return solvePeriodTarget(task.nights, await loadSolver(), { marginal: task.marginal });
    case 'plan-under-target':
      yieldToRequests();
      return planUnderTarget(task.scenario, task.targets, task.previous ? { previous: task.previous } : {});
    case 'replan':
      yieldToRequests();
      return replan(task.scenario, task.state);
    case 'runs-csv': {
      const rows = filledLines(task.text) - 1;
      if (rows > MAX_RUNS_CSV_ROWS) {
        throw new DomainError(
          'payload_too_large',
          `The runs file has ${formatCount(rows)} rows; at most ${formatCount(MAX_RUNS_CSV_ROWS)} runs fit in one day's file`,
          { csv: `At most ${formatCount(MAX_RUNS_CSV_ROWS)} rows` },
        );
      }
      return parseRunsCsv(task.text, task.date);
    }
    case 'meter-file': {
      const file = task.content.trimStart().startsWith('<')
        ? parseGreenButtonXml(task.content)
        : parseGreenButtonCsv(task.content, task.zone);
      const checked = checkIntervals(file, task.periodStartMs, task.periodEndMs, task.zone, task.nowMs);
      // Peaks of 15-minute demand, whatever the meter's interval (the costs month reads it the same way).
      const measured = peaksOf(task.rate, quarterHours(checked.intervals), { zone: task.zone, intervalMinutes: 15 });
      return { format: file.format, checked, measured } satisfies MeterFileReading;
    }
    case 'hash-password':
      return bcrypt.hash(task.password, task.rounds);
    case 'check-password':
      return bcrypt.compare(task.password, task.hash);
  }
}

export default async function runPoolTask(task: PoolTask): Promise<PoolReply> {
  try {
    return { ok: true, value: await perform(task) };
  } catch (err) {
    if (err instanceof DomainError) {
      return { ok: false, domain: { code: err.code, message: err.message, fields: err.fields, headers: err.headers } };
    }
    if (err instanceof ReplanStateError) return { ok: false, replanProblems: err.problems };
    throw err;
  }
}
