import { connect, type AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { eq } from 'drizzle-orm';
import { pino } from 'pino';
import { RPCClient } from 'ocpp-rpc';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chargers } from '../db/schema';
import { createDepot } from '../testing/depot-fixture';
import { createOrganisation, createTestApp, type TestUser } from '../testing/test-app';
import { CentralSystem, DEFAULT_AUTH_FAILURE_LIMITS, MAX_FRAME_BYTES } from './central-system';
import { LiveStateWriter, type LiveValues } from './live-state-writer';

const PASSWORD = 'hardening-charger-password';

/** A hand-written upgrade request; resolves with the status line once a refusal has closed the socket. */
function rawUpgrade(port: number, path: string, headers: Record<string, string> = {}): Promise<string> {
  return new Promise((resolve, reject) => {
    const socket = connect(port, '127.0.0.1');
    let data = '';
    socket.on('data', (chunk) => {
      data += chunk.toString('latin1');
      // An accepted upgrade stays open (it is a WebSocket now): the status line is the answer.
      if (data.startsWith('HTTP/1.1 101')) {
        socket.destroy();
        resolve('HTTP/1.1 101 Switching Protocols');
      }
    });
    socket.on('close', () => resolve(data.split('\r\n')[0] ?? ''));
    socket.on('error', reject);
    const lines = [
      `GET ${path} HTTP/1.1`,
      'Host: 127.0.0.1',
      'Upgrade: websocket',
      'Connection: Upgrade',
      'Sec-WebSocket-Key: dGhlIHNhbXBsZSBub25jZQ==',
      'Sec-WebSocket-Version: 13',
      ...Object.entries(headers).map(([k, v]) => `${k}: ${v}`),
    ];
    socket.write(`${lines.join('\r\n')}\r\n\r\n`);
    // The server must close the socket itself after a refusal.
    socket.setTimeout(5000, () => reject(new Error('the server left the socket open')));
  });
}

const basic = (identity: string, password: string) =>
  `Basic ${Buffer.from(`${identity}:${password}`).toString('base64')}`;

