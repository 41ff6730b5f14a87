import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { and, desc, eq } from 'drizzle-orm';
import { pino } from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { PlanResult } from '@nightyard/contracts';
import { buses, plans, runs, yardReports } from '../db/schema';
import { CentralSystem } from '../ocpp/central-system';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { publishedPlan } from '../testing/plan-fixture';
import { TEST_START, createOrganisation, createTestApp, signInAgain, type TestUser } from '../testing/test-app';
import { SimulatedStation } from '../ocpp/simulated-station';
import { SOC_REPLAN_POINTS, takeChargerReading, type ChargerReadingOutcome } from './charger-readings';

// The charger reads the bus's state of charge as it is plugged in (OCPP measurand SoC): the
// reading replaces the typed or estimated one, and one far from the plan re-plans the night.
describe('state of charge read by the charger at plug-in (central system and station simulator)', () => {
  let now = TEST_START;
  const app = createTestApp({ clock: () => now });
  const central = new CentralSystem(app.db, pino({ level: 'silent' }), () => now);
  const outcomes: ChargerReadingOutcome[] = [];
  let server: Server;
  let sup: TestUser;
  let depotId: string;
  let planId: string;
  let result: PlanResult;
  const stations = new Map<string, SimulatedStation>();
  const protocols = new Map<string, 'ocpp1.6' | 'ocpp2.0.1'>();
  const NUMBERS = ['41', '42', '43'];
  const DATE = '2026-12-09';

  beforeAll(async () => {
    central.onSocReading(async (reading) => {
      outcomes.push(
        await takeChargerReading({ db: app.db, mailer: app.deps.mailer, publicUrl: app.deps.auth.publicUrl }, reading),
      );
    });
    server = app.app.listen(0, '127.0.0.1');
    central.attachTo(server);
    await new Promise((r) => server.once('listening', r));
    const org = await createOrganisation(app, { sup: ['supervisor'], fac: ['facilities'] });
    sup = org.users.sup!;
    const depot = await createDepot(app.db, org.organisationId);
    depotId = depot.depot.id;
    await addBuses(app.db, org.organisationId, depotId, NUMBERS);
    for (const date of [DATE, '2026-12-10']) {
      // Typed readings of 40 % at pull-in: what the plan takes until a charger says otherwise.
      await app
        .request()
        .put(`/api/depots/${depotId}/service-days/${date}`)
        .set({ Authorization: `Bearer ${sup.token}` })
        .send({ runs: dayRuns(date, NUMBERS, () => 40) })
        .expect(200);
    }
    planId = await publishedPlan(app, sup, depotId, DATE);
    const [row] = await app.db.select().from(plans).where(eq(plans.id, planId));
    result = row!.result as unknown as PlanResult;
    const url = `ws://127.0.0.1:${(server.address() as AddressInfo).port}/ocpp`;
    for (const [k, c] of depot.chargers.entries()) {
      const identity = `S-${c.label}-${depotId.slice(0, 8)}`;
      await app
        .request()
        .put(`/api/depots/${depotId}/chargers/${c.id}/ocpp`)
        .set({ Authorization: `Bearer ${org.users.fac!.token}` })
        .send({ identity, password: 'test-charger-password' })
        .expect(204);
      // One station of each protocol at least: their messages differ.
      const protocol = k % 2 ? 'ocpp2.0.1' : 'ocpp1.6';
      protocols.set(c.label, protocol);
      const station = new SimulatedStation({
        url,
        identity,
        password: 'test-charger-password',
        protocol,
        clock: () => now,
        meterIntervalMs: 60_000,
      });
      stations.set(c.label, station);
    }
    await Promise.all([...stations.values()].map((s) => s.start()));
  }, 120_000);

  afterAll(async () => {
    await Promise.all([...stations.values()].map((s) => s.stop()));
    await central.close();
    server.close();
  });

  const protocolOf = (label: string) => protocols.get(label);
  const firstSessions = () => {
    const seen = new Set<string>();
    return [...result.sessions]
      .sort((a, b) => Date.parse(a.start) - Date.parse(b.start))
      .filter((s) => !seen.has(s.bus) && seen.add(s.bus));
  };
  const arrivalOf = async (bus: string) => {
    const [row] = await app.db
      .select({ pct: runs.arrivalSocPct, source: runs.arrivalSocSource })
      .from(runs)
      .innerJoin(buses, eq(buses.id, runs.busId))
      .where(and(eq(runs.depotId, depotId), eq(runs.serviceDate, DATE), eq(buses.number, bus)))
      .orderBy(desc(runs.pullIn))
      .limit(1);
    return row!;
  };
  const published = async () =>
    (
      await app.db
        .select()
        .from(plans)
        .where(and(eq(plans.depotId, depotId), eq(plans.serviceDate, DATE), eq(plans.state, 'published')))
    )[0]!;

  it('a reading close to the plan becomes the arrival reading (source: charger) and leaves the plan as it is', async () => {
    // On an OCPP 1.6 station: StartTransaction, then MeterValues with the reading.
    const session = firstSessions().find((x) => protocolOf(x.charger) === 'ocpp1.6')!;
    expect(session).toBeDefined();
    now = new Date(Date.parse(session.start) + 60_000);
    await signInAgain(app, sup);
    const close = 40 + SOC_REPLAN_POINTS - 1;
    await stations.get(session.charger)!.plugIn(close);
    await central.socSettled();
    expect(outcomes.at(-1)).toMatchObject({
      taken: true,
      bus: session.bus,
      socPct: close,
      plannedPct: 40,
      arrival: true,
      revised: null,
    });
    expect(await arrivalOf(session.bus)).toEqual({ pct: close, source: 'charger' });
    expect((await published()).id).toBe(planId);
    // The service day shows where the reading came from.
    const day = await app
      .request()
      .get(`/api/depots/${depotId}/service-days/${DATE}`)
      .set({ Authorization: `Bearer ${sup.token}` })
      .expect(200);
    const run = day.body.runs.filter((r: { busNumber: string }) => r.busNumber === session.bus).at(-1);
    expect(run).toMatchObject({ arrivalSocPct: close, arrivalSocSource: 'charger' });
    // The same charger repeating its plug-in sample a minute later (a fault, a replay) is the same
    // plug-in: not taken again, so it cannot re-plan the night and mail the staff over and over.
    const heard = outcomes.length;
    now = new Date(now.getTime() + 60_000);
    await stations.get(session.charger)!.plugIn(90);
    await central.socSettled();
    expect(outcomes.length).toBe(heard);
    expect(await arrivalOf(session.bus)).toEqual({ pct: close, source: 'charger' });
    expect((await published()).id).toBe(planId);
  });

  it('a reading far from the plan re-plans the rest of the night from it, reported by the charger', async () => {
    // On an OCPP 2.0.1 station: TransactionEvent Started carrying the reading.
    const session = firstSessions().find((x) => protocolOf(x.charger) === 'ocpp2.0.1')!;
    expect(session).toBeDefined();
    now = new Date(Math.max(now.getTime(), Date.parse(session.start) + 2 * 60_000));
    await stations.get(session.charger)!.plugIn(12);
    await central.socSettled();
    const outcome = outcomes.at(-1)!;
    expect(outcome).toMatchObject({ taken: true, bus: session.bus, socPct: 12, plannedPct: 40, arrival: true });
    const revised = await published();
    expect(revised.id).not.toBe(planId);
    expect(revised.kind).toBe('revision');
    expect(revised.createdBy).toBeNull();
    expect(revised.notes.at(-1)).toMatch(new RegExp(`bus ${session.bus} measured at 12 %`));
    const [report] = await app.db.select().from(yardReports).where(eq(yardReports.revisionId, revised.id));
    expect(report).toMatchObject({ kind: 'soc_reading', bus: session.bus, socPct: 12, reportedBy: null });
    expect(report!.reason).toMatch(
      new RegExp(`^Charger ${session.charger} read 12 % at plug-in \\(\\d\\d:\\d\\d\\); the plan took 40 %$`),
    );
    expect(await arrivalOf(session.bus)).toEqual({ pct: 12, source: 'charger' });
    // The re-plan starts the bus from 12 %: it gets more energy than the plan gave it from 40 %.
    const energyOf = (r: PlanResult) =>
      r.sessions.filter((s) => s.bus === session.bus).reduce((sum, s) => sum + s.kwh, 0);
    expect(energyOf(revised.result as unknown as PlanResult)).toBeGreaterThan(energyOf(result) + 1);
    planId = revised.id;
    result = revised.result as unknown as PlanResult;
  });

  it('a reading on a charger the plan leaves empty at that time is not taken', async () => {
    // Past the few minutes in which a charger's repeated reading counts as the same plug-in.
    now = new Date(now.getTime() + 6 * 60_000);
    const used = new Set(
      result.sessions
        .filter((s) => Date.parse(s.start) - 30 * 60_000 <= now.getTime() && now.getTime() < Date.parse(s.end))
        .map((s) => s.charger),
    );
    const idle = [...stations.keys()].find((label) => !used.has(label));
    expect(idle).toBeDefined();
    const before = outcomes.length;
    await stations.get(idle!)!.plugIn(50);
    await central.socSettled();
    expect(outcomes.length).toBe(before + 1);
    expect(outcomes.at(-1)).toEqual({ taken: false, why: `the plan has no bus on charger ${idle} at this time` });
    expect((await published()).id).toBe(planId);
  });
});
