import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { and, eq } from 'drizzle-orm';
import { pino } from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { PlanResult } from '@nightyard/contracts';
import { chargers } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { generatedPlan } from '../testing/plan-fixture';
import { TEST_START, createOrganisation, createTestApp, signInAgain, type TestUser } from '../testing/test-app';
import { SimulatedStation } from './simulated-station';
import { CentralSystem } from './central-system';

/** The power (W) a plan gives a charger at an instant: its session's quarter hour, else 0. */
function plannedW(result: PlanResult, charger: string, t: Date): number {
  for (const s of result.sessions.filter((x) => x.charger === charger)) {
    const k = Math.floor((t.getTime() - Date.parse(s.start)) / 900_000);
    if (k >= 0 && k < s.kw.length) return Math.round(s.kw[k]! * 1000);
  }
  return 0;
}

/** One minute into the first quarter hour in which the plan gives some charger power. */
function chargingInstant(result: PlanResult): Date {
  const s = result.sessions.find((x) => x.kw.some((k) => k > 1))!;
  return new Date(Date.parse(s.start) + s.kw.findIndex((k) => k > 1) * 900_000 + 60_000);
}

const ids = (station: SimulatedStation) => station.profiles.profiles.map((p) => p.id).sort();

// The tester's night: the chargers follow tonight's published plan; publishing the next night must
// not change that, only leave its profile on the chargers for later.
describe('charging profiles are bound to their night (central system and station simulator)', () => {
  let now = TEST_START;
  const app = createTestApp({ clock: () => now });
  const central = new CentralSystem(app.db, pino({ level: 'silent' }), () => now);
  let server: Server;
  let url: string;
  let sup: TestUser;
  let fac: TestUser;
  let yard: TestUser;
  let depotId: string;
  const plan: Record<string, { id: string; result: PlanResult }> = {};
  const stations: SimulatedStation[] = [];
  const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
  const publish = (id: string, expectedPublishedId: string | null) =>
    app.request().post(`/api/plans/${id}/publish`).set(as(sup)).send({ expectedPublishedId }).expect(200);

  beforeAll(async () => {
    app.deps.onPlanPublished = (id) => void central.sendPlan(id);
    server = app.app.listen(0, '127.0.0.1');
    central.attachTo(server);
    await new Promise((r) => server.once('listening', r));
    const org = await createOrganisation(app, { sup: ['supervisor'], fac: ['facilities'], yard: ['yard'] });
    ({ sup, fac, yard } = org.users as Record<string, TestUser>);
    const depot = await createDepot(app.db, org.organisationId);
    depotId = depot.depot.id;
    await addBuses(app.db, org.organisationId, depotId, ['31', '32']);
    // Wednesday to Friday, then Monday: Friday's night runs to Monday's pull-outs.
    for (const date of ['2026-12-09', '2026-12-10', '2026-12-11', '2026-12-14']) {
      await app
        .request()
        .put(`/api/depots/${depotId}/service-days/${date}`)
        .set(as(sup))
        .send({ runs: dayRuns(date, ['31', '32'], () => 20) })
        .expect(200);
    }
    for (const c of depot.chargers) {
      await app
        .request()
        .put(`/api/depots/${depotId}/chargers/${c.id}/ocpp`)
        .set(as(fac))
        .send({ identity: `N-${c.label}-${depotId.slice(0, 8)}`, password: 'test-charger-password' })
        .expect(204);
    }
    // Planned ahead on Tuesday 1 December, published during Wednesday's night.
    for (const date of ['2026-12-09', '2026-12-10', '2026-12-11']) {
      const p = await generatedPlan(app, sup, depotId, date);
      plan[date] = { id: p.id, result: p.result };
    }
    now = chargingInstant(plan['2026-12-09']!.result);
    await signInAgain(app, sup, fac, yard);
    url = `ws://127.0.0.1:${(server.address() as AddressInfo).port}/ocpp`;
    for (const c of depot.chargers) {
      stations.push(
        new SimulatedStation({
          url,
          identity: `N-${c.label}-${depotId.slice(0, 8)}`,
          password: 'test-charger-password',
          protocol: c.label === 'C' ? 'ocpp2.0.1' : 'ocpp1.6',
          clock: () => now,
          meterIntervalMs: 200,
        }),
      );
    }
    await Promise.all(stations.map((s) => s.start()));
  }, 120_000);

  afterAll(async () => {
    await Promise.all(stations.map((s) => s.stop()));
    await central.close();
    server.close();
  });

  const label = (s: SimulatedStation) => s.client.identity!.split('-')[1]!;

  it('tonight published: every charger charges at the planned power', async () => {
    const tonight = plan['2026-12-09']!;
    await publish(tonight.id, null);
    for (const s of stations) await expect.poll(() => ids(s), { timeout: 5000 }).toEqual([20261209]);
    const expected = stations.map((s) => plannedW(tonight.result, label(s), now));
    expect(expected.some((w) => w > 0)).toBe(true);
    expect(stations.map((s) => s.limitW())).toEqual(expected);
    // The live power the chargers report is the plan's.
    await expect
      .poll(
        async () => {
          const rows = await app.db.select().from(chargers).where(eq(chargers.depotId, depotId));
          return stations.map((s) => rows.find((r) => r.label === label(s))?.livePowerW);
        },
        { timeout: 5000 },
      )
      .toEqual(expected);
  });

  it("the next night published: chargers still follow tonight and hold the next night's profile for later", async () => {
    const tonight = plan['2026-12-09']!;
    const next = plan['2026-12-10']!;
    const before = stations.map((s) => s.limitW());
    const tonightProfiles = stations.map((s) => s.profiles.profiles.find((p) => p.id === 20261209));
    await publish(next.id, null);
    for (const s of stations) await expect.poll(() => ids(s), { timeout: 5000 }).toEqual([20261209, 20261210]);
    expect(stations.map((s) => s.limitW())).toEqual(before);
    // ... and so for every quarter hour left of tonight.
    for (let t = now.getTime(); t < Date.parse(tonight.result.slots.at(-1)!.start); t += 900_000) {
      expect(stations.map((s) => s.limitW(new Date(t)))).toEqual(
        stations.map((s) => plannedW(tonight.result, label(s), new Date(t))),
      );
    }
    stations.forEach((s, i) => {
      const held = s.profiles.profiles;
      expect(held.find((p) => p.id === 20261209)).toEqual(tonightProfiles[i]);
      const [a, b] = [held.find((p) => p.id === 20261209)!, held.find((p) => p.id === 20261210)!];
      expect(b.stackLevel).not.toBe(a.stackLevel);
      expect(b.validFromMs).toBeGreaterThanOrEqual(a.validToMs);
    });
    // Later, inside Thursday's night, the held profile gives the next night's plan.
    const later = chargingInstant(next.result);
    expect(stations.map((s) => s.limitW(later))).toEqual(stations.map((s) => plannedW(next.result, label(s), later)));
    expect(stations.map((s) => s.limitW(later)).some((w) => w > 0)).toBe(true);
  });

  it('a night further ahead waits on the central system: nothing reaches the chargers', async () => {
    await publish(plan['2026-12-11']!.id, null);
    expect(await central.sendNights(depotId)).toBe(0);
    for (const s of stations) expect(ids(s)).toEqual([20261209, 20261210]);
  });

  it("a revision of tonight replaces tonight's profile only", async () => {
    const thursday = stations.map((s) => s.profiles.profiles.find((p) => p.id === 20261210));
    const revision = await generatedPlan(app, sup, depotId, '2026-12-09');
    const sent = stations.map((s) => s.received.length);
    await publish(revision.id, plan['2026-12-09']!.id);
    // Tonight's profile first, then the next night's again (unchanged).
    for (const [i, s] of stations.entries())
      await expect.poll(() => s.received.length, { timeout: 5000 }).toBe(sent[i]! + 2);
    expect(stations.map((s) => s.received.at(-2))).toEqual(
      stations.map((s) =>
        expect.objectContaining(
          s.client.identity!.includes('-C-')
            ? { chargingProfile: expect.objectContaining({ id: 20261209 }) }
            : { csChargingProfiles: expect.objectContaining({ chargingProfileId: 20261209 }) },
        ),
      ),
    );
    stations.forEach((s, i) => {
      expect(ids(s)).toEqual([20261209, 20261210]);
      expect(s.profiles.profiles.find((p) => p.id === 20261210)).toEqual(thursday[i]);
    });
    // Every quarter hour of the rest of the night follows the revision.
    for (let t = now.getTime(); t < Date.parse(revision.result.slots.at(-1)!.start); t += 900_000) {
      expect(stations.map((s) => s.limitW(new Date(t)))).toEqual(
        stations.map((s) => plannedW(revision.result, label(s), new Date(t))),
      );
    }
    plan['2026-12-09'] = { id: revision.id, result: revision.result };
  });

  it('a charger the yard reports out of service is sent the revision: it draws nothing from then on', async () => {
    const tonight = plan['2026-12-09']!;
    const out = stations.find((s) => s.limitW() > 0)!;
    const others = stations.filter((s) => s !== out);
    const drawing = out.limitW();
    const sent = stations.map((s) => s.received.length);
    const res = await app
      .request()
      .post(`/api/depots/${depotId}/tonight/reports`)
      .set(as(yard))
      .send({ planId: tonight.id, kind: 'charger_out', charger: label(out), reason: 'Cable worn' })
      .expect(201);
    const revision = await app.request().get(`/api/plans/${res.body.revision.id}`).set(as(sup)).expect(200);
    const result = revision.body.plan.result as PlanResult;
    for (const [i, s] of stations.entries())
      await expect.poll(() => s.received.length, { timeout: 5000 }).toBeGreaterThanOrEqual(sent[i]! + 1);
    // From the report on, the charger reported out is held at 0 W for the rest of the night; the
    // others follow the revision.
    const nextQuarter = Math.ceil(now.getTime() / 900_000) * 900_000;
    // At the report's instant it stops, though its quarter hour runs on; until then it drew as before.
    expect(out.limitW()).toBe(0);
    expect(Math.abs(out.limitW(new Date(now.getTime() - 30_000)) - drawing)).toBeLessThanOrEqual(1);
    for (let t = nextQuarter; t < Date.parse(result.slots.at(-1)!.start); t += 900_000) {
      expect(out.limitW(new Date(t))).toBe(0);
      expect(others.map((s) => s.limitW(new Date(t)))).toEqual(
        others.map((s) => plannedW(result, label(s), new Date(t))),
      );
    }
    plan['2026-12-09'] = { id: res.body.revision.id, result };
  });

  it("when Thursday's night is under way the chargers follow it and get Friday's with their next heartbeat", async () => {
    now = chargingInstant(plan['2026-12-10']!.result);
    await Promise.all(stations.map((s) => s.client.call('Heartbeat', {})));
    // A 1.6 station's expired Wednesday profile gave way to Friday's (same stack level); a 2.0.1
    // station keeps it beside them, out of date and so out of the way.
    for (const s of stations) {
      await expect
        .poll(() => ids(s), { timeout: 5000 })
        .toEqual(label(s) === 'C' ? [20261209, 20261210, 20261211] : [20261210, 20261211]);
    }
    expect(stations.map((s) => s.limitW())).toEqual(
      stations.map((s) => plannedW(plan['2026-12-10']!.result, label(s), now)),
    );
    const [row] = await app.db
      .select()
      .from(chargers)
      .where(and(eq(chargers.depotId, depotId), eq(chargers.label, 'A')));
    expect(row!.liveConnected).toBe(true);
  });

  it("a charger that boots gets tonight's profile, then the next night's", async () => {
    const old = stations[0]!;
    await old.stop();
    const fresh = new SimulatedStation({
      url,
      identity: old.client.identity!,
      password: 'test-charger-password',
      protocol: 'ocpp1.6',
      clock: () => now,
      meterIntervalMs: 200,
    });
    stations[0] = fresh;
    await fresh.start();
    await expect.poll(() => fresh.received.length, { timeout: 5000 }).toBe(2);
    expect(
      fresh.received.map((r) => (r.csChargingProfiles as { chargingProfileId: number }).chargingProfileId),
    ).toEqual([20261210, 20261211]);
    expect(fresh.limitW()).toBe(plannedW(plan['2026-12-10']!.result, 'A', now));
  });

  it('the download carries the same binding: id, stack level and validity of its night', async () => {
    await signInAgain(app, sup);
    for (const [date, version] of [
      ['2026-12-10', '1.6'],
      ['2026-12-11', '2.0.1'],
    ] as const) {
      const res = await app
        .request()
        .get(`/api/plans/${plan[date]!.id}/ocpp`)
        .query({ version })
        .set(as(sup))
        .expect(200);
      const station = stations.find((s) => label(s) === (version === '1.6' ? 'A' : 'C'))!;
      const held = station.profiles.profiles.find((p) => p.id === Number(date.replace(/-/g, '')))!;
      const exported = res.body.find((e: { chargerId: string }) => e.chargerId === label(station)).payload;
      const profile = version === '1.6' ? exported.csChargingProfiles : exported.chargingProfile;
      expect(profile.stackLevel).toBe(held.stackLevel);
      expect([Date.parse(profile.validFrom), Date.parse(profile.validTo)]).toEqual([held.validFromMs, held.validToMs]);
    }
  });
});