describe('OCPP central system under hostile input', () => {
  const app = createTestApp();
  // A clock the tests move: the password throttle's window passes without waiting.
  let now = Date.parse('2026-12-09T06:00:00Z');
  const limits = { perIdentity: 10, perAddress: 14, windowMs: DEFAULT_AUTH_FAILURE_LIMITS.windowMs };
  const central = new CentralSystem(app.db, pino({ level: 'silent' }), () => new Date(now), limits);
  let server: Server;
  let port: number;
  let url: string;
  let identities: string[];
  let chargerIds: string[];

  beforeAll(async () => {
    server = app.app.listen(0, '127.0.0.1');
    central.attachTo(server);
    await new Promise((r) => server.once('listening', r));
    port = (server.address() as AddressInfo).port;
    url = `ws://127.0.0.1:${port}/ocpp`;
    const org = await createOrganisation(app, { fac: ['facilities'] });
    const fac = org.users.fac as TestUser;
    const depot = await createDepot(app.db, org.organisationId);
    identities = [];
    chargerIds = [];
    for (const c of depot.chargers) {
      const identity = `H-${c.label}-${depot.depot.id.slice(0, 8)}`;
      await app
        .request()
        .put(`/api/depots/${depot.depot.id}/chargers/${c.id}/ocpp`)
        .set({ Authorization: `Bearer ${fac.token}` })
        .send({ identity, password: PASSWORD })
        .expect(204);
      identities.push(identity);
      chargerIds.push(c.id);
    }
  });

  afterAll(async () => {
    await central.close();
    server.close();
  });

  const client = (identity: string, password = PASSWORD, protocols = ['ocpp1.6']) =>
    new RPCClient({ endpoint: url, identity, password, protocols, reconnect: false, strictMode: false } as never);

  it('a malformed percent-encoding in the address gets 400 and a closed socket; the API serves on', async () => {
    expect(await rawUpgrade(port, '/ocpp/%E0%A4%A', { 'Sec-WebSocket-Protocol': 'ocpp1.6' })).toBe(
      'HTTP/1.1 400 Bad Request',
    );
    expect(await rawUpgrade(port, '/ocpp/', { 'Sec-WebSocket-Protocol': 'ocpp1.6' })).toBe('HTTP/1.1 400 Bad Request');
    expect(await rawUpgrade(port, '/not-ocpp/x')).toBe('HTTP/1.1 404 Not Found');
    await app.request().get('/api/health').expect(200);
  });

  it('a connection that offers no OCPP subprotocol is refused (schema checks always apply)', async () => {
    const auth = { Authorization: basic(identities[0]!, PASSWORD) };
    expect(await rawUpgrade(port, `/ocpp/${identities[0]}`, auth)).toBe('HTTP/1.1 400 Bad Request');
    expect(await rawUpgrade(port, `/ocpp/${identities[0]}`, { ...auth, 'Sec-WebSocket-Protocol': 'ocpp1.5' })).toBe(
      'HTTP/1.1 400 Bad Request',
    );
    expect(await rawUpgrade(port, `/ocpp/${identities[0]}`, { ...auth, 'Sec-WebSocket-Protocol': 'ocpp1.6' })).toBe(
      'HTTP/1.1 101 Switching Protocols',
    );
  });

  it('a 60 MB frame is refused: the connection is closed with 1009 (message too big)', async () => {
    const c = client(identities[0]!);
    await c.connect();
    const closed = new Promise<{ code: number }>((r) => c.once('close', r as never));
    expect(MAX_FRAME_BYTES).toBeLessThanOrEqual(64 * 1024);
    c.sendRaw('x'.repeat(60 * 1024 * 1024));
    expect((await closed).code).toBe(1009);
    await app.request().get('/api/health').expect(200);
  });

  it("connector and EVSE ids above 2^31-1 get the protocol's PropertyConstraintViolation, not a crash", async () => {
    const c = client(identities[1]!);
    await c.connect();
    await expect(
      c.call('StatusNotification', { connectorId: 2 ** 31, errorCode: 'NoError', status: 'Available' }),
    ).rejects.toMatchObject({ rpcErrorCode: 'PropertyConstraintViolation' });
    await expect(c.call('MeterValues', { connectorId: 2 ** 53, meterValue: [] })).rejects.toMatchObject({
      rpcErrorCode: 'PropertyConstraintViolation',
    });
    await expect(c.call('Heartbeat', {})).resolves.toMatchObject({ currentTime: expect.any(String) });
    await c.close({ force: true });
  });

  it('a reconnect replaces the older connection; the older one closing does not mark the charger offline', async () => {
    const first = client(identities[2]!);
    await first.connect();
    const firstClosed = new Promise((r) => first.once('close', r));
    const second = client(identities[2]!);
    await second.connect();
    await firstClosed;
    await second.call('StatusNotification', { connectorId: 1, errorCode: 'NoError', status: 'Charging' });
    await central.settled();
    expect(central.isConnected(chargerIds[2]!)).toBe(true);
    const [row] = await app.db.select().from(chargers).where(eq(chargers.id, chargerIds[2]!));
    expect(row).toMatchObject({ liveConnected: true, liveStatus: 'charging' });
    await second.close({ force: true });
    await expect
      .poll(async () => {
        await central.settled();
        const [r] = await app.db.select().from(chargers).where(eq(chargers.id, chargerIds[2]!));
        return r?.liveConnected;
      })
      .toBe(false);
  });

  it('a heartbeat flood costs a handful of writes and the charger stays served', async () => {
    const c = client(identities[1]!);
    await c.connect();
    const replies = await Promise.all(Array.from({ length: 500 }, () => c.call('Heartbeat', {})));
    expect(replies).toHaveLength(500);
    await central.settled();
    const [row] = await app.db.select().from(chargers).where(eq(chargers.id, chargerIds[1]!));
    expect(row?.liveSeenAt?.getTime()).toBe(now);
    await c.close({ force: true });
  });

  it('the default limits: 10 wrong passwords per identity, more per address (chargers share a NAT)', () => {
    expect(DEFAULT_AUTH_FAILURE_LIMITS).toEqual({ perIdentity: 10, perAddress: 50, windowMs: 5 * 60_000 });
  });

  it('too many wrong passwords: the identity, then the address, are refused at once even with the right password', async () => {
    const upgrade = (identity: string, password: string, forwardedFor: string) =>
      rawUpgrade(port, `/ocpp/${identity}`, {
        Authorization: basic(identity, password),
        'Sec-WebSocket-Protocol': 'ocpp1.6',
        'X-Forwarded-For': forwardedFor,
      });
    for (let i = 0; i < limits.perIdentity; i++) {
      expect(await upgrade(identities[0]!, `wrong-password-${i}`, '192.0.2.1')).toBe('HTTP/1.1 401 Unauthorized');
    }
    const started = performance.now();
    // From another address too: the identity itself is blocked.
    expect(await upgrade(identities[0]!, PASSWORD, '192.0.2.2')).toBe('HTTP/1.1 401 Unauthorized');
    // Refused before any database read or bcrypt comparison.
    expect(performance.now() - started).toBeLessThan(500);
    // The address has room for a few more failures; another charger from it still gets in.
    expect(await upgrade(identities[1]!, PASSWORD, '192.0.2.1')).toBe('HTTP/1.1 101 Switching Protocols');
    for (let i = limits.perIdentity; i < limits.perAddress; i++) {
      expect(await upgrade(`UNKNOWN-${i}`, 'whatever-password', '192.0.2.1')).toBe('HTTP/1.1 401 Unauthorized');
    }
    expect(await upgrade(identities[1]!, PASSWORD, '192.0.2.1')).toBe('HTTP/1.1 401 Unauthorized');
    // Other addresses are not affected; and once the window has passed, the blocked ones get in.
    expect(await upgrade(identities[1]!, PASSWORD, '192.0.2.3')).toBe('HTTP/1.1 101 Switching Protocols');
    now += limits.windowMs + 1000;
    expect(await upgrade(identities[0]!, PASSWORD, '192.0.2.1')).toBe('HTTP/1.1 101 Switching Protocols');
  });
});

describe('live-state writes per charger', () => {
  it('one write in flight, the latest values win, heartbeats at most once per interval', async () => {
    const writes: LiveValues[] = [];
    let release!: () => void;
    let t = 0;
    const writer = new LiveStateWriter(
      async (v) => {
        writes.push(v);
        await new Promise<void>((r) => (release = r));
      },
      () => new Date(t),
      5000,
    );
    writer.set({ liveConnected: true });
    for (let i = 0; i < 1000; i++) writer.set({ livePowerW: i });
    writer.set({ liveStatus: 'charging' });
    expect(writes).toEqual([{ liveConnected: true }]);
    release();
    await expect.poll(() => writes.length).toBe(2);
    expect(writes[1]).toEqual({ livePowerW: 999, liveStatus: 'charging' });
    release();
    await writer.settled();
    for (let i = 0; i < 100; i++) writer.touch();
    expect(writes).toHaveLength(2);
    t += 5000;
    writer.touch();
    writer.touch();
    expect(writes).toHaveLength(3);
    release();
    await writer.settled();
  });
});
