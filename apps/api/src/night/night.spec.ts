import { and, eq } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { beforeAll, describe, expect, it } from 'vitest';
import type { PlanResult } from '@nightyard/contracts';
import { plans } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { deliveredBefore, generatedPlan, publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, signInAgain, type TestUser } from '../testing/test-app';

// Each test stands the API's clock at a fixed instant of the depot's week, never at the machine's time.
const ZONE = 'America/Chicago';
const at = (local: string) => DateTime.fromISO(local, { zone: ZONE }).toJSDate();
let clock = at('2026-12-08T13:00');
const app = createTestApp({ clock: () => clock });
const NUMBERS = ['71', '72', '73', '74'];
let sup: TestUser;
let fin: TestUser;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });

async function standAt(local: string) {
  clock = at(local);
  await signInAgain(app, sup, fin);
}

async function depotWithWeek(): Promise<string> {
  const org = await createOrganisation(app, { sup: ['supervisor'], fin: ['finance'] });
  ({ sup, fin } = org.users as Record<string, TestUser>);
  const depotId = (await createDepot(app.db, org.organisationId)).depot.id;
  await addBuses(app.db, org.organisationId, depotId, NUMBERS);
  for (const date of ['2026-12-07', '2026-12-08', '2026-12-09', '2026-12-10', '2026-12-11', '2026-12-14']) {
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(sup))
      .send({ runs: dayRuns(date, NUMBERS, () => 20) })
      .expect(200);
  }
  return depotId;
}

describe('which night it is', () => {
  let depotId: string;
  beforeAll(async () => {
    clock = at('2026-12-07T10:00');
    depotId = await depotWithWeek();
  });

  const night = async () => (await app.request().get(`/api/depots/${depotId}/night`).set(as(fin)).expect(200)).body;

  it("a weekday afternoon (15:00): tonight is that day's night", async () => {
    await standAt('2026-12-09T15:00');
    const n = await night();
    expect(n.inForce.serviceDate).toBe('2026-12-09');
    expect(n.tonight).toEqual(n.inForce);
    expect(n.timezone).toBe(ZONE);
  });

  it("Wednesday 00:02: tonight is Tuesday's night, still under way until the last pull-out", async () => {
    await standAt('2026-12-09T00:02');
    const n = await night();
    expect(n.tonight).toMatchObject({ serviceDate: '2026-12-08', nextServiceDate: '2026-12-09', fromRuns: true });
    expect(DateTime.fromISO(n.tonight.end, { zone: ZONE }).toFormat('HH:mm')).toBe('06:25');
    expect(n.next.serviceDate).toBe('2026-12-09');
  });

  it('Friday 22:00: the night runs to Monday', async () => {
    await standAt('2026-12-11T22:00');
    expect((await night()).tonight).toMatchObject({ serviceDate: '2026-12-11', nextServiceDate: '2026-12-14' });
  });

  it("tells the client the API's time on every answer", async () => {
    await standAt('2026-12-09T00:02');
    const res = await app.request().get(`/api/depots/${depotId}/night`).set(as(fin)).expect(200);
    expect(Number(res.headers['x-server-time'])).toBe(clock.getTime());
    expect(Date.parse(res.body.now)).toBe(clock.getTime());
  });

  it("another organisation's depot does not exist for the caller", async () => {
    const other = await createOrganisation(app, { f: ['finance'] });
    await app.request().get(`/api/depots/${depotId}/night`).set(as(other.users.f!)).expect(404);
    await app.request().get(`/api/depots/${depotId}/nights/2026-12-12`).set(as(other.users.f!)).expect(404);
  });

  it('a date among the service days: its own night, or inside the night of the day before it', async () => {
    const of = async (date: string) =>
      (await app.request().get(`/api/depots/${depotId}/nights/${date}`).set(as(fin)).expect(200)).body;
    expect(await of('2026-12-11')).toEqual({
      date: '2026-12-11',
      serviceDay: true,
      within: null,
      previous: '2026-12-10',
      next: '2026-12-14',
    });
    // Saturday and Sunday belong to Friday's night.
    expect(await of('2026-12-12')).toMatchObject({ serviceDay: false, within: '2026-12-11', next: '2026-12-14' });
    expect(await of('2026-12-13')).toMatchObject({ serviceDay: false, within: '2026-12-11', previous: '2026-12-11' });
    // Before the first service day and after the last: no night holds it.
    expect(await of('2026-12-06')).toEqual({
      date: '2026-12-06',
      serviceDay: false,
      within: null,
      previous: null,
      next: '2026-12-07',
    });
    expect(await of('2026-12-15')).toMatchObject({
      serviceDay: false,
      within: null,
      previous: '2026-12-14',
      next: null,
    });
    await app.request().get(`/api/depots/${depotId}/nights/2026-13-01`).set(as(fin)).expect(400);
  });
});

