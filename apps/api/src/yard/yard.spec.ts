import { eq } from 'drizzle-orm';
import { DateTime } from 'luxon';
import { beforeAll, describe, expect, it } from 'vitest';
import type { PlanResult, Role } from '@nightyard/contracts';
import { plans, yardConfirmations } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { mailFor } from '../testing/mail';
import { deliveredBefore, generatedPlan, publishedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, signInAgain, type TestUser } from '../testing/test-app';
import { confirmedPlugged } from './yard-service';
import { stepKey } from './yard-steps';

const ZONE = 'America/Chicago';
// The plan is made and published in the afternoon; the yard's night is then looked at from 23:00.
let clock = DateTime.fromISO('2026-12-09T13:00', { zone: ZONE }).toJSDate();
const app = createTestApp({ clock: () => clock });
let yard: TestUser;
let sup: TestUser;
let depotId: string;
let otherDepotBus: string;
const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
/** A plan's whole result (Tonight gives the yard its plug-ins only). */
const planResult = async (id: string): Promise<PlanResult> =>
  (await app.request().get(`/api/plans/${id}`).set(as(yard)).expect(200)).body.plan.result;
const NUMBERS = ['41', '42', '43', '44'];

async function tonight() {
  return (await app.request().get(`/api/depots/${depotId}/tonight`).set(as(yard)).expect(200)).body;
}

/**
 * A depot of a test's own: buses `numbers` with runs on `night` and the day after (`soc`: arrival
 * states of charge), and the night's plan published by its supervisor (`s`).
 */
async function ownPublishedNight(
  people: Record<string, Role[]>,
  numbers: string[],
  night: string,
  soc?: (i: number) => number | null,
) {
  const org = await createOrganisation(app, { s: ['supervisor'], ...people });
  const depot = (await createDepot(app.db, org.organisationId)).depot.id;
  await addBuses(app.db, org.organisationId, depot, numbers);
  for (const date of [night, DateTime.fromISO(night).plus({ days: 1 }).toISODate()!])
    await app
      .request()
      .put(`/api/depots/${depot}/service-days/${date}`)
      .set(as(org.users.s!))
      .send({ runs: dayRuns(date, numbers, soc) })
      .expect(200);
  const planId = await publishedPlan(app, org.users.s!, depot, night);
  return { org, depot, planId };
}

beforeAll(async () => {
  const org = await createOrganisation(app, { yard: ['yard'], sup: ['supervisor'] });
  ({ yard, sup } = org.users as Record<string, TestUser>);
  depotId = (await createDepot(app.db, org.organisationId)).depot.id;
  await addBuses(app.db, org.organisationId, depotId, NUMBERS);
  for (const date of ['2026-12-09', '2026-12-10']) {
    // Low arrivals: every bus needs a long charge, so all three chargers work through the night.
    await app
      .request()
      .put(`/api/depots/${depotId}/service-days/${date}`)
      .set(as(sup))
      .send({ runs: dayRuns(date, NUMBERS, () => 16) })
      .expect(200);
  }
  await publishedPlan(app, sup, depotId, '2026-12-09');
  clock = DateTime.fromISO('2026-12-09T23:00', { zone: ZONE }).toJSDate();
  await signInAgain(app, yard, sup);
  const other = await createOrganisation(app, { s: ['supervisor'] });
  otherDepotBus = (
    await addBuses(app.db, other.organisationId, (await createDepot(app.db, other.organisationId)).depot.id, ['99'])
  )[0]!.number;
});

