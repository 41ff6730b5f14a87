import { and, eq } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { beforeAll, describe, expect, it } from 'vitest';
import { ratePlanDefinitionSchema } from '@nightyard/contracts';
import { chargers, depotRatePlans, depots, plans, ratePlans } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { mailFor } from '../testing/mail';
import { TEST_START, createOrganisation, createTestApp, signInAgain, type TestUser } from '../testing/test-app';

const ZONE = 'America/Chicago';
let clock = TEST_START;
const pushed: string[] = [];
const app = createTestApp({ clock: () => clock, onPlanPublished: (id) => void pushed.push(id) });
let sup: TestUser;
let yard: TestUser;
let fin: TestUser;
let organisationId: string;
let depotId: string;
let generatedId: string;
let whatIfId: string;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const NUMBERS = ['61', '62', '63'];

async function finished(id: string) {
  for (let i = 0; i < 200; i++) {
    const res = await app.request().get(`/api/plans/${id}`).set(as(sup)).expect(200);
    if (res.body.plan.status === 'done' || res.body.plan.status === 'failed') return res.body.plan;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('plan did not finish');
}

const nightPlans = () =>
  app.db
    .select()
    .from(plans)
    .where(and(eq(plans.depotId, depotId), eq(plans.serviceDate, '2026-12-09')));

beforeAll(async () => {
  const org = await createOrganisation(app, { sup: ['supervisor'], yard: ['yard'], fin: ['finance'] });
  ({ sup, yard, fin } = org.users as Record<string, TestUser>);
  organisationId = org.organisationId;
  depotId = (await createDepot(app.db, organisationId)).depot.id;
  await addBuses(app.db, organisationId, depotId, NUMBERS);
  for (const date of ['2026-12-09', '2026-12-10']) {
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(sup))
      .send({ runs: dayRuns(date, NUMBERS) })
      .expect(200);
  }
  // The study: the depot's own night on a 150 kW service limit, charger C still in it.
  const generated = await app
    .request()
    .post(`/api/depots/${depotId}/plans`)
    .set(as(sup))
    .send({ serviceDate: '2026-12-09' })
    .expect(202);
  generatedId = (await finished(generated.body.plan.id)).id;
  const file = await app.request().get(`/api/plans/${generatedId}/scenario`).set(as(sup)).expect(200);
  const res = await app
    .request()
    .post(`/api/depots/${depotId}/plans/what-if`)
    .set(as(sup))
    .send({ ...file.body, site: { ...file.body.site, limitKw: 150 } })
    .expect(202);
  whatIfId = res.body.plan.id;
  expect((await finished(whatIfId)).status).toBe('done');
});