describe('a plan for a night already under way', () => {
  let depotId: string;
  beforeAll(async () => {
    clock = at('2026-12-07T10:00');
    depotId = await depotWithWeek();
  });

  it('with no published plan: starts now, takes the buses as they came in, and says so', async () => {
    await standAt('2026-12-08T00:02');
    const plan = await generatedPlan(app, sup, depotId, '2026-12-07');
    expect(plan.status).toBe('done');
    const detail = (await app.request().get(`/api/plans/${plan.id}`).set(as(sup)).expect(200)).body.plan;
    const result: PlanResult = detail.result;
    const cut = at('2026-12-08T00:15').getTime();
    expect(Date.parse(result.slots[0]!.start)).toBe(cut);
    for (const s of result.sessions) expect(Date.parse(s.start)).toBeGreaterThanOrEqual(cut);
    expect(detail.notes[0]).toMatch(/under way at 00:02 with no published plan: this plan starts at 00:15/);
  });

  it('with a published plan: before now it stands as published, nothing new is placed in the past', async () => {
    await standAt('2026-12-08T13:00');
    const firstId = await publishedPlan(app, sup, depotId, '2026-12-08');
    await standAt('2026-12-09T00:02');
    const plan = await generatedPlan(app, sup, depotId, '2026-12-08');
    const [first] = await app.db.select().from(plans).where(eq(plans.id, firstId));
    const [second] = await app.db.select().from(plans).where(eq(plans.id, plan.id));
    const before = first!.result!;
    const after = second!.result!;
    const cut = at('2026-12-09T00:15').getTime();
    const a = deliveredBefore(before, cut);
    const b = deliveredBefore(after, cut);
    for (const bus of NUMBERS) expect(b[bus] ?? 0).toBeCloseTo(a[bus] ?? 0, 6);
    // Every session either comes from the published plan before the cut-off or starts after it.
    const kept = new Set(before.sessions.map((s) => `${s.bus} ${s.charger} ${Date.parse(s.start)}`));
    for (const s of after.sessions) {
      if (Date.parse(s.start) < cut) expect(kept.has(`${s.bus} ${s.charger} ${Date.parse(s.start)}`)).toBe(true);
    }
    expect(second!.notes[0]).toMatch(
      /under way at 00:02: this plan starts at 00:15; before it, version 1 stands as published/,
    );
    expect(second!.replanState).toMatchObject({ from: '2026-12-09T00:02', previousPlanId: firstId });
  });

  it('a night that is over is refused, and nothing is stored', async () => {
    await standAt('2026-12-09T12:00');
    const count = async () =>
      (
        await app.db
          .select()
          .from(plans)
          .where(and(eq(plans.depotId, depotId), eq(plans.serviceDate, '2026-12-07')))
      ).length;
    const n = await count();
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/plans`)
      .set(as(sup))
      .send({ serviceDate: '2026-12-07', includeMidday: false })
      .expect(400);
    expect(res.body.error.message).toMatch(/That night ended at Tue 8 Dec 06:30: plans are for nights still to come/);
    expect(await count()).toBe(n);
  });
});
