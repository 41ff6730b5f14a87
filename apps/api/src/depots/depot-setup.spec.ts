import { eq } from 'drizzle-orm';
import { beforeAll, describe, expect, it } from 'vitest';
import { parseScenario } from '@nightyard/scheduling';
import { chargers, powerCabinets, loadReductionWindows } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';

const app = createTestApp();
let fac: TestUser;
let fin: TestUser;
let depot: Awaited<ReturnType<typeof createDepot>>;
let other: Awaited<ReturnType<typeof createDepot>>;
let otherFac: TestUser;

beforeAll(async () => {
  const org = await createOrganisation(app, { fac: ['facilities'], fin: ['finance'], sup: ['supervisor'] });
  fac = org.users.fac!;
  fin = org.users.fin!;
  depot = await createDepot(app.db, org.organisationId, 'Depot one');
  const org2 = await createOrganisation(app, { fac: ['facilities'] });
  otherFac = org2.users.fac!;
  other = await createDepot(app.db, org2.organisationId, 'Depot elsewhere');
});

const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
const base = () => `/api/depots/${depot.depot.id}`;
/** The depot's scenario base for a horizon, as facilities reads it. */
const scenarioOf = (start: string, end: string) =>
  app.request().get(`${base()}/scenario-base`).query({ start, end }).set(as(fac)).expect(200);
const charger = (over: Record<string, unknown> = {}) => ({
  label: 'D',
  maxKw: 150,
  connector: 'SAE J3105 pantograph',
  cabinetId: null,
  ...over,
});

