import { createHash } from 'node:crypto';
import { and, eq, isNull, lt } from 'drizzle-orm';
import type { Db } from '../db/client';
import { idempotencyKeys } from '../db/schema';
import type { Clock } from '../time/clock';
import { DomainError, conflict } from './errors';

/** How long an answer is kept for retries. */
export const IDEMPOTENCY_TTL_MS = 24 * 3_600_000;
/** A claim still without an answer after this long was left by a process that stopped. */
const ABANDONED_MS = 5 * 60_000;
/** Visible ASCII, as clients send UUIDs or random tokens. */
const KEY = /^[\x21-\x7E]{1,255}$/;

export interface Answer {
  status: number;
  body: unknown;
}

export interface IdempotencyRequest {
  userId: string;
  key: string;
  /** Method and route pattern, e.g. `PUT /depots/:depotId/service-days/:date`. */
  route: string;
  requestHash: string;
}

export interface IdempotencyStore {
  /**
   * Carries out `exec` once per caller and key; a repeat gets the first answer. A repeat that
   * arrives while the first is still running waits for its answer. Failures are not kept, so a
   * refused request can be corrected and sent again with the same key.
   */
  run(req: IdempotencyRequest, exec: () => Promise<Answer>): Promise<Answer & { replayed: boolean }>;
}

/** The `Idempotency-Key` header's value, undefined when absent; a malformed key is refused. */
export function idempotencyKeyOf(header: string | string[] | undefined): string | undefined {
  if (header === undefined) return undefined;
  const key = Array.isArray(header) ? header.join(',') : header;
  if (!KEY.test(key)) {
    throw new DomainError(
      'validation_failed',
      'Check the Idempotency-Key header: 1 to 255 visible ASCII characters, e.g. a UUID',
      {
        'Idempotency-Key': 'Use 1 to 255 visible ASCII characters',
      },
    );
  }
  return key;
}

/** JSON with object keys sorted, so the same body hashes the same whatever its key order. */
function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(',')}]`;
  if (value && typeof value === 'object') {
    const entries = Object.keys(value)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonicalJson((value as Record<string, unknown>)[k])}`);
    return `{${entries.join(',')}}`;
  }
  return JSON.stringify(value) ?? 'null';
}

export function requestHash(method: string, url: string, body: unknown): string {
  return createHash('sha256')
    .update(`${method.toUpperCase()} ${url}\n${canonicalJson(body ?? null)}`)
    .digest('hex');
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

export function idempotencyStore(db: Db, clock: Clock, waitMs = 30_000, pollMs = 25): IdempotencyStore {
  const reused = () =>
    new DomainError(
      'idempotency_key_reused',
      'This Idempotency-Key was already used for a different request: use a new key for a new request',
      {
        'Idempotency-Key': 'Already used with another body or address',
      },
    );

  return {
    async run(req, exec) {
      const started = performance.now();
      for (;;) {
        const now = clock();
        const expired = new Date(now.getTime() - IDEMPOTENCY_TTL_MS);
        await db.delete(idempotencyKeys).where(lt(idempotencyKeys.createdAt, expired));
        const [claimed] = await db
          .insert(idempotencyKeys)
          .values({ userId: req.userId, key: req.key, route: req.route, requestHash: req.requestHash, createdAt: now })
          .onConflictDoNothing()
          .returning({ id: idempotencyKeys.id });
        if (claimed) {
          let answer: Answer;
          try {
            answer = await exec();
          } catch (err) {
            await db.delete(idempotencyKeys).where(eq(idempotencyKeys.id, claimed.id));
            throw err;
          }
          await db
            .update(idempotencyKeys)
            .set({ status: answer.status, response: answer.body ?? null })
            .where(eq(idempotencyKeys.id, claimed.id));
          return { ...answer, replayed: false };
        }
        const [seen] = await db
          .select()
          .from(idempotencyKeys)
          .where(and(eq(idempotencyKeys.userId, req.userId), eq(idempotencyKeys.key, req.key)));
        if (!seen) continue; // the first attempt failed and let go of the key: try to claim it
        if (seen.route !== req.route || seen.requestHash !== req.requestHash) throw reused();
        if (seen.status !== null) return { status: seen.status, body: seen.response, replayed: true };
        if (now.getTime() - seen.createdAt.getTime() > ABANDONED_MS) {
          await db.delete(idempotencyKeys).where(and(eq(idempotencyKeys.id, seen.id), isNull(idempotencyKeys.status)));
          continue;
        }
        if (performance.now() - started > waitMs) {
          throw conflict('A request with this Idempotency-Key is still being carried out: ask again in a moment');
        }
        await sleep(pollMs);
      }
    },
  };
}
