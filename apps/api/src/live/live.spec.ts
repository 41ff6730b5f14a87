import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { pino } from 'pino';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { liveEventSchema, type LiveEvent } from '@nightyard/contracts';
import { createDepot } from '../testing/depot-fixture';
import { addBuses, dayRuns } from '../testing/fleet-fixture';
import { generatedPlan } from '../testing/plan-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';
import { SimulatedStation } from '../ocpp/simulated-station';
import { CentralSystem } from '../ocpp/central-system';
import { LiveBus } from './live-bus';
import { feedChargerStates } from './live-feeds';

/** An open live stream read as the browser reads it: events parsed, comments counted. */
class StreamReader {
  readonly events: LiveEvent[] = [];
  comments = 0;
  ended = false;
  private readonly abort = new AbortController();
  status = 0;
  contentType = '';

  async open(url: string, token?: string): Promise<this> {
    const res = await fetch(url, {
      headers: token ? { Authorization: `Bearer ${token}` } : {},
      signal: this.abort.signal,
    });
    this.status = res.status;
    this.contentType = res.headers.get('content-type') ?? '';
    if (!res.ok || !res.body) {
      await res.text();
      this.ended = true;
      return this;
    }
    void this.read(res.body.getReader());
    return this;
  }

  private async read(reader: ReadableStreamDefaultReader<Uint8Array>): Promise<void> {
    const decoder = new TextDecoder();
    let buffer = '';
    try {
      for (;;) {
        const { done, value } = await reader.read();
        if (done) break;
        buffer += decoder.decode(value, { stream: true });
        let cut: number;
        while ((cut = buffer.indexOf('\n\n')) >= 0) {
          const block = buffer.slice(0, cut);
          buffer = buffer.slice(cut + 2);
          if (block.startsWith(':')) this.comments++;
          const data = /^data: (.*)$/m.exec(block)?.[1];
          const type = /^event: (.*)$/m.exec(block)?.[1];
          if (data) {
            const event = liveEventSchema.parse(JSON.parse(data));
            expect(event.type).toBe(type);
            this.events.push(event);
          }
        }
      }
    } catch {
      // Aborted by the test.
    }
    this.ended = true;
  }

  of<T extends LiveEvent['type']>(type: T): Extract<LiveEvent, { type: T }>[] {
    return this.events.filter((e): e is Extract<LiveEvent, { type: T }> => e.type === type);
  }

  close(): void {
    this.abort.abort();
  }
}

