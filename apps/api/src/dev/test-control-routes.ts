import express, { type Router } from 'express';
import { z } from 'zod';
import type { Db } from '../db/client';
import type { Clock } from '../time/clock';
import { DomainError } from '../http/errors';
import { seedDemo } from '../demo/seed';

/** What the browser tests may do to a test API (never mounted outside NODE_ENV=test). */
export interface TestControl {
  setClock(at: Date): void;
}

const clockBody = z.strictObject({ at: z.iso.datetime({ offset: true }) });
const demoBody = z.strictObject({
  tag: z.string().regex(/^[a-z0-9-]{1,24}$/, 'lower-case letters, digits and dashes, at most 24'),
  /** The original depot alone (default: quick, what most journeys use) or the whole district of three. */
  depots: z.enum(['main', 'district']).default('main'),
});

/**
 * Test-only endpoints, outside the public API (not in OpenAPI): stand the API's clock at an
 * instant, and seed a demo district of a test's own at that instant.
 */
export function testControlRouter(db: Db, clock: Clock, control: TestControl): Router {
  const router = express.Router();
  router.post('/clock', (req, res) => {
    const body = clockBody.safeParse(req.body);
    if (!body.success) throw new DomainError('validation_failed', 'Send { "at": ISO instant with offset }');
    control.setClock(new Date(body.data.at));
    res.json({ now: clock().toISOString() });
  });
  router.post('/demo', async (req, res) => {
    const body = demoBody.safeParse(req.body);
    if (!body.success)
      throw new DomainError(
        'validation_failed',
        'Send { "tag": "...", "depots"?: "main" | "district" }: the tag in lower-case letters, digits and dashes',
      );
    const seeded = await seedDemo(db, clock(), body.data.tag, { depots: body.data.depots });
    res.status(201).json({ ...seeded, now: clock().toISOString() });
  });
  return router;
}
