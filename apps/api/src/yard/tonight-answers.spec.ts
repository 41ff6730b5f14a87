import { eq } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { beforeAll, describe, expect, it } from 'vitest';
import type { YardStep } from '@nightyard/contracts';
import { depots } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, signInAgain, type TestUser } from '../testing/test-app';
import { OVERDUE_AFTER_MS } from './yard-steps';

// Tonight's answer is remembered between requests (the Yard asks on every refresh): it must still
// change the moment a step turns overdue, a step is confirmed, the depot is renamed, or the clock
// stands earlier than when it was remembered.

const ZONE = 'America/Chicago';
const at = (local: string) => DateTime.fromISO(local, { zone: ZONE }).toJSDate();
let clock = at('2026-12-09T21:00');
const app = createTestApp({ clock: () => clock });
let yard: TestUser;
let sup: TestUser;
let depotId: string;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const NUMBERS = ['61', '62', '63'];

async function tonight() {
  return (await app.request().get(`/api/depots/${depotId}/tonight`).set(as(yard)).expect(200)).body as {
    now: string;
    depot: { name: string };
    plan: { id: string };
    steps: YardStep[];
  };
}

async function standAt(instant: Date) {
  clock = instant;
  await signInAgain(app, yard, sup);
}

beforeAll(async () => {
  const org = await createOrganisation(app, { yard: ['yard'], sup: ['supervisor'] });
  ({ yard, sup } = org.users as Record<string, TestUser>);
  depotId = (await createDepot(app.db, org.organisationId)).depot.id;
  await addBuses(app.db, org.organisationId, depotId, NUMBERS);
  for (const date of ['2026-12-09', '2026-12-10']) {
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(sup))
      .send({ runs: dayRuns(date, NUMBERS, () => 16) })
      .expect(200);
  }
  await publishedPlan(app, sup, depotId, '2026-12-09');
});

describe('Tonight, remembered between requests', () => {
  it('renews its instant, turns a step overdue ten minutes after its time, and goes back when the clock stands earlier', async () => {
    const first = await tonight();
    const step = first.steps
      .filter((s) => s.status === 'upcoming')
      .sort((a, b) => Date.parse(a.at) - Date.parse(b.at))[0]!;
    expect(step).toBeDefined();

    // Just before it turns overdue: the same steps, a new instant.
    await standAt(new Date(Date.parse(step.at) + OVERDUE_AFTER_MS - 60_000));
    const before = await tonight();
    expect(before.now).toBe(clock.toISOString());
    expect(before.steps.find((s) => s.key === step.key)!.status).toBe('upcoming');

    await standAt(new Date(Date.parse(step.at) + OVERDUE_AFTER_MS + 60_000));
    expect((await tonight()).steps.find((s) => s.key === step.key)!.status).toBe('overdue');

    await standAt(at('2026-12-09T21:00'));
    const again = await tonight();
    expect(again.now).toBe(clock.toISOString());
    expect(again.steps).toEqual(first.steps);
  });

  it('shows a confirmation and a depot renamed by another process on the next request', async () => {
    await standAt(at('2026-12-09T21:00'));
    const first = await tonight();
    const step = first.steps.find((s) => s.status === 'upcoming')!;
    await app
      .request()
      .post('/api/yard/confirmations')
      .set(as(yard))
      .send({ planId: first.plan.id, stepKey: step.key })
      .expect(200);
    expect((await tonight()).steps.find((s) => s.key === step.key)!.status).toBe('done');

    const renamed = `${first.depot.name} (north)`;
    // Written straight to the database, as another process would: nothing in the API is told.
    await app.db.update(depots).set({ name: renamed }).where(eq(depots.id, depotId));
    expect((await tonight()).depot.name).toBe(renamed);
  });
});
