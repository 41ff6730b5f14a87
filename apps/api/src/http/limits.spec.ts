import { count, eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { generateDepot } from '../../../../libs/scheduling/src/testing/generate-depot';
import { meterImports, plans, runs } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses } from '../testing/fleet-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

// Requests too large to serve are refused with 413, a message naming the limit, and no write.
const app = createTestApp();
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
let sup: TestUser;
let fin: TestUser;
let depotId: string;

beforeAll(async () => {
  const org = await createOrganisation(app, { sup: ['supervisor'], fin: ['finance'] });
  ({ sup, fin } = org.users as Record<string, TestUser>);
  depotId = (await createDepot(app.db, org.organisationId)).depot.id;
  await addBuses(app.db, org.organisationId, depotId, ['41']);
});

const runCount = async () => (await app.db.select({ n: count() }).from(runs).where(eq(runs.depotId, depotId)))[0]!.n;
const planCount = async () => (await app.db.select({ n: count() }).from(plans).where(eq(plans.depotId, depotId)))[0]!.n;

describe('size limits', () => {
  it('a JSON body over 1 MB: 413 saying the limit', async () => {
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/plans/what-if`)
      .set(as(sup))
      .send({ padding: 'x'.repeat(1_100_000) })
      .expect(413);
    expect(res.body.error).toEqual({
      code: 'payload_too_large',
      message: 'The request is larger than 1 MB: send at most 1 MB',
    });
    expect(await planCount()).toBe(0);
  });

  it("a runs file over 1 MB: 413 naming the file's size and the limit, nothing saved", async () => {
    const row = '41,06:10,08:25,31.5,,\r\n';
    const csv =
      'bus,pull_out,pull_in,miles,kwh,arrival_soc_pct\r\n' + row.repeat(Math.ceil((1.2 * 1024 * 1024) / row.length));
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/service-days/2026-12-07/csv`)
      .set(as(sup))
      .send({ csv })
      .expect(413);
    expect(res.body.error.message).toBe('The runs file is 1.2 MB; at most 1 MB is accepted');
    expect(res.body.error.fields).toEqual({ csv: 'At most 1 MB' });
    expect(await runCount()).toBe(0);
  });

  it('a runs file with more than 10,000 rows: 413 naming the rows and the limit, nothing saved', async () => {
    const csv = 'bus,pull_out,pull_in,miles,kwh,arrival_soc_pct\n' + '41,06:10,08:25,31,,\n'.repeat(10_001);
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/service-days/2026-12-07/csv`)
      .set(as(sup))
      .send({ csv })
      .expect(413);
    expect(res.body.error.message).toBe("The runs file has 10,001 rows; at most 10,000 runs fit in one day's file");
    expect(await runCount()).toBe(0);
  });

  it('a runs file within the limits still goes through (parsed in the pool)', async () => {
    const csv = 'bus,pull_out,pull_in,miles,kwh,arrival_soc_pct\n41,06:10,08:25,31,,\n41,14:05,16:30,29,,\n';
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/service-days/2026-12-08/csv`)
      .set(as(sup))
      .send({ csv })
      .expect(200);
    expect(res.body.runs).toHaveLength(2);
    const bad = await app
      .request()
      .post(`/api/depots/${depotId}/service-days/2026-12-09/csv`)
      .set(as(sup))
      .send({ csv: 'bus,pull_out,pull_in,miles,kwh,arrival_soc_pct\n41,6h10,08:25,31,,\n' })
      .expect(400);
    expect(bad.body.error.code).toBe('validation_failed');
    // The error raised in the worker thread arrives whole: code, message and the line's fields.
    expect(bad.body.error.message).toMatch(/line needs fixing; nothing was saved/);
    expect(bad.body.error.fields).toHaveProperty(['line 2.pull_out']);
  });

  it('a what-if over 100,000 bus-slots: 413 naming its size and the limit, nothing queued', async () => {
    const scenario = { ...generateDepot({ buses: 400 }), slotMinutes: 1 };
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/plans/what-if`)
      .set(as(sup))
      .send(scenario)
      .expect(413);
    expect(res.body.error.message).toMatch(
      /^The scenario has 400 buses x 1,440 slots = 576,000; at most 100,000 bus-slots are planned at once/,
    );
    expect(await planCount()).toBe(0);
  });

  it('a meter file over 20 MB: 413 naming its size and the limit, nothing imported', async () => {
    // Two bytes a character: over 20 MB of UTF-8 while under the character count the contract allows.
    const content = 'é'.repeat(10_600_000);
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/meter-data`)
      .set(as(fin))
      .send({ fileName: 'big.csv', content, billingPeriodStart: '2026-12-01' })
      .expect(413);
    expect(res.body.error.message).toBe('The meter file is 20.2 MB; at most 20 MB is accepted');
    expect(
      (await app.db.select({ n: count() }).from(meterImports).where(eq(meterImports.depotId, depotId)))[0]!.n,
    ).toBe(0);
  });
});
