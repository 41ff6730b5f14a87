import { readFileSync } from 'node:fs';
import { beforeAll, describe, expect, it } from 'vitest';
import { createDepot } from '../testing/depot-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

const app = createTestApp();
let fac: TestUser;
let yard: TestUser;
let outsider: TestUser;
let depotId: string;
const urdb = JSON.parse(
  readFileSync(new URL('./fixtures/urdb-summer-winter-evening-peak.json', import.meta.url), 'utf8'),
);
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });

beforeAll(async () => {
  const org = await createOrganisation(app, { fac: ['facilities'], yard: ['yard'] });
  fac = org.users.fac!;
  yard = org.users.yard!;
  depotId = (await createDepot(app.db, org.organisationId)).depot.id;
  outsider = (await createOrganisation(app, { fac: ['facilities'] })).users.fac!;
});

describe('rate plans', () => {
  it('imports a URDB record for review, saves it, assigns it and previews a day', async () => {
    const mapped = await app.request().post('/api/rate-plans/import-urdb').set(as(fac)).send(urdb).expect(200);
    const before = await app.request().get('/api/rate-plans').set(as(fac)).expect(200);
    expect(before.body.ratePlans.map((p: { name: string }) => p.name)).not.toContain(mapped.body.name);
    const saved = await app
      .request()
      .post('/api/rate-plans')
      .set(as(fac))
      .send({ name: mapped.body.name, definition: mapped.body.definition })
      .expect(201);
    // Dated by the app's clock (a test instant), not the machine's.
    expect(Math.abs(Date.parse(saved.body.ratePlan.createdAt) - app.deps.clock().getTime())).toBeLessThan(60_000);
    await app
      .request()
      .post(`/api/depots/${depotId}/rate-plans`)
      .set(as(fac))
      .send({ ratePlanId: saved.body.ratePlan.id, effectiveFrom: '2027-06-01' })
      .expect(204);
    const preview = await app
      .request()
      .get(`/api/rate-plans/${saved.body.ratePlan.id}/preview`)
      .query({ date: '2027-07-14' })
      .set(as(yard))
      .expect(200);
    expect(
      preview.body.intervals.map((i: { start: string; price: number }) => [i.start.slice(11, 16), i.price]),
    ).toEqual([
      ['00:00', 0.0912],
      ['16:00', 0.2854],
      ['21:00', 0.0912],
    ]);
  });

  it('the yard reads rates but cannot import or save', async () => {
    await app.request().get('/api/rate-plans').set(as(yard)).expect(200);
    await app.request().post('/api/rate-plans/import-urdb').set(as(yard)).send(urdb).expect(403);
  });

  it('a malformed URDB file is refused with the field, and nothing is saved', async () => {
    const bad = structuredClone(urdb);
    bad.energyweekdayschedule[2][14] = 9;
    const res = await app.request().post('/api/rate-plans/import-urdb').set(as(fac)).send(bad).expect(400);
    expect(res.body.error.fields['energyweekdayschedule[2][14]']).toMatch(/Period 9 is not in energyratestructure/);
  });

  it('overlapping windows and negative prices are refused with their paths', async () => {
    const res = await app
      .request()
      .post('/api/rate-plans')
      .set(as(fac))
      .send({
        name: 'Broken',
        definition: {
          currency: 'USD',
          seasons: [
            {
              name: 'All',
              fromMonth: 1,
              toMonth: 12,
              offPeakPrice: -0.01,
              periods: [
                {
                  name: 'p',
                  price: 0.2,
                  windows: [
                    { dayTypes: ['weekday'], from: '16:00', to: '20:00' },
                    { dayTypes: ['weekday', 'weekend'], from: '19:00', to: '21:00' },
                  ],
                },
              ],
            },
          ],
        },
      })
      .expect(400);
    expect(res.body.error.fields['definition.seasons[0].offPeakPrice']).toBe('The off-peak price cannot be negative');
    expect(res.body.error.fields['definition.seasons[0].periods[0].windows[1]']).toMatch(
      /Overlaps "p" 16:00-20:00 on weekdays from 19:00 to 20:00/,
    );
  });

  it('a holiday listed twice is refused (one typed over another), and nothing is saved', async () => {
    const before = (await app.request().get('/api/rate-plans').set(as(fac)).expect(200)).body.ratePlans.length;
    const res = await app
      .request()
      .post('/api/rate-plans')
      .set(as(fac))
      .send({
        name: 'Twice Christmas',
        definition: {
          currency: 'USD',
          seasons: [{ name: 'All', fromMonth: 1, toMonth: 12, offPeakPrice: 0.08, periods: [] }],
          holidays: ['2026-12-25', '2026-12-25', '2027-01-01'],
        },
      })
      .expect(400);
    expect(res.body.error.fields['definition.holidays[1]']).toBe(
      '2026-12-25 is already holiday 1: remove one, or give the date you meant',
    );
    expect((await app.request().get('/api/rate-plans').set(as(fac)).expect(200)).body.ratePlans).toHaveLength(before);
  });

  it('another organisation cannot read, preview or assign the plan', async () => {
    const { body } = await app.request().get('/api/rate-plans').set(as(fac)).expect(200);
    const id = body.ratePlans[0].id;
    await app.request().get(`/api/rate-plans/${id}`).set(as(outsider)).expect(404);
    await app
      .request()
      .get(`/api/rate-plans/${id}/preview`)
      .query({ date: '2027-01-01' })
      .set(as(outsider))
      .expect(404);
    await app
      .request()
      .post(`/api/depots/${depotId}/rate-plans`)
      .set(as(outsider))
      .send({ ratePlanId: id, effectiveFrom: '2027-01-01' })
      .expect(404);
  });

  it('a plan in use cannot be deleted', async () => {
    const { body } = await app.request().get(`/api/depots/${depotId}`).set(as(fac)).expect(200);
    const res = await app
      .request()
      .delete(`/api/rate-plans/${body.depot.ratePlans[0].ratePlanId}`)
      .set(as(fac))
      .expect(409);
    expect(res.body.error.message).toMatch(/A depot uses this rate plan/);
  });
});