describe('depot', () => {
  it('every role reads the depot with chargers, cabinets and rate plans', async () => {
    const res = await app.request().get(base()).set(as(fin)).expect(200);
    expect(res.body.depot.chargers.map((c: { label: string }) => c.label)).toEqual(['A', 'B', 'C']);
    expect(res.body.depot.cabinets).toEqual([expect.objectContaining({ label: 'P1', limitKw: 120, chargerCount: 2 })]);
    expect(res.body.depot.ratePlans).toEqual([
      expect.objectContaining({ name: 'Test TOU', effectiveFrom: '2026-01-01' }),
    ]);
  });

  it('finance cannot change it', async () => {
    await app.request().post(`${base()}/chargers`).set(as(fin)).send(charger()).expect(403);
  });

  it('facilities adds a charger to a cabinet and puts it out of service with a reason', async () => {
    const add = await app
      .request()
      .post(`${base()}/chargers`)
      .set(as(fac))
      .send(charger({ label: 'E', cabinetId: depot.cabinet.id }))
      .expect(201);
    expect(add.body.charger).toMatchObject({ label: 'E', cabinetLabel: 'P1', status: 'in_service' });
    const missing = await app
      .request()
      .put(`${base()}/chargers/${add.body.charger.id}`)
      .set(as(fac))
      .send(charger({ label: 'E', status: 'out_of_service' }))
      .expect(400);
    expect(missing.body.error.fields.statusReason).toBe('Say why the charger is out of service');
    const out = await app
      .request()
      .put(`${base()}/chargers/${add.body.charger.id}`)
      .set(as(fac))
      .send(charger({ label: 'E', status: 'out_of_service', statusReason: 'Cable damaged' }))
      .expect(200);
    expect(out.body.charger).toMatchObject({ status: 'out_of_service', statusReason: 'Cable damaged' });
    expect(out.body.charger.statusSince).toBeTruthy();
  });

  it('refuses a cabinet of another depot, a negative limit, a duplicate label; nothing is saved', async () => {
    const before = (await app.db.select().from(chargers).where(eq(chargers.depotId, depot.depot.id))).length;
    const foreign = await app
      .request()
      .post(`${base()}/chargers`)
      .set(as(fac))
      .send(charger({ label: 'X', cabinetId: other.cabinet.id }))
      .expect(400);
    expect(foreign.body.error.fields.cabinetId).toBe('Choose a cabinet of this depot');
    const negative = await app
      .request()
      .post(`${base()}/chargers`)
      .set(as(fac))
      .send(charger({ label: 'Y', maxKw: -5 }))
      .expect(400);
    expect(negative.body.error.fields.maxKw).toMatch(/cannot be negative/);
    const dup = await app
      .request()
      .post(`${base()}/chargers`)
      .set(as(fac))
      .send(charger({ label: 'A' }))
      .expect(409);
    expect(dup.body.error.fields.label).toBe('Already used in this depot');
    const after = (await app.db.select().from(chargers).where(eq(chargers.depotId, depot.depot.id))).length;
    expect(after).toBe(before);
    // Cabinets too: a charger is wired to one by its label, so two of one name are refused.
    const cabinets = async () =>
      (await app.db.select().from(powerCabinets).where(eq(powerCabinets.depotId, depot.depot.id))).map((c) => c.label);
    const twin = await app
      .request()
      .post(`${base()}/cabinets`)
      .set(as(fac))
      .send({ label: 'P1', limitKw: 100 })
      .expect(409);
    expect(twin.body.error.message).toBe('This depot already has a power cabinet with that label');
    expect(twin.body.error.fields.label).toBe('Already used in this depot');
    const second = await app
      .request()
      .post(`${base()}/cabinets`)
      .set(as(fac))
      .send({ label: 'P2', limitKw: 100 })
      .expect(201);
    await app
      .request()
      .put(`${base()}/cabinets/${second.body.cabinet.id}`)
      .set(as(fac))
      .send({ label: 'P1', limitKw: 100 })
      .expect(409);
    expect((await cabinets()).sort()).toEqual(['P1', 'P2']);
  });

  it('settings: a 24-hour other-load profile, a bad time zone and a zero limit', async () => {
    const ok = {
      name: 'Depot one',
      timezone: 'America/Chicago',
      serviceLimitKw: 320,
      otherLoadKw: Array(24).fill(25),
      billingStartDay: 5,
    };
    const res = await app.request().put(base()).set(as(fac)).send(ok).expect(200);
    expect(res.body.depot.serviceLimitKw).toBe(320);
    const bad = await app
      .request()
      .put(base())
      .set(as(fac))
      .send({ ...ok, timezone: 'Mars/Olympus', serviceLimitKw: 0, otherLoadKw: [1, 2] })
      .expect(400);
    expect(Object.keys(bad.body.error.fields).sort()).toEqual(['otherLoadKw', 'serviceLimitKw', 'timezone']);
  });

  it('load-reduction windows are saved all together or not at all', async () => {
    const windows = [
      { start: '2026-12-10T17:00', end: '2026-12-10T19:00', limitKw: 150, note: 'Utility event' },
      { start: '2026-12-10T18:30', end: '2026-12-10T20:00', limitKw: 100 },
    ];
    const bad = await app.request().put(`${base()}/load-reduction-windows`).set(as(fac)).send({ windows }).expect(400);
    expect(bad.body.error.fields['[1].start']).toMatch(/Overlaps/);
    expect(
      await app.db.select().from(loadReductionWindows).where(eq(loadReductionWindows.depotId, depot.depot.id)),
    ).toHaveLength(0);
    const good = await app
      .request()
      .put(`${base()}/load-reduction-windows`)
      .set(as(fac))
      .send({ windows: [windows[0], { ...windows[1], start: '2026-12-10T19:00' }] })
      .expect(200);
    expect(good.body.windows.map((w: { start: string }) => w.start)).toEqual(['2026-12-10T17:00', '2026-12-10T19:00']);
  });

  it('a charger out of service for a period is left out only of the nights that period touches', async () => {
    const add = await app
      .request()
      .post(`${base()}/chargers`)
      .set(as(fac))
      .send(charger({ label: 'F' }))
      .expect(201);
    const id = add.body.charger.id;
    const bad = await app
      .request()
      .put(`${base()}/chargers/${id}`)
      .set(as(fac))
      .send(
        charger({
          label: 'F',
          status: 'out_of_service',
          statusReason: 'Inspection',
          outFrom: '2026-12-20T06:00',
          outUntil: '2026-12-20T05:00',
        }),
      )
      .expect(400);
    expect(bad.body.error.fields.outUntil).toBe('The end of the period must be after its start');
    const out = await app
      .request()
      .put(`${base()}/chargers/${id}`)
      .set(as(fac))
      .send(
        charger({
          label: 'F',
          status: 'out_of_service',
          statusReason: 'Inspection',
          outFrom: '2026-12-20T06:00',
          outUntil: '2026-12-21T18:00',
        }),
      )
      .expect(200);
    expect(out.body.charger).toMatchObject({
      status: 'out_of_service',
      outFrom: '2026-12-20T06:00',
      outUntil: '2026-12-21T18:00',
    });
    const scenarioOf = async (start: string, end: string) =>
      (await app.request().get(`${base()}/scenario-base`).query({ start, end }).set(as(fac)).expect(200)).body as {
        scenario: { chargers: { id: string; outOfService?: { from: string; to: string }[] }[] };
        notes: string[];
      };
    // The night before the period: F plans as in service.
    const before = await scenarioOf('2026-12-18T15:00', '2026-12-19T07:00');
    expect(before.scenario.chargers.map((c) => c.id)).toContain('F');
    // A night inside it: left out, and the note says for how long.
    const inside = await scenarioOf('2026-12-20T15:00', '2026-12-21T07:00');
    expect(inside.scenario.chargers.map((c) => c.id)).not.toContain('F');
    expect(inside.notes.join(' ')).toMatch(
      /Charger F is out of service from .* until .* \(Inspection\) and is left out for the night/,
    );
    // A night it covers in part (the period ends at 18:00): F plans from then on, not before.
    const partly = await scenarioOf('2026-12-21T15:00', '2026-12-22T07:00');
    expect(partly.scenario.chargers.find((c) => c.id === 'F')?.outOfService).toEqual([
      { from: '2026-12-21T15:00', to: '2026-12-21T18:00' },
    ]);
    expect(partly.notes.join(' ')).toMatch(
      /Charger F is out of service from .* until .* \(Inspection\): no bus is planned on it then/,
    );
    // Back in service: the period is cleared.
    const back = await app
      .request()
      .put(`${base()}/chargers/${id}`)
      .set(as(fac))
      .send(charger({ label: 'F', outFrom: '2026-12-20T06:00' }))
      .expect(200);
    expect(back.body.charger).toMatchObject({ status: 'in_service', outFrom: null, outUntil: null });
    await app.request().delete(`${base()}/chargers/${id}`).set(as(fac)).expect(204);
  });

  it('another organisation\'s facilities user sees "not found" and changes nothing', async () => {
    await app.request().get(base()).set(as(otherFac)).expect(404);
    await app
      .request()
      .post(`${base()}/chargers`)
      .set(as(otherFac))
      .send(charger({ label: 'Z' }))
      .expect(404);
    await app
      .request()
      .put(`/api/depots/${depot.depot.id}/chargers/${depot.chargers[0]!.id}`)
      .set(as(otherFac))
      .send(charger({ label: 'A' }))
      .expect(404);
  });
});

