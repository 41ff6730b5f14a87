import { and, eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { runs } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

const app = createTestApp();
let sup: TestUser;
let fin: TestUser;
let yard: TestUser;
let depotId: string;
let outsider: TestUser;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const day = (date: string) => `/api/depots/${depotId}/service-days/${date}`;
const runCount = async (date: string) =>
  (
    await app.db
      .select()
      .from(runs)
      .where(and(eq(runs.depotId, depotId), eq(runs.serviceDate, date)))
  ).length;

beforeAll(async () => {
  const org = await createOrganisation(app, { sup: ['supervisor'], fin: ['finance'], yard: ['yard'] });
  ({ sup, fin, yard } = org.users as Record<string, TestUser>);
  depotId = (await createDepot(app.db, org.organisationId)).depot.id;
  await addBuses(app.db, org.organisationId, depotId);
  outsider = (await createOrganisation(app, { sup: ['supervisor'] })).users.sup!;
});

describe('buses', () => {
  it('a supervisor adds a bus; finance reads; the yard cannot add', async () => {
    const bus = { number: '15', usableKwh: 210, maxChargeKw: 80, connector: 'SAE J1772 CCS1', kwhPerMile: 1.3 };
    const res = await app.request().post(`/api/depots/${depotId}/buses`).set(as(sup)).send(bus).expect(201);
    expect(res.body.bus).toMatchObject({ number: '15', ceilingPct: 90, reservePct: 15, status: 'active' });
    await app
      .request()
      .post(`/api/depots/${depotId}/buses`)
      .set(as(yard))
      .send({ ...bus, number: '16' })
      .expect(403);
    const list = await app.request().get(`/api/depots/${depotId}/buses`).set(as(fin)).expect(200);
    expect(list.body.buses.map((b: { number: string }) => b.number)).toEqual(['11', '12', '13', '14', '15']);
    const dup = await app.request().post(`/api/depots/${depotId}/buses`).set(as(sup)).send(bus).expect(409);
    expect(dup.body.error.fields.number).toBe('Already used in this depot');
    const bad = await app
      .request()
      .post(`/api/depots/${depotId}/buses`)
      .set(as(sup))
      .send({ ...bus, number: '17', reservePct: 95 })
      .expect(400);
    expect(bad.body.error.fields.reservePct).toBe('The reserve must be below the departure ceiling');
  });
});

describe('service day', () => {
  it('stores the runs with energy from miles x consumption x the cold-weather factor', async () => {
    const res = await app
      .request()
      .put(day('2026-12-09'))
      .set(as(sup))
      .send({ forecastLowF: 20, runs: dayRuns('2026-12-09', ['11', '12']) })
      .expect(200);
    // 20 °F is below 32 °F: factor 1.25 (the default table; 10-40 % more in winter is common practice).
    expect(res.body.coldWeatherFactor).toBe(1.25);
    const first = res.body.runs.find(
      (r: { busNumber: string; pullOut: string }) => r.busNumber === '11' && r.pullOut.endsWith('06:10'),
    );
    expect(first.energyKwh).toBeCloseTo(30 * 1.2 * 1.25, 6);
    // Without a reading, bus 11 (196 kWh, reserve 15 %) is taken to leave as a plan leaves it: with
    // its reserve and the day's runs, 45 + 42 kWh: 15 + 87/196*100 = 59.39 % (below its 90 %
    // ceiling). Its first run uses 45 kWh: 59.39 - 45/196*100 = 36.4 % on arrival.
    expect(first.estimatedArrivalSocPct).toBeCloseTo(36.4, 1);
    const second = res.body.runs.find(
      (r: { busNumber: string; pullOut: string }) => r.busNumber === '11' && r.pullOut.endsWith('14:10'),
    );
    // After the afternoon run it is back at its reserve: what the night must put back is the next day's runs.
    expect(second.estimatedArrivalSocPct).toBeCloseTo(15, 1);
  });

  it('refuses a run that ends before it starts, a bus on two runs at once, SOC over 100 %, and saves nothing', async () => {
    const before = await runCount('2026-12-09');
    const res = await app
      .request()
      .put(day('2026-12-09'))
      .set(as(sup))
      .send({
        runs: [
          { busNumber: '11', pullOut: '2026-12-09T09:00', pullIn: '2026-12-09T08:00', miles: 10 },
          { busNumber: '12', pullOut: '2026-12-09T06:00', pullIn: '2026-12-09T09:00', miles: 10, arrivalSocPct: 120 },
        ],
      })
      .expect(400);
    expect(res.body.error.fields['runs[0].pullIn']).toBe('The pull-in must be after the pull-out');
    expect(res.body.error.fields['runs[1].arrivalSocPct']).toBe('The state of charge on arrival is 0 to 100 %');
    const overlap = await app
      .request()
      .put(day('2026-12-09'))
      .set(as(sup))
      .send({
        runs: [
          { busNumber: '11', pullOut: '2026-12-09T06:00', pullIn: '2026-12-09T09:00', miles: 10 },
          { busNumber: '11', pullOut: '2026-12-09T08:30', pullIn: '2026-12-09T10:00', miles: 10 },
        ],
      })
      .expect(400);
    expect(overlap.body.error.fields['runs[1].pullOut']).toMatch(/Bus 11 is still on another run/);
    expect(await runCount('2026-12-09')).toBe(before);
  });

  it('CSV upload: all rows or none, each bad row named by line and column', async () => {
    const template = await app
      .request()
      .get(`${day('2026-12-10')}/csv-template`)
      .set(as(sup))
      .expect(200);
    expect(template.headers['content-type']).toMatch(/text\/csv/);
    expect(template.text.split('\r\n')[0]).toBe('bus,pull_out,pull_in,miles,kwh,arrival_soc_pct');
    // Its example rows name a bus of this depot (its first by number), not an invented 201.
    expect(template.text.split('\r\n')[1]).toBe('11,06:10,08:25,31.5,,');
    const bad = [
      'bus,pull_out,pull_in,miles,kwh,arrival_soc_pct',
      '11,06:10,08:30,31,,',
      '99,06:20,08:40,30,,',
      '12,06:30,08:50,,,',
      '13,14:00,13:00,20,,40',
      '14,07:00,09:00,abc,,',
    ].join('\n');
    const res = await app
      .request()
      .post(`${day('2026-12-10')}/csv`)
      .set(as(sup))
      .send({ csv: bad })
      .expect(400);
    // One pass: the format errors and the unknown bus of line 3 together, named line and column.
    expect(res.body.error.fields).toEqual({
      'line 3.bus': "Bus 99 is not in this depot's fleet",
      'line 4.miles': "Give the run's miles or its energy (kWh)",
      'line 6.miles': '"abc" is not a number',
    });
    expect(res.body.error.message).toBe('3 lines need fixing; nothing was saved');
    expect(await runCount('2026-12-10')).toBe(0);
    // A time past 23:59 is named in the format the file uses; a row with both miles and kWh is refused.
    const times = [
      'bus,pull_out,pull_in,miles,kwh,arrival_soc_pct',
      '11,06:10,25:00,31,,',
      '12,06:20,08:40,30,40,',
    ].join('\n');
    const res3 = await app
      .request()
      .post(`${day('2026-12-10')}/csv`)
      .set(as(sup))
      .send({ csv: times })
      .expect(400);
    expect(res3.body.error.fields).toEqual({
      'line 2.pull_in': '"25:00" is not a time of day: use HH:mm, 00:00 to 23:59 (e.g. 06:10)',
      'line 3.kwh': "Give the run's miles or its kWh, not both: leave one of the two empty",
    });
    // A file saved with semicolons: one plain answer, not an error per column.
    const semi = ['bus;pull_out;pull_in;miles;kwh;arrival_soc_pct', '11;06:10;08:30;31;;'].join('\n');
    const res4 = await app
      .request()
      .post(`${day('2026-12-10')}/csv`)
      .set(as(sup))
      .send({ csv: semi })
      .expect(400);
    expect(res4.body.error.message).toMatch(/separates its columns with semicolons: save it as CSV with commas/);
    expect(Object.keys(res4.body.error.fields)).toEqual(['file']);
    // Overlapping runs name the other run by its line too.
    const overlap = [
      'bus,pull_out,pull_in,miles,kwh,arrival_soc_pct',
      '11,06:10,08:30,31,,',
      '11,07:00,09:00,30,,',
    ].join('\n');
    const res5 = await app
      .request()
      .post(`${day('2026-12-10')}/csv`)
      .set(as(sup))
      .send({ csv: overlap })
      .expect(400);
    expect(res5.body.error.fields['line 3.pull_out']).toBe('Bus 11 is still on another run then (line 2)');
    // Line 5's pull-in before its pull-out is read as the next morning; line 3's bus is unknown.
    const unknownBus = [
      'bus,pull_out,pull_in,miles,kwh,arrival_soc_pct',
      '11,06:10,08:30,31,,',
      '99,06:20,08:40,30,,',
    ].join('\n');
    const res2 = await app
      .request()
      .post(`${day('2026-12-10')}/csv`)
      .set(as(sup))
      .send({ csv: unknownBus })
      .expect(400);
    expect(res2.body.error.fields['line 3.bus']).toBe("Bus 99 is not in this depot's fleet");
    expect(await runCount('2026-12-10')).toBe(0);
    const good = [
      'bus,pull_out,pull_in,miles,kwh,arrival_soc_pct',
      '11,06:10,08:30,31,,',
      '12,14:00,16:30,,40,52',
    ].join('\n');
    const ok = await app
      .request()
      .post(`${day('2026-12-10')}/csv`)
      .set(as(sup))
      .send({ csv: good })
      .expect(200);
    expect(ok.body.runs.map((r: { arrivalSocSource: string | null }) => r.arrivalSocSource)).toEqual([
      null,
      'uploaded',
    ]);
    // Saving the day again keeps an unchanged uploaded reading as uploaded; a changed one is typed.
    const rows = ok.body.runs.map(
      (r: {
        busNumber: string;
        pullOut: string;
        pullIn: string;
        miles: number | null;
        kwh: number | null;
        arrivalSocPct: number | null;
      }) => ({
        busNumber: r.busNumber,
        pullOut: r.pullOut,
        pullIn: r.pullIn,
        miles: r.miles,
        kwh: r.kwh,
        arrivalSocPct: r.arrivalSocPct,
      }),
    );
    const same = await app.request().put(day('2026-12-10')).set(as(sup)).send({ runs: rows }).expect(200);
    expect(same.body.runs[1].arrivalSocSource).toBe('uploaded');
    rows[1].arrivalSocPct = 50;
    const changed = await app.request().put(day('2026-12-10')).set(as(sup)).send({ runs: rows }).expect(200);
    expect(changed.body.runs[1].arrivalSocSource).toBe('typed');
  });

  it('a header that does not match the template', async () => {
    const res = await app
      .request()
      .post(`${day('2026-12-11')}/csv`)
      .set(as(sup))
      .send({ csv: 'bus,out,in\n11,06:00,08:00' })
      .expect(400);
    expect(res.body.error.fields['line 1.pull_out']).toMatch(/missing/);
    expect(res.body.error.fields['line 1.out']).toMatch(/Unknown column/);
  });

  it('copies a previous day to the same wall-clock times', async () => {
    const res = await app
      .request()
      .post(`${day('2026-12-16')}/copy`)
      .set(as(sup))
      .send({ fromDate: '2026-12-09' })
      .expect(200);
    expect(res.body.runs).toHaveLength(4);
    expect(res.body.runs[0].pullOut).toBe('2026-12-16T06:10');
    await app
      .request()
      .post(`${day('2026-12-16')}/copy`)
      .set(as(sup))
      .send({ fromDate: '2026-12-09' })
      .expect(409);
  });

  it('another organisation cannot read or write the day', async () => {
    await app.request().get(day('2026-12-09')).set(as(outsider)).expect(404);
    await app.request().put(day('2026-12-09')).set(as(outsider)).send({ runs: [] }).expect(404);
    expect(await runCount('2026-12-09')).toBe(4);
  });
});