describe('what-if plans are studies', () => {
  it('are stored and answered with their kind: what-if', async () => {
    const [row] = await app.db.select().from(plans).where(eq(plans.id, whatIfId));
    expect(row!.kind).toBe('what-if');
    const list = await app
      .request()
      .get(`/api/depots/${depotId}/plans`)
      .query({ serviceDate: '2026-12-09' })
      .set(as(fin))
      .expect(200);
    expect(list.body.plans.map((p: { version: number; kind: string }) => [p.version, p.kind])).toEqual([
      [2, 'what-if'],
      [1, 'generated'],
    ]);
    const detail = await app.request().get(`/api/plans/${whatIfId}`).set(as(fin)).expect(200);
    expect(detail.body.plan.notes[0]).toMatch(/What-if: a study .* never published/);
    const compare = await app
      .request()
      .get(`/api/plans/${whatIfId}/compare`)
      .query({ with: generatedId })
      .set(as(sup))
      .expect(200);
    expect(compare.body.from).toMatchObject({ version: 1, kind: 'generated' });
    expect(compare.body.to).toMatchObject({ version: 2, kind: 'what-if' });
    const openapi = await app.request().get('/api/openapi.json').expect(200);
    expect(JSON.stringify(openapi.body)).toContain('what-if: a study from an uploaded scenario file, never published');
  });

  it('publishing one is refused with 409 and nothing changes: no state, no e-mail, no profiles', async () => {
    const before = await nightPlans();
    const res = await app
      .request()
      .post(`/api/plans/${whatIfId}/publish`)
      .set(as(sup))
      .send({ expectedPublishedId: null })
      .expect(409);
    expect(res.body.error.message).toMatch(
      /Version 2 is a what-if.*never published, e-mailed or sent to chargers.*Adopt it/,
    );
    expect(await nightPlans()).toEqual(before);
    expect(pushed).toEqual([]);
    expect(await mailFor(yard.email, 1, 500)).toHaveLength(0);
    await app.request().get(`/api/plans/${whatIfId}/ocpp`).query({ version: '1.6' }).set(as(sup)).expect(409);
  });

  it('adoption lists what differs from the depot now and changes nothing until adopted', async () => {
    // Since the study: charger C out of service, a larger service limit, a new rate plan.
    await app.db
      .update(chargers)
      .set({ status: 'out_of_service', statusReason: 'cable damaged' })
      .where(and(eq(chargers.depotId, depotId), eq(chargers.label, 'C')));
    await app.db.update(depots).set({ serviceLimitKw: 400 }).where(eq(depots.id, depotId));
    const definition = ratePlanDefinitionSchema.parse({
      currency: 'USD',
      seasons: [
        {
          name: 'All year',
          fromMonth: 1,
          toMonth: 12,
          offPeakPrice: 0.09,
          facilityDemandCharge: 12,
          periods: [
            {
              name: 'on-peak',
              price: 0.31,
              demandCharge: 9.5,
              windows: [{ dayTypes: ['weekday'], from: '16:00', to: '21:00' }],
            },
          ],
        },
      ],
    });
    const [rate] = await app.db
      .insert(ratePlans)
      .values({ organisationId, name: 'Winter TOU', currency: 'USD', definition })
      .returning();
    await app.db
      .insert(depotRatePlans)
      .values({ organisationId, depotId, ratePlanId: rate!.id, effectiveFrom: '2026-12-01' });

    const count = (await nightPlans()).length;
    const res = await app.request().get(`/api/plans/${whatIfId}/adoption`).set(as(sup)).expect(200);
    expect(res.body).toMatchObject({
      whatIf: { id: whatIfId, version: 2 },
      serviceDate: '2026-12-09',
      includesMidday: true,
    });
    expect(res.body.differences).toEqual([
      'Service limit in the study 150 kW, depot now 400 kW',
      'Charger C out of service now (cable damaged): left out',
      'Rate plan changed: off-peak energy in the study 0.08 USD/kWh, depot now 0.09 USD/kWh',
      'Rate plan changed: on-peak energy in the study 0.27 USD/kWh, depot now 0.31 USD/kWh',
    ]);
    expect((await nightPlans()).length).toBe(count);
  });

  it('adopting makes a normal draft from the depot now, the differences first in its notes; it publishes as any draft', async () => {
    const res = await app.request().post(`/api/plans/${whatIfId}/adopt`).set(as(sup)).expect(202);
    expect(res.body.plan).toMatchObject({
      kind: 'generated',
      state: 'draft',
      version: 3,
      serviceDate: '2026-12-09',
      includesMidday: true,
    });
    expect(res.body.adoption.differences).toContain('Charger C out of service now (cable damaged): left out');
    const draft = await finished(res.body.plan.id);
    expect(draft.status).toBe('done');
    expect(draft.notes.slice(0, 3)).toEqual([
      "Adopted from what-if version 2, re-checked against the depot as it is now: 4 differences from the study, the depot's data used.",
      'Differs from the study: Service limit in the study 150 kW, depot now 400 kW.',
      'Differs from the study: Charger C out of service now (cable damaged): left out.',
    ]);
    const [row] = await app.db.select().from(plans).where(eq(plans.id, draft.id));
    const scenario = row!.scenario;
    expect(scenario.site.limitKw).toBe(400);
    expect(scenario.chargers.map((c) => c.id)).toEqual(['A', 'B']);
    expect(scenario.tariff.offPeakPrice).toBe(0.09);
    for (const s of draft.result.sessions) expect(s.charger).not.toBe('C');
    // The study stays a study.
    const [study] = await app.db.select().from(plans).where(eq(plans.id, whatIfId));
    expect(study).toMatchObject({ kind: 'what-if', state: 'draft' });
    // The adopted draft is a normal one: it publishes, e-mails the yard and goes to the chargers.
    await app
      .request()
      .post(`/api/plans/${draft.id}/publish`)
      .set(as(sup))
      .send({ expectedPublishedId: null })
      .expect(200);
    expect(pushed).toEqual([draft.id]);
    const [mail] = await mailFor(yard.email);
    expect(mail!.subject).toMatch(/Charging plan published: .*\(version 3\)/);
  });

  it('adopting anything but a what-if is refused', async () => {
    const res = await app.request().post(`/api/plans/${generatedId}/adopt`).set(as(sup)).expect(409);
    expect(res.body.error.message).toMatch(/Version 1 is not a what-if/);
  });

  it('a what-if that cannot be re-checked is refused with the reason; nothing changes', async () => {
    await app.db.update(chargers).set({ status: 'out_of_service' }).where(eq(chargers.depotId, depotId));
    try {
      const count = (await nightPlans()).length;
      const res = await app.request().post(`/api/plans/${whatIfId}/adopt`).set(as(sup)).expect(409);
      expect(res.body.error.message).toMatch(
        /What-if version 2 cannot be re-checked against Test depot as it is now: Test depot has no charger in service\. Nothing was changed\./,
      );
      await app.request().get(`/api/plans/${whatIfId}/adoption`).set(as(sup)).expect(409);
      expect((await nightPlans()).length).toBe(count);
    } finally {
      await app.db
        .update(chargers)
        .set({ status: 'in_service', statusReason: null })
        .where(eq(chargers.depotId, depotId));
    }
  });

  it('roles and isolation', async () => {
    await app.request().post(`/api/plans/${whatIfId}/adopt`).set(as(fin)).expect(403);
    await app.request().get(`/api/plans/${whatIfId}/adoption`).set(as(yard)).expect(403);
    const outsider = (await createOrganisation(app, { s: ['supervisor'] })).users.s!;
    await app.request().post(`/api/plans/${whatIfId}/adopt`).set(as(outsider)).expect(404);
  });

  it('once its night has ended a what-if is refused, nothing changes', async () => {
    clock = DateTime.fromISO('2026-12-10T12:00', { zone: ZONE }).toJSDate();
    await signInAgain(app, sup);
    const count = (await nightPlans()).length;
    const res = await app.request().post(`/api/plans/${whatIfId}/adopt`).set(as(sup)).expect(409);
    expect(res.body.error.message).toMatch(
      /The night of Wednesday, December 9, 2026 has ended: what-if version 2 can no longer be adopted/,
    );
    expect((await nightPlans()).length).toBe(count);
  });
});
