import { DomainError } from './errors';

// Sizes the API accepts. Each keeps one request from holding a worker (or the request thread)
// for long; the refusal names the limit so the caller knows what to send instead.

/** JSON bodies in general. */
export const JSON_BODY_LIMIT_BYTES = 1024 * 1024;
/** A day's runs as CSV: the file, and the JSON request that carries it. */
export const MAX_RUNS_CSV_BYTES = 1024 * 1024;
export const RUNS_CSV_BODY_LIMIT_BYTES = 3 * 1024 * 1024;
/** Rows of a runs file: a large depot has a few thousand runs a day. */
export const MAX_RUNS_CSV_ROWS = 10_000;
/** A Green Button file (a month of 1-minute XML readings is about 7 MB), and its request. */
export const MAX_METER_FILE_BYTES = 20 * 1024 * 1024;
export const METER_BODY_LIMIT_BYTES = 25 * 1024 * 1024;
/** A what-if scenario's buses x slots: 1,000 buses at 15-minute slots for a day fit. */
export const MAX_WHAT_IF_BUS_SLOTS = 100_000;

export const formatCount = (n: number) => n.toLocaleString('en-US');

/** 1048576 -> "1 MB", 1572864 -> "1.5 MB", 2048 -> "2 KB". */
export function formatBytes(bytes: number): string {
  const mb = bytes / (1024 * 1024);
  if (mb >= 1) return `${Math.round(mb * 10) / 10} MB`;
  return `${Math.max(1, Math.round(bytes / 1024))} KB`;
}

/** Refuses text larger than `limit` bytes (UTF-8), naming what it is and the limit. */
export function refuseLargerThan(text: string, limit: number, what: string, field: string): void {
  const size = Buffer.byteLength(text, 'utf8');
  if (size > limit) {
    throw new DomainError(
      'payload_too_large',
      `${what} is ${formatBytes(size)}; at most ${formatBytes(limit)} is accepted`,
      { [field]: `At most ${formatBytes(limit)}` },
    );
  }
}