describe('yard: tonight and confirmations', () => {
  it('lists connect and disconnect steps of the published plan, marks overdue ones', async () => {
    const t = await tonight();
    expect(t.plan.state).toBe('published');
    expect(t.acknowledged).toBe(false);
    const connects = t.steps.filter((s: { action: string }) => s.action === 'connect');
    expect(connects.length).toBe(t.plan.sessions.length);
    // The yard gets the plug-ins without their quarter-hour power, and none of the office's figures.
    expect(t.plan.sessions.length).toBe((await planResult(t.plan.id)).sessions.length);
    expect(t.plan.sessions[0]).not.toHaveProperty('kw');
    expect(t.plan).not.toHaveProperty('result');
    expect(t.plan).not.toHaveProperty('notes');
    for (const s of t.steps)
      expect(s.status).toBe(Date.parse(s.at) + 600_000 < clock.getTime() ? 'overdue' : 'upcoming');
  });

  it('a confirmation sent twice is stored once', async () => {
    const t = await tonight();
    const step = t.steps.find(
      (s: { action: string; at: string }) => s.action === 'connect' && Date.parse(s.at) < clock.getTime(),
    );
    const body = { planId: t.plan.id, stepKey: step.key };
    const [a, b] = await Promise.all([
      app.request().post('/api/yard/confirmations').set(as(yard)).send(body),
      app.request().post('/api/yard/confirmations').set(as(yard)).send(body),
    ]);
    expect(a.status).toBe(200);
    expect(b.status).toBe(200);
    expect(a.body).toEqual(b.body);
    const again = await app.request().post('/api/yard/confirmations').set(as(yard)).send(body).expect(200);
    expect(again.body.confirmedAt).toBe(a.body.confirmedAt);
    const after = await tonight();
    expect(after.steps.find((s: { key: string }) => s.key === step.key).status).toBe('done');
  });

  it('acknowledging the cautions holds for the shift', async () => {
    await app.request().post(`/api/depots/${depotId}/tonight/acknowledge`).set(as(yard)).expect(204);
    await app.request().post(`/api/depots/${depotId}/tonight/acknowledge`).set(as(yard)).expect(204);
    expect((await tonight()).acknowledged).toBe(true);
  });
});

