import { readFileSync } from 'node:fs';
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { eq } from 'drizzle-orm';
import { pino } from 'pino';
import { RPCClient } from 'ocpp-rpc';
import standardValidators from 'ocpp-rpc/lib/standard-validators.js';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parseScenario, planScenario } from '@nightyard/scheduling';
import { planResultSchema } from '@nightyard/contracts';
import { chargers } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { generatedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';
import { SimulatedStation } from './simulated-station';
import { CentralSystem } from './central-system';
import { chargingProfiles, profileNightOf } from './charging-profiles';

// The official OCPP 1.6 and 2.0.1 JSON schemas, as ocpp-rpc applies them in strict mode.
const validators = standardValidators as unknown as {
  subprotocol: string;
  validate(id: string, params: unknown): boolean;
}[];
const validate = (protocol: 'ocpp1.6' | 'ocpp2.0.1', payload: unknown) =>
  validators.find((v) => v.subprotocol === protocol)!.validate('urn:SetChargingProfile.req', payload);

describe('OCPP charging profiles of the demo plan validate against the official schemas', () => {
  it('1.6 SetChargingProfile.req and 2.0.1 SetChargingProfileRequest, integer watts, one period per change', async () => {
    const file = JSON.parse(
      readFileSync(new URL('../../../../libs/scheduling/examples/demo-depot.json', import.meta.url), 'utf8'),
    );
    const parsed = parseScenario(file);
    if (!parsed.ok) throw new Error('demo example invalid');
    const result = planResultSchema.parse(await planScenario(parsed.scenario));
    const refs = parsed.scenario.chargers.map((c) => ({ label: c.id, connectorId: 1, evseId: 1 }));
    for (const [version, protocol] of [
      ['1.6', 'ocpp1.6'],
      ['2.0.1', 'ocpp2.0.1'],
    ] as const) {
      const exported = chargingProfiles(result, profileNightOf([], 'America/Chicago', '2026-12-02'), refs, version);
      expect(exported).toHaveLength(refs.length);
      for (const e of exported) {
        expect(validate(protocol, e.payload)).toBe(true);
        const schedule =
          version === '1.6'
            ? (
                e.payload as {
                  csChargingProfiles: { chargingSchedule: { chargingSchedulePeriod: { limit: number }[] } };
                }
              ).csChargingProfiles.chargingSchedule
            : (
                e.payload as {
                  chargingProfile: { chargingSchedule: { chargingSchedulePeriod: { limit: number }[] }[] };
                }
              ).chargingProfile.chargingSchedule[0]!;
        const limits = schedule.chargingSchedulePeriod.map((p) => p.limit);
        expect(limits.every(Number.isInteger)).toBe(true);
        expect(limits.every((l, i) => i === 0 || l !== limits[i - 1])).toBe(true);
      }
    }
  });

  it('a fractional kW limit would fail the schema (why limits are whole watts)', () => {
    const bad = {
      connectorId: 1,
      csChargingProfiles: {
        chargingProfileId: 1,
        stackLevel: 1,
        chargingProfilePurpose: 'TxDefaultProfile',
        chargingProfileKind: 'Absolute',
        chargingSchedule: { chargingRateUnit: 'W', chargingSchedulePeriod: [{ startPeriod: 0, limit: 19.23 }] },
      },
    };
    expect(() => validate('ocpp1.6', bad)).toThrow();
  });
});

describe('OCPP central system with the station simulator', () => {
  const app = createTestApp();
  const central = new CentralSystem(app.db, pino({ level: 'silent' }), app.deps.clock);
  let server: Server;
  let url: string;
  let sup: TestUser;
  let fac: TestUser;
  let depotId: string;
  let planId: string;
  const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
  const stations: SimulatedStation[] = [];

  beforeAll(async () => {
    app.deps.onPlanPublished = (id) => void central.sendPlan(id);
    server = app.app.listen(0, '127.0.0.1');
    central.attachTo(server);
    await new Promise((r) => server.once('listening', r));
    url = `ws://127.0.0.1:${(server.address() as AddressInfo).port}/ocpp`;
    const org = await createOrganisation(app, { sup: ['supervisor'], fac: ['facilities'] });
    ({ sup, fac } = org.users as Record<string, TestUser>);
    const depot = await createDepot(app.db, org.organisationId);
    depotId = depot.depot.id;
    await addBuses(app.db, org.organisationId, depotId, ['31', '32']);
    for (const date of ['2026-12-09', '2026-12-10']) {
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
        .send({ identity: `T-${c.label}-${depotId.slice(0, 8)}`, password: 'test-charger-password' })
        .expect(204);
    }
    planId = (await generatedPlan(app, sup, depotId, '2026-12-09')).id;
  });

  afterAll(async () => {
    await Promise.all(stations.map((s) => s.stop()));
    await central.close();
    server.close();
  });

  it('refuses an unknown identity and a wrong password', async () => {
    const wrong = new RPCClient({
      endpoint: url,
      identity: `T-A-${depotId.slice(0, 8)}`,
      password: 'not-the-password!!',
      protocols: ['ocpp1.6'],
      reconnect: false,
    } as never);
    await expect(wrong.connect()).rejects.toThrow();
    const unknown = new RPCClient({
      endpoint: url,
      identity: 'NOBODY',
      password: 'test-charger-password',
      protocols: ['ocpp1.6'],
      reconnect: false,
    } as never);
    await expect(unknown.connect()).rejects.toThrow();
  });

  it('publish -> profile received -> meter values follow it -> live state in the Depot', async () => {
    const plan = (await app.request().get(`/api/plans/${planId}`).set(as(sup))).body.plan;
    // Pick a charger and a quarter hour in which the plan gives it power, and run its clock there.
    const session = plan.result.sessions.find((s: { kw: number[] }) => s.kw.some((k) => k > 1));
    const k = session.kw.findIndex((v: number) => v > 1);
    const at = new Date(Date.parse(session.start) + k * 15 * 60_000 + 60_000);
    const label = session.charger;
    const station = new SimulatedStation({
      url,
      identity: `T-${label}-${depotId.slice(0, 8)}`,
      password: 'test-charger-password',
      protocol: label === 'C' ? 'ocpp2.0.1' : 'ocpp1.6',
      clock: () => at,
      meterIntervalMs: 200,
    });
    stations.push(station);
    await station.start();
    await app
      .request()
      .post(`/api/plans/${planId}/publish`)
      .set(as(sup))
      .send({ expectedPublishedId: null })
      .expect(200);
    await expect.poll(() => station.received.length, { timeout: 5000 }).toBeGreaterThan(0);
    const expectedW = Math.round(session.kw[k] * 1000);
    expect(station.limitW()).toBe(expectedW);
    await expect
      .poll(
        async () => {
          const [row] = await app.db
            .select()
            .from(chargers)
            .where(eq(chargers.depotId, depotId))
            .then((r) => r.filter((c) => c.label === label));
          return row?.livePowerW;
        },
        { timeout: 5000 },
      )
      .toBe(expectedW);
    const detail = await app.request().get(`/api/depots/${depotId}`).set(as(fac)).expect(200);
    const live = detail.body.depot.chargers.find((c: { label: string }) => c.label === label).live;
    expect(live.status).toBe('charging');
    expect(live.powerKw).toBeCloseTo(expectedW / 1000, 1);
  });

  it("a fault shows as faulted; a malformed message gets the protocol's error; the server keeps serving", async () => {
    const station = stations[0]!;
    await station.fault();
    await expect
      .poll(
        async () => {
          const detail = await app.request().get(`/api/depots/${depotId}`).set(as(fac));
          return detail.body.depot.chargers.filter(
            (c: { live: { status: string } | null }) => c.live?.status === 'faulted',
          ).length;
        },
        { timeout: 5000 },
      )
      .toBe(1);
    const loose = new RPCClient({
      endpoint: url,
      identity: `T-B-${depotId.slice(0, 8)}`,
      password: 'test-charger-password',
      protocols: ['ocpp1.6'],
      strictMode: false,
      reconnect: false,
    } as never);
    await loose.connect();
    await expect(loose.call('BootNotification', { chargePointVendor: 42 })).rejects.toMatchObject({
      rpcErrorCode: expect.stringMatching(/Violation/),
    });
    await expect(loose.call('Heartbeat', {})).resolves.toMatchObject({ currentTime: expect.any(String) });
    await loose.close({ force: true });
    await app.request().get('/api/health').expect(200);
  });

  it('exports the published plan at /api/plans/:id/ocpp in both versions; a draft is refused', async () => {
    const v16 = await app.request().get(`/api/plans/${planId}/ocpp`).query({ version: '1.6' }).set(as(sup)).expect(200);
    expect(v16.body.map((e: { chargerId: string }) => e.chargerId)).toEqual(['A', 'B', 'C']);
    for (const e of v16.body) expect(validate('ocpp1.6', e.payload)).toBe(true);
    const v201 = await app
      .request()
      .get(`/api/plans/${planId}/ocpp`)
      .query({ version: '2.0.1' })
      .set(as(sup))
      .expect(200);
    for (const e of v201.body) expect(validate('ocpp2.0.1', e.payload)).toBe(true);
    const draft = await app
      .request()
      .post(`/api/depots/${depotId}/plans`)
      .set(as(sup))
      .send({ serviceDate: '2026-12-09' })
      .expect(202);
    await app.request().get(`/api/plans/${draft.body.plan.id}/ocpp`).query({ version: '1.6' }).set(as(sup)).expect(409);
    await app.request().get(`/api/plans/${planId}/ocpp`).query({ version: '1.5' }).set(as(sup)).expect(400);
  });
});