describe('live stream of a depot (Server-Sent Events)', () => {
  const live = new LiveBus(undefined, { heartbeatMs: 200, maxMs: 4000, perUser: 3 });
  const app = createTestApp({ live });
  const central = new CentralSystem(app.db, pino({ level: 'silent' }), app.deps.clock);
  feedChargerStates(central, live, app.deps.clock);
  let server: Server;
  let base: string;
  let ocppUrl: string;
  let sup: TestUser;
  let fac: TestUser;
  let yard: TestUser;
  let finance: TestUser;
  let stranger: TestUser;
  let depotId: string;
  let otherDepotId: string;
  let planId: string;
  const readers: StreamReader[] = [];
  const stations: SimulatedStation[] = [];
  const as = (u: TestUser) => ({ Authorization: `Bearer ${u.token}` });
  const open = async (path: string, user?: TestUser) => {
    const r = await new StreamReader().open(`${base}${path}`, user?.token);
    readers.push(r);
    return r;
  };
  const identity = (label: string) => `L-${label}-${depotId.slice(0, 8)}`;

  beforeAll(async () => {
    app.deps.onPlanPublished = (id) => void central.sendPlan(id);
    server = app.app.listen(0, '127.0.0.1');
    central.attachTo(server);
    await new Promise((r) => server.once('listening', r));
    const port = (server.address() as AddressInfo).port;
    base = `http://127.0.0.1:${port}/api`;
    ocppUrl = `ws://127.0.0.1:${port}/ocpp`;
    const org = await createOrganisation(app, {
      sup: ['supervisor'],
      fac: ['facilities'],
      yard: ['yard'],
      finance: ['finance'],
    });
    ({ sup, fac, yard, finance } = org.users as Record<string, TestUser>);
    const depot = await createDepot(app.db, org.organisationId);
    depotId = depot.depot.id;
    for (const c of depot.chargers) {
      await app
        .request()
        .put(`/api/depots/${depotId}/chargers/${c.id}/ocpp`)
        .set(as(fac))
        .send({ identity: identity(c.label), password: 'test-charger-password' })
        .expect(204);
    }
    await addBuses(app.db, org.organisationId, depotId, ['41', '42']);
    for (const date of ['2026-12-09', '2026-12-10']) {
      await app
        .request()
        .put(`/api/depots/${depotId}/service-days/${date}`)
        .set(as(sup))
        .send({ runs: dayRuns(date, ['41', '42'], () => 20) })
        .expect(200);
    }
    planId = (await generatedPlan(app, sup, depotId, '2026-12-09')).id;
    const other = await createOrganisation(app, { stranger: ['admin'] });
    stranger = other.users.stranger!;
    otherDepotId = (await createDepot(app.db, other.organisationId, 'Other depot')).depot.id;
  });

  afterAll(async () => {
    for (const r of readers) r.close();
    await Promise.all(stations.map((s) => s.stop()));
    await central.close();
    server.close();
  });

  it('opens with a snapshot, then delivers a charger fault within seconds, and a fault stays until cleared', async () => {
    const stream = await open(`/depots/${depotId}/live`, yard);
    expect(stream.status).toBe(200);
    expect(stream.contentType).toMatch(/^text\/event-stream/);
    await expect.poll(() => stream.of('snapshot').length).toBe(1);
    expect(stream.of('snapshot')[0]!.chargers.map((c) => [c.label, c.status])).toEqual([
      ['A', 'offline'],
      ['B', 'offline'],
      ['C', 'offline'],
    ]);

    const station = new SimulatedStation({
      url: ocppUrl,
      identity: identity('B'),
      password: 'test-charger-password',
      protocol: 'ocpp1.6',
      meterIntervalMs: 100,
    });
    stations.push(station);
    await station.start();
    await expect
      .poll(() => stream.of('charger').at(-1)?.charger, { timeout: 5000 })
      .toMatchObject({ label: 'B', status: 'available', powerKw: 0 });

    await station.fault();
    await expect.poll(() => stream.of('charger').at(-1)?.charger.status, { timeout: 5000 }).toBe('faulted');
    // Meter values keep coming (every 100 ms here): the fault is not reported away.
    const faultedAt = stream.events.length;
    await new Promise((r) => setTimeout(r, 600));
    expect(stream.events.slice(faultedAt).filter((e) => e.type === 'charger')).toEqual([]);
    expect(stream.comments).toBeGreaterThan(0);

    await station.clear();
    await expect.poll(() => stream.of('charger').at(-1)?.charger.status, { timeout: 5000 }).toBe('available');

    // Another depot's stream (of another organisation) heard none of it.
    const detail = await app.request().get(`/api/depots/${depotId}`).set(as(fac)).expect(200);
    expect(detail.body.depot.chargers.find((c: { label: string }) => c.label === 'B').live.status).toBe('available');
  });

  it('a bus plugged in and not drawing shows as plugged in, not as an available charger', async () => {
    const stream = await open(`/depots/${depotId}/live`, yard);
    await expect.poll(() => stream.of('snapshot').length).toBe(1);
    // OCPP 2.0.1 says Occupied whether or not power flows; no plan is published here, so none does.
    const station = new SimulatedStation({
      url: ocppUrl,
      identity: identity('C'),
      password: 'test-charger-password',
      protocol: 'ocpp2.0.1',
      meterIntervalMs: 100,
    });
    stations.push(station);
    await station.start();
    await expect
      .poll(() => stream.of('charger').findLast((e) => e.charger.label === 'C')?.charger.status, { timeout: 5000 })
      .toBe('available');
    await station.plugIn(40);
    await expect
      .poll(() => stream.of('charger').findLast((e) => e.charger.label === 'C')?.charger, { timeout: 5000 })
      .toMatchObject({ status: 'connected', powerKw: 0 });
    const detail = await app.request().get(`/api/depots/${depotId}`).set(as(fac)).expect(200);
    expect(detail.body.depot.chargers.find((c: { label: string }) => c.label === 'C').live.status).toBe('connected');
  });

  it('a reconnection starts from the stored state; a charger that leaves goes offline', async () => {
    const station = stations[0]!;
    await station.fault();
    await central.settled();
    const stream = await open(`/depots/${depotId}/live`, finance);
    await expect.poll(() => stream.of('snapshot').length).toBe(1);
    expect(stream.of('snapshot')[0]!.chargers.find((c) => c.label === 'B')).toMatchObject({ status: 'faulted' });
    await station.stop();
    stations.length = 0;
    await expect
      .poll(() => stream.of('charger').at(-1)?.charger, { timeout: 5000 })
      .toMatchObject({ label: 'B', status: 'offline', powerKw: null });
  });

  it('tells of a publication and of a yard report with its revision', async () => {
    const stream = await open(`/depots/${depotId}/live`, sup);
    await expect.poll(() => stream.of('snapshot').length).toBe(1);
    await app
      .request()
      .post(`/api/plans/${planId}/publish`)
      .set(as(sup))
      .send({ expectedPublishedId: null })
      .expect(200);
    await expect
      .poll(() => stream.of('plan'))
      .toEqual([expect.objectContaining({ planId, kind: 'published', serviceDate: '2026-12-09', version: 1 })]);
    // Before the night starts, a report re-plans the whole night.
    await app
      .request()
      .post(`/api/depots/${depotId}/tonight/reports`)
      .set(as(yard))
      .send({ planId, kind: 'charger_out', charger: 'B', reason: 'Faulted' })
      .expect(201);
    await expect.poll(() => stream.of('plan').length).toBe(2);
    expect(stream.of('plan')[1]).toMatchObject({ kind: 'revised', version: 2 });
    expect(stream.of('notice')).toEqual([
      expect.objectContaining({
        kind: 'charger_out',
        charger: 'B',
        text: expect.stringContaining('charger B out of service'),
      }),
    ]);
  });

  it('is scoped to the organisation and needs a signed-in caller', async () => {
    const anonymous = await open(`/depots/${depotId}/live`);
    expect(anonymous.status).toBe(401);
    const foreign = await open(`/depots/${depotId}/live`, stranger);
    expect(foreign.status).toBe(404);
    const own = await open(`/depots/${otherDepotId}/live`, stranger);
    expect(own.status).toBe(200);
    await expect.poll(() => own.of('snapshot').length).toBe(1);
    expect(own.of('snapshot')[0]!.chargers).toEqual([]);
    // Events of the first depot never reach it.
    live.publish(depotId, {
      type: 'notice',
      at: new Date(0).toISOString(),
      kind: 'bus_absent',
      text: 'x',
      charger: null,
      bus: '41',
    });
    await new Promise((r) => setTimeout(r, 300));
    expect(own.events.map((e) => e.type)).toEqual(['snapshot']);
  });

  it('releases everything when the client leaves, ends after its lifetime, and limits streams per person', async () => {
    for (const r of readers) r.close();
    await expect.poll(() => live.listenerCount()).toBe(0);
    const streams = await Promise.all([1, 2, 3].map(() => open(`/depots/${depotId}/live`, fac)));
    expect(streams.map((s) => s.status)).toEqual([200, 200, 200]);
    const fourth = await open(`/depots/${depotId}/live`, fac);
    expect(fourth.status).toBe(429);
    streams[0]!.close();
    await expect.poll(() => live.listenerCount(depotId)).toBe(2);
    expect((await open(`/depots/${depotId}/live`, fac)).status).toBe(200);
    // The server ends each stream after its lifetime (4 s here); the client then opens a new one.
    await expect.poll(() => streams[1]!.ended, { timeout: 6000 }).toBe(true);
    await app.request().get('/api/health').expect(200);
    // On shutdown every stream is ended, so the server can close.
    const last = await open(`/depots/${depotId}/live`, fac);
    await expect.poll(() => last.of('snapshot').length).toBe(1);
    live.endStreams();
    await expect.poll(() => last.ended).toBe(true);
    await expect.poll(() => live.listenerCount()).toBe(0);
  });

  it("ends a person's open streams when their depots change; the reconnection is refused for a depot taken away", async () => {
    const org = await createOrganisation(app, { boss: ['admin'], watcher: ['finance'] });
    const here = (await createDepot(app.db, org.organisationId, 'Here')).depot.id;
    const there = (await createDepot(app.db, org.organisationId, 'There')).depot.id;
    const watcher = org.users.watcher!;
    const stream = await open(`/depots/${here}/live`, watcher);
    expect(stream.status).toBe(200);
    await expect.poll(() => stream.of('snapshot').length).toBe(1);
    await app
      .request()
      .patch(`/api/users/${watcher.id}`)
      .set(as(org.users.boss!))
      .send({ depotIds: [there] })
      .expect(200);
    await expect.poll(() => stream.ended).toBe(true);
    expect((await open(`/depots/${here}/live`, watcher)).status).toBe(404);
    expect((await open(`/depots/${there}/live`, watcher)).status).toBe(200);
  });

  it('is described in the OpenAPI document as an event stream', async () => {
    const doc = (await app.request().get('/api/openapi.json').expect(200)).body;
    const op = doc.paths['/api/depots/{depotId}/live'].get;
    expect(Object.keys(op.responses['200'].content)).toEqual(['text/event-stream']);
    expect(op.description).toMatch(/Roles allowed: .*finance/);
  });
});