describe('scenario base', () => {
  it('builds the site and tariff part that the engine accepts, leaving out chargers out of service', async () => {
    const sup = (await createOrganisation(app, { s: ['supervisor'] })).users.s!;
    void sup;
    const res = await scenarioOf('2026-12-09T12:00', '2026-12-10T09:00');
    const { scenario, notes } = res.body;
    expect(scenario.chargers.map((c: { id: string }) => c.id)).toEqual(expect.arrayContaining(['A', 'B', 'C']));
    expect(scenario.chargers.map((c: { id: string }) => c.id)).not.toContain('E');
    expect(notes.join(' ')).toMatch(/Charger E is out of service \(Cable damaged\)/);
    expect(scenario.tariff.periods).toEqual([
      { name: 'on-peak', price: 0.27, demandCharge: 9.5, windows: [{ days: [3], from: '16:00', to: '21:00' }] },
    ]);
    // The engine's own validator (libs/scheduling) accepts it once buses are added.
    const parsed = parseScenario({
      ...scenario,
      buses: [
        {
          id: '1',
          usableKwh: 200,
          maxKw: 60,
          arrivalKwh: 50,
          stays: [{ arrive: '2026-12-09T16:00', depart: '2026-12-10T06:00', departMinKwh: 150 }],
        },
      ],
    });
    expect(parsed.ok ? [] : parsed.problems).toEqual([]);
  });

  it('carries the hourly other load and the load-reduction windows into the scenario', async () => {
    const res = await app
      .request()
      .get(`${base()}/scenario-base`)
      .query({ start: '2026-12-10T12:00', end: '2026-12-11T09:00' })
      .set(as(fac))
      .expect(200);
    expect(res.body.scenario.site.otherLoadByHourKw).toHaveLength(24);
    expect(res.body.scenario.site.limitWindows).toEqual([
      { from: '2026-12-10T17:00', to: '2026-12-10T19:00', limitKw: 150 },
      { from: '2026-12-10T19:00', to: '2026-12-10T20:00', limitKw: 100 },
    ]);
  });

  it('carries the yard crew into the scenario: minimum plug-in, driver moves and each shift as dated crew windows', async () => {
    const yardCrew = {
      minPlugInMinutes: 45,
      driversPlugIn: true,
      shifts: [
        { from: '15:00', to: '23:30', movesPerSlot: 3 },
        { from: '04:30', to: '07:00', movesPerSlot: 2 },
      ],
    };
    await app.request().put(`${base()}/yard-crew`).set(as(fin)).send(yardCrew).expect(403);
    const bad = await app
      .request()
      .put(`${base()}/yard-crew`)
      .set(as(fac))
      .send({ ...yardCrew, minPlugInMinutes: -5, shifts: [{ from: '25:00', to: '07:00', movesPerSlot: 0 }] })
      .expect(400);
    expect(Object.keys(bad.body.error.fields ?? {})).toEqual(
      expect.arrayContaining(['minPlugInMinutes', 'shifts[0].from', 'shifts[0].movesPerSlot']),
    );
    const saved = await app.request().put(`${base()}/yard-crew`).set(as(fac)).send(yardCrew).expect(200);
    const withDefaults = { ...yardCrew, costTolerancePercent: 0.5, costToleranceAmount: 5 };
    expect(saved.body.yardCrew).toEqual(withDefaults);
    expect((await app.request().get(base()).set(as(fin)).expect(200)).body.depot.yardCrew).toEqual(withDefaults);
    const res = await scenarioOf('2026-12-09T12:00', '2026-12-10T09:00');
    expect(res.body.scenario.yard).toEqual({
      minPlugInMinutes: 45,
      driversPlugIn: true,
      crew: [
        { from: '2026-12-09T15:00', to: '2026-12-09T23:30', movesPerSlot: 3 },
        { from: '2026-12-10T04:30', to: '2026-12-10T07:00', movesPerSlot: 2 },
      ],
      costTolerancePercent: 0.5,
      costToleranceAmount: 5,
    });
    const parsed = parseScenario({
      ...res.body.scenario,
      buses: [
        {
          id: '1',
          usableKwh: 200,
          maxKw: 60,
          arrivalKwh: 50,
          stays: [{ arrive: '2026-12-09T16:00', depart: '2026-12-10T06:00', departMinKwh: 150 }],
        },
      ],
    });
    expect(parsed.ok ? [] : parsed.problems).toEqual([]);
    // Shifts on weekdays only (nobody at weekends): Friday's evening shift, then Monday's morning one.
    const weekdays = [1, 2, 3, 4, 5];
    await app
      .request()
      .put(`${base()}/yard-crew`)
      .set(as(fac))
      .send({ ...yardCrew, shifts: yardCrew.shifts.map((x) => ({ ...x, days: weekdays })) })
      .expect(200);
    const weekend = await scenarioOf('2026-12-11T12:00', '2026-12-14T09:00');
    expect(weekend.body.scenario.yard.crew).toEqual([
      { from: '2026-12-11T15:00', to: '2026-12-11T23:30', movesPerSlot: 3 },
      { from: '2026-12-14T04:30', to: '2026-12-14T07:00', movesPerSlot: 2 },
    ]);
    const noDay = await app
      .request()
      .put(`${base()}/yard-crew`)
      .set(as(fac))
      .send({ ...yardCrew, shifts: [{ ...yardCrew.shifts[0], days: [] }] })
      .expect(400);
    expect(noDay.body.error.fields['shifts[0].days']).toBe('Choose at least one day for the shift');
    await app
      .request()
      .put(`${base()}/yard-crew`)
      .set(as(fac))
      .send({ ...yardCrew, shifts: [], costTolerancePercent: 1, costToleranceAmount: 12 })
      .expect(200);
    const any = await scenarioOf('2026-12-09T12:00', '2026-12-10T09:00');
    expect(any.body.scenario.yard).toEqual({
      minPlugInMinutes: 45,
      driversPlugIn: true,
      costTolerancePercent: 1,
      costToleranceAmount: 12,
    });
  });

  it('says which date has no rate plan', async () => {
    const res = await app
      .request()
      .get(`${base()}/scenario-base`)
      .query({ start: '2025-06-01T12:00', end: '2025-06-02T09:00' })
      .set(as(fac))
      .expect(400);
    expect(res.body.error.message).toMatch(/No rate plan applies to Depot one on 2025-06-01/);
  });
});