describe('yard: reports re-plan the rest of the night', () => {
  it('charger out of service at 23:00: no session uses it after 23:00; energy delivered before stays counted', async () => {
    const before = await tonight();
    const prev = await planResult(before.plan.id);
    const cut = clock.getTime();
    const charger = prev.sessions.find((s) => Date.parse(s.end) > cut && s.kw.some((k) => k > 0))!.charger;
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/tonight/reports`)
      .set(as(yard))
      .send({ planId: before.plan.id, kind: 'charger_out', charger, reason: 'Connector latch broken' })
      .expect(201);
    expect(res.body.revision).toMatchObject({ kind: 'revision', state: 'published', version: 2 });
    // Made at the API's clock, as the review names it ("Revision by ..., Wed 23:00").
    expect(res.body.revision.createdAt).toBe(clock.toISOString());
    expect(before.plan.revisionNote).toBeNull();
    const after = (await tonight()).plan;
    expect(after.revisionNote).toBe(`Revised at 23:00: charger ${charger} out of service (Connector latch broken).`);
    const [row] = await app.db.select().from(plans).where(eq(plans.id, res.body.revision.id));
    const next = row!.result!;
    // The yard is told which buses moved and why, as the e-mail and the review are.
    expect(after.moved).toEqual({ ...next.replan!.moved!, againstVersion: null });
    expect(after.moved.reasons[0]).toMatch(new RegExp(`^charger ${charger} out of service`));
    for (const s of next.sessions.filter((x) => x.charger === charger)) {
      expect(Date.parse(s.end)).toBeLessThanOrEqual(cut);
    }
    // The plan marks the charger out from the report to the night's end (the timeline shows it).
    expect(next.outOfService!.map((o) => [o.charger, Date.parse(o.from)])).toEqual([[charger, cut]]);
    expect(Date.parse(next.outOfService![0]!.to)).toBe(Date.parse(next.slots.at(-1)!.start) + 900_000);
    // Energy delivered before 23:00 is the previous plan's, slot by slot.
    const a = deliveredBefore(prev, cut);
    const b = deliveredBefore(next, cut);
    for (const bus of Object.keys(a)) expect(b[bus] ?? 0).toBeCloseTo(a[bus]!, 6);
    // The old version is superseded; the charger is out of service in the Depot.
    const depot = await app.request().get(`/api/depots/${depotId}`).set(as(yard)).expect(200);
    expect(depot.body.depot.chargers.find((c: { label: string }) => c.label === charger)).toMatchObject({
      status: 'out_of_service',
      statusReason: 'Connector latch broken',
    });
    const [mail] = await mailFor(yard.email);
    expect(mail!.subject).toMatch(/Plan revised at 23:00: Test depot \(version 2\)/);
    // How many buses moved, and why: the charger's buses counted from the plan followed (the
    // engine is given their sessions already stopped at the report, and read 0).
    const onIt = new Set(
      prev.sessions.filter((s) => s.charger === charger && Date.parse(s.end) > cut).map((s) => s.bus),
    );
    expect(onIt.size).toBeGreaterThan(0);
    expect(mail!.text).toMatch(
      new RegExp(
        `\\d+ bus(es)? moved from 23:00 on, because: charger ${charger} out of service: ${onIt.size} ${onIt.size === 1 ? 'bus was' : 'buses were'} planned on it`,
      ),
    );
    // Each recipient's link opens a page their role can use: the Yard at that night, the review.
    expect(mail!.text).toContain('Open the yard view for that night: http://nightyard.test/yard?night=2026-12-09');
    const [supMail] = await mailFor(sup.email, 2);
    expect(supMail!.subject).toMatch(/Plan revised at 23:00/);
    expect(supMail!.text).toContain(
      `Review the plan: http://nightyard.test/plans?date=2026-12-09&plan=${res.body.revision.id}`,
    );
    expect(supMail!.text).not.toContain('/yard');
    // What the report does to the night's money, against the plan followed (whole nights both),
    // in the yard's answer and in every e-mail, in the same words.
    const effect = res.body.effect;
    expect(effect).toMatchObject({
      costBefore: Math.round(prev.cost.total * 100) / 100,
      costAfter: Math.round(next.cost.total * 100) / 100,
      demandAfter: Math.round(next.cost.demand * 100) / 100,
      peakAfterKw: Math.round(Math.max(...next.slots.map((x) => x.loadKw)) * 10) / 10,
    });
    expect(effect.short.map((x: { bus: string }) => x.bus)).toEqual(
      next.buses.filter((x) => x.shortfallKwh > 0.05).map((x) => x.id),
    );
    expect(effect.lines[0]).toMatch(/^The night's projected cost is (unchanged: \$|\$[\d,.]+ (higher|lower): \$)/);
    for (const line of effect.lines) {
      expect(mail!.text).toContain(line);
      expect(supMail!.text).toContain(line);
    }
  });

  it('a late bus: its sessions move after its new time', async () => {
    clock = DateTime.fromISO('2026-12-09T23:30', { zone: ZONE }).toJSDate();
    await signInAgain(app, yard, sup);
    const before = await tonight();
    const prev = await planResult(before.plan.id);
    const cut = clock.getTime();
    // A bus with charging still to come after the cut-off.
    const bus = prev.sessions.find((s) => Date.parse(s.end) > cut)!.bus;
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/tonight/reports`)
      .set(as(yard))
      .send({ planId: before.plan.id, kind: 'bus_late', bus, expectedAt: '2026-12-10T01:30' })
      .expect(201);
    const [row] = await app.db.select().from(plans).where(eq(plans.id, res.body.revision.id));
    const next = row!.result!;
    const newTime = DateTime.fromISO('2026-12-10T01:30', { zone: ZONE }).toMillis();
    for (const s of next.sessions.filter((x) => x.bus === bus && Date.parse(x.end) > cut)) {
      expect(Date.parse(s.start)).toBeGreaterThanOrEqual(newTime);
    }
  });

  it('bad reports change nothing: a superseded plan, a state of charge over 100 %, a bus of another depot', async () => {
    const count = async () => (await app.db.select().from(plans).where(eq(plans.depotId, depotId))).length;
    const n = await count();
    const current = await tonight();
    const [first] = await app.db.select().from(plans).where(eq(plans.depotId, depotId)).orderBy(plans.version).limit(1);
    const stale = await app
      .request()
      .post(`/api/depots/${depotId}/tonight/reports`)
      .set(as(yard))
      .send({ planId: first!.id, kind: 'soc_reading', bus: '41', socPct: 50 })
      .expect(409);
    expect(stale.body.error.message).toMatch(/replaced by version 3: reload/);
    const soc = await app
      .request()
      .post(`/api/depots/${depotId}/tonight/reports`)
      .set(as(yard))
      .send({ planId: current.plan.id, kind: 'soc_reading', bus: '41', socPct: 120 })
      .expect(400);
    expect(soc.body.error.fields.socPct).toBe('A state of charge is 0 to 100 %');
    const foreign = await app
      .request()
      .post(`/api/depots/${depotId}/tonight/reports`)
      .set(as(yard))
      .send({ planId: current.plan.id, kind: 'bus_absent', bus: otherDepotBus })
      .expect(400);
    expect(foreign.body.error.message).toMatch(/Bus 99 is not in tonight's plan/);
    // Later than the bus's pull-out: said at the depot's clock with what to give, not as a stay's ISO time.
    const tooLate = await app
      .request()
      .post(`/api/depots/${depotId}/tonight/reports`)
      .set(as(yard))
      .send({ planId: current.plan.id, kind: 'bus_late', bus: '41', expectedAt: '2026-12-10T22:00' })
      .expect(400);
    expect(tooLate.body.error.message).toMatch(
      /^Bus 41 pulls out at \d\d:\d\d: give a time before then \(after midnight means tomorrow morning\)$/,
    );
    expect(tooLate.body.error.fields.expectedAt).toMatch(/^Before its \d\d:\d\d pull-out$/);
    const oldStep = await app
      .request()
      .post('/api/yard/confirmations')
      .set(as(yard))
      .send({ planId: first!.id, stepKey: 'x' })
      .expect(409);
    expect(oldStep.body.error.message).toMatch(/replaced by version 3/);
    // A charger reported out again tonight: no revision, no e-mail, the Depot's time kept.
    const [cur] = await app.db.select().from(plans).where(eq(plans.id, current.plan.id));
    const out = cur!.replanState!.outOfService![0]!;
    const again = await app
      .request()
      .post(`/api/depots/${depotId}/tonight/reports`)
      .set(as(yard))
      .send({ planId: current.plan.id, kind: 'charger_out', charger: out, reason: 'Still broken' })
      .expect(409);
    expect(again.body.error.message).toBe(`Charger ${out} is already out of service tonight: the plan keeps off it`);
    expect(await count()).toBe(n);
  });

  it('a measured state of charge re-plans from the reading', async () => {
    clock = DateTime.fromISO('2026-12-09T23:45', { zone: ZONE }).toJSDate();
    await signInAgain(app, yard, sup);
    const current = await tonight();
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/tonight/reports`)
      .set(as(yard))
      .send({ planId: current.plan.id, kind: 'soc_reading', bus: '42', socPct: 88 })
      .expect(201);
    expect(res.body.revision.version).toBe(4);
    expect(res.body.replanMs).toBeGreaterThan(0);
    const after = await tonight();
    expect(after.reports.map((r: { kind: string }) => r.kind)).toEqual(['soc_reading', 'bus_late', 'charger_out']);
  });

  it('a report before the night starts re-plans the whole night', async () => {
    const { org, depot } = await ownPublishedNight({ y: ['yard'] }, ['61', '62'], '2026-12-21', () => 20);
    const t = (await app.request().get(`/api/depots/${depot}/tonight`).set(as(org.users.y!)).expect(200)).body;
    expect(t.plan.horizon.start).toBeGreaterThan(clock.getTime());
    expect(t.plan.horizon.start).toBe(
      Date.parse(
        (await app.request().get(`/api/plans/${t.plan.id}`).set(as(org.users.y!)).expect(200)).body.plan.result
          .slots[0]!.start,
      ),
    );
    const res = await app
      .request()
      .post(`/api/depots/${depot}/tonight/reports`)
      .set(as(org.users.y!))
      .send({ planId: t.plan.id, kind: 'charger_out', charger: 'A', reason: 'Cable worn' })
      .expect(201);
    const [row] = await app.db.select().from(plans).where(eq(plans.id, res.body.revision.id));
    expect(row!.result!.sessions.filter((s) => s.charger === 'A')).toEqual([]);
    // Named by the time of the report, not by the night's start it re-plans from.
    const reportedAt = DateTime.fromJSDate(clock, { zone: 'America/Chicago' }).toFormat('HH:mm');
    expect(row!.notes.at(-1)).toBe(`Revised at ${reportedAt}: charger A out of service (Cable worn).`);
  });

  it('a bus taken as plugged in is off its charger once a step of another bus there is confirmed', async () => {
    const { org, depot, planId } = await ownPublishedNight({}, ['91', '92', '93'], '2026-12-16');
    const [row] = await app.db.select().from(plans).where(eq(plans.id, planId));
    // The plan followed, as the yard was given it: 91 then 92 on charger A, 93 on B.
    const session = (bus: string, charger: string, start: string, end: string) => ({
      bus,
      charger,
      start: DateTime.fromISO(start, { zone: ZONE }).toISO()!,
      end: DateTime.fromISO(end, { zone: ZONE }).toISO()!,
      kwh: 0,
      kw: [],
      startMove: 'driver' as const,
      endMove: 'crew' as const,
    });
    const followed = {
      ...row!.result!,
      sessions: [
        session('91', 'A', '2026-12-16T16:30', '2026-12-16T20:00'),
        session('92', 'A', '2026-12-16T20:00', '2026-12-17T06:15'),
        session('93', 'B', '2026-12-16T16:30', '2026-12-16T22:00'),
      ],
    } as PlanResult;
    const confirm = (action: 'connect' | 'disconnect', s: (typeof followed.sessions)[number], at: string) =>
      app.db.insert(yardConfirmations).values({
        organisationId: org.organisationId,
        depotId: depot,
        serviceDate: '2026-12-16',
        planId,
        stepKey: stepKey(action, s.bus, s.charger, s.start),
        confirmedAt: DateTime.fromISO(at, { zone: ZONE }).toJSDate(),
      });
    const [s91, s92, s93] = followed.sessions as [
      PlanResult['sessions'][number],
      PlanResult['sessions'][number],
      PlanResult['sessions'][number],
    ];
    await confirm('connect', s91, '2026-12-16T16:31');
    await confirm('connect', s93, '2026-12-16T16:32');
    const cut = (at: string) =>
      confirmedPlugged(app.db, depot, '2026-12-16', followed, DateTime.fromISO(at, { zone: ZONE }).toJSDate());
    // Nobody confirmed 91's unplug: it is taken as still on A.
    expect(await cut('2026-12-16T21:00')).toEqual({ '91': 'A', '93': 'B' });
    // 92's plug-in on A was confirmed: 91 came off A before it (before, both "stayed" on A, and
    // the re-plan refused a state with two buses on one charger).
    await confirm('connect', s92, '2026-12-16T20:05');
    expect(await cut('2026-12-16T21:00')).toEqual({ '92': 'A', '93': 'B' });
  });

  it('a bus reported absent tonight is not among the buses going out, on the depot card and the district alike', async () => {
    const { org, depot } = await ownPublishedNight({ y: ['yard'], f: ['finance'] }, ['81', '82', '83'], '2026-12-14');
    clock = DateTime.fromISO('2026-12-14T22:30', { zone: ZONE }).toJSDate();
    await signInAgain(app, org.users.y!, org.users.f!);
    const goingOut = async () => {
      const card = (await app.request().get('/api/depots').set(as(org.users.y!)).expect(200)).body.depots[0];
      const district = (await app.request().get('/api/district').set(as(org.users.f!)).expect(200)).body.depots[0];
      return { card: card.nextServiceDay, district: district.tonight.busesOut };
    };
    expect(await goingOut()).toMatchObject({ card: { busesOut: 3, absentBuses: [] }, district: 3 });
    const planId = (await app.request().get(`/api/depots/${depot}/tonight`).set(as(org.users.y!)).expect(200)).body.plan
      .id;
    await app
      .request()
      .post(`/api/depots/${depot}/tonight/reports`)
      .set(as(org.users.y!))
      .send({ planId, kind: 'bus_absent', bus: '82' })
      .expect(201);
    expect(await goingOut()).toMatchObject({ card: { busesOut: 2, absentBuses: ['82'] }, district: 2 });
  });

  it('a reading stands in the re-plans after it: the next report starts the bus from it, not from the estimate', async () => {
    const { org, depot } = await ownPublishedNight({ y: ['yard'] }, ['71', '72', '73'], '2026-12-21');
    const y = org.users.y!;
    const report = async (at: string, body: object) => {
      clock = DateTime.fromISO(at, { zone: ZONE }).toJSDate();
      await signInAgain(app, y);
      const planId = (await app.request().get(`/api/depots/${depot}/tonight`).set(as(y)).expect(200)).body.plan.id;
      const res = await app
        .request()
        .post(`/api/depots/${depot}/tonight/reports`)
        .set(as(y))
        .send({ planId, ...body })
        .expect(201);
      const [row] = await app.db.select().from(plans).where(eq(plans.id, res.body.revision.id));
      return row!;
    };
    // Bus 71 (196 kWh) reads 5 % at 22:00, well below the estimate the plan started from.
    const read = await report('2026-12-21T22:00', { kind: 'soc_reading', bus: '71', socPct: 5 });
    const readKwh = 0.05 * 196;
    // Half an hour later bus 73 is reported absent: a re-plan with nothing said of bus 71.
    const next = await report('2026-12-21T22:30', { kind: 'bus_absent', bus: '73' });
    expect(next.replanState!.socReadings).toEqual({
      '71': { kwh: readKwh, at: read.replanState!.socReadings!['71']!.at },
    });
    const eta = next.scenario.efficiency ?? 1;
    const after = (r: PlanResult, fromMs: number) =>
      r.sessions
        .filter((x) => x.bus === '71')
        .reduce(
          (sum, x) =>
            sum + x.kw.reduce((a, kw, k) => a + (Date.parse(x.start) + k * 900_000 >= fromMs ? eta * kw * 0.25 : 0), 0),
          0,
        );
    // The revision's bus 71 leaves with its reading and what was delivered from 22:00 on, and
    // that is what its next day needs. Before, the re-plan at 22:30 took it from the estimate
    // again (reserve and no charge since its 16:20 pull-in counted, plus the plan's charging) and
    // planned it as if the reading had never been made.
    const bus = next.result!.buses.find((b) => b.id === '71')!;
    const nightStay = next.scenario.buses.find((b) => b.id === '71')!.stays.at(-1)!;
    const departure = bus.departures.at(-1)!.kwh;
    const at2200 = DateTime.fromISO('2026-12-21T22:00', { zone: ZONE }).toMillis();
    expect(departure).toBeCloseTo(readKwh + after(next.result!, at2200), 1);
    expect(departure).toBeGreaterThanOrEqual(nightStay.departMinKwh - 0.01);
    expect(bus.shortfallKwh).toBe(0);

    // The supervisor plans the night again at 23:00 (a night under way): the reading stands there
    // too, and is carried for the yard's next report. Before, the new plan took bus 71 from its
    // estimate and the reading was gone for good.
    clock = DateTime.fromISO('2026-12-21T23:00', { zone: ZONE }).toJSDate();
    await signInAgain(app, org.users.s!);
    const again = await generatedPlan(app, org.users.s!, depot, '2026-12-21');
    const [row] = await app.db.select().from(plans).where(eq(plans.id, again.id));
    expect(row!.replanState!.socReadings).toEqual(next.replanState!.socReadings);
    const fresh = row!.result!;
    const departed = fresh.buses.find((b) => b.id === '71')!.departures.at(-1)!.kwh;
    expect(departed).toBeCloseTo(readKwh + after(fresh, at2200), 1);
    expect(departed).toBeGreaterThanOrEqual(nightStay.departMinKwh - 0.01);
  });

  it('roles', async () => {
    const fin = (await createOrganisation(app, { f: ['finance'] })).users.f!;
    await app.request().get(`/api/depots/${depotId}/tonight`).set(as(fin)).expect(403);
  });
});
