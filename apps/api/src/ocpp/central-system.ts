import { and, desc, eq, isNotNull } from 'drizzle-orm';
import type { IncomingMessage, Server } from 'node:http';
import type { Duplex } from 'node:stream';
import { RPCServer, createRPCError } from 'ocpp-rpc';
import type { Logger } from 'pino';
import { planResultSchema } from '@nightyard/contracts';
import type { Clock } from '../time/clock';
import { nightOfDepot } from '../night/depot-night';
import type { Db } from '../db/client';
import { chargers, depots, plans } from '../db/schema';
import { DUMMY_HASH, checkPassword } from '../auth/secrets';
import { chargingProfiles, type OcppVersion } from './charging-profiles';
import { FailureThrottle } from './failure-throttle';
import { LiveStateWriter, type LiveValues } from './live-state-writer';
import type { LiveCharger } from '@nightyard/contracts';
import { liveChargerOf } from '../live/live-charger';

/** Told of a charger's new live state (status or power changed), once it is stored. */
export type LiveChangeListener = (depotId: string, charger: LiveCharger) => void;

type RpcClient = {
  identity: string;
  protocol?: string;
  session: { chargerId: string; depotId: string; label: string };
  handle(method: string, handler: (args: { params: Record<string, unknown> }) => unknown): void;
  call(method: string, params: unknown): Promise<unknown>;
  close(opts?: { code?: number; reason?: string; force?: boolean }): Promise<unknown>;
  on(event: 'close', listener: () => void): void;
};

/** The live states the product shows, from OCPP's richer connector statuses. */
export type LiveStatus = 'available' | 'charging' | 'faulted' | 'offline';

export function liveStatusOf(ocppStatus: string): LiveStatus {
  switch (ocppStatus) {
    case 'Charging':
    case 'Occupied':
    case 'SuspendedEV':
    case 'SuspendedEVSE':
      return 'charging';
    case 'Faulted':
      return 'faulted';
    case 'Unavailable':
      return 'offline';
    default:
      return 'available';
  }
}

/** Active import power in W from a MeterValues sample list (1.6 and 2.0.1 shapes). */
export function powerFromMeterValues(meterValue: unknown): number | null {
  for (const mv of (meterValue as { sampledValue?: Record<string, unknown>[] }[] | undefined) ?? []) {
    for (const sv of mv.sampledValue ?? []) {
      if ((sv.measurand ?? 'Energy.Active.Import.Register') !== 'Power.Active.Import') continue;
      const value = Number(sv.value);
      const unit = (sv.unit ?? (sv.unitOfMeasure as { unit?: string } | undefined)?.unit ?? 'W') as string;
      if (Number.isFinite(value)) return unit === 'kW' ? value * 1000 : value;
    }
  }
  return null;
}


/** Subprotocols spoken; a connection must offer one so every message is schema-checked. */
export const OCPP_PROTOCOLS = ['ocpp1.6', 'ocpp2.0.1'] as const;
/** Largest WebSocket message taken; OCPP messages are a few kB (a long profile stays far below). */
export const MAX_FRAME_BYTES = 64 * 1024;
/**
 * Wrong passwords allowed in the window per charger identity and per client address. The address
 * limit is higher: a depot's chargers often reach us through one NAT or cellular router, and one
 * misconfigured charger must not lock out the others.
 */
export interface AuthFailureLimits {
  perIdentity: number;
  perAddress: number;
  windowMs: number;
}
export const DEFAULT_AUTH_FAILURE_LIMITS: AuthFailureLimits = { perIdentity: 10, perAddress: 50, windowMs: 5 * 60_000 };
const MAX_OCPP_INTEGER = 2 ** 31 - 1;
const WRONG_CREDENTIALS = 'Unknown charger identity or wrong password';

/** Writes a plain HTTP refusal on a socket that asked for an upgrade, and closes it. */
export function refuseUpgrade(socket: Duplex, status: 400 | 401 | 404 | 500 | 503, message: string): void {
  const reason = { 400: 'Bad Request', 401: 'Unauthorized', 404: 'Not Found', 500: 'Internal Server Error', 503: 'Service Unavailable' }[status];
  if (socket.writable) {
    socket.write(`HTTP/1.1 ${status} ${reason}\r\nConnection: close\r\nContent-Type: text/plain\r\nContent-Length: ${Buffer.byteLength(message)}\r\n\r\n${message}`);
  }
  socket.destroy();
}

/**
 * The charger's address for the throttle. Behind the reverse proxy on this machine (the only one
 * trusted, as for the HTTP API) it is the last X-Forwarded-For entry, the one the proxy added.
 */
function clientAddress(req: IncomingMessage): string {
  const peer = req.socket.remoteAddress ?? 'unknown';
  const forwarded = req.headers['x-forwarded-for'];
  const loopback = peer === '127.0.0.1' || peer === '::1' || peer === '::ffff:127.0.0.1';
  if (!loopback || typeof forwarded !== 'string') return peer;
  return forwarded.split(',').pop()?.trim() || peer;
}

/** Connector and EVSE ids are 32-bit in OCPP and in the database; a larger one is a protocol error. */
function assertIdsInRange(params: Record<string, unknown> | undefined) {
  const evse = params?.evse as Record<string, unknown> | undefined;
  const ids = [['connectorId', params?.connectorId], ['evseId', params?.evseId], ['evse.id', evse?.id], ['evse.connectorId', evse?.connectorId]] as const;
  for (const [name, value] of ids) {
    if (typeof value === 'number' && (value > MAX_OCPP_INTEGER || value < 0)) {
      throw createRPCError('PropertyConstraintViolation', `${name} must be between 0 and ${MAX_OCPP_INTEGER}`);
    }
  }
}

/**
 * The OCPP-J central system: chargers connect over WebSocket (security profile 1: HTTP basic auth
 * with a per-charger password), report their state, and receive the published plan as charging
 * profiles. Messages are checked against the official schemas (strict mode; a subprotocol is
 * required so that always applies).
 */
export class CentralSystem {
  readonly server: InstanceType<typeof RPCServer>;
  /** The current connection of each charger: a reconnect replaces it, the older one's close is ignored. */
  private readonly connected = new Map<string, RpcClient>();
  private readonly writers = new Map<string, LiveStateWriter>();
  private readonly failuresByIdentity: FailureThrottle;
  private readonly failuresByAddress: FailureThrottle;
  private readonly liveListeners = new Set<LiveChangeListener>();

  constructor(
    private readonly db: Db,
    private readonly log: Logger,
    private readonly clock: Clock,
    limits: AuthFailureLimits = DEFAULT_AUTH_FAILURE_LIMITS,
  ) {
    this.failuresByIdentity = new FailureThrottle(limits.perIdentity, limits.windowMs, clock);
    this.failuresByAddress = new FailureThrottle(limits.perAddress, limits.windowMs, clock);
    this.server = new RPCServer({
      protocols: [...OCPP_PROTOCOLS], strictMode: true, pingIntervalMs: 30_000,
      // Bad messages answer with the protocol's error code and a plain text, never a stack.
      respondWithDetailedErrors: false,
      wssOptions: { maxPayload: MAX_FRAME_BYTES },
    });
    this.server.auth((accept, reject, handshake) => {
      if (!OCPP_PROTOCOLS.some((p) => handshake.protocols.has(p))) {
        reject(400, `Offer the WebSocket subprotocol ${OCPP_PROTOCOLS.join(' or ')}`);
        return;
      }
      const identity = handshake.identity;
      const address = clientAddress(handshake.request as IncomingMessage);
      if (this.failuresByIdentity.blocked(identity) || this.failuresByAddress.blocked(address)) {
        reject(401, WRONG_CREDENTIALS);
        return;
      }
      this.authenticate(identity, handshake.password)
        .then((session) => {
          if (session) return accept(session);
          this.failuresByIdentity.fail(identity);
          this.failuresByAddress.fail(address);
          reject(401, WRONG_CREDENTIALS);
        })
        .catch((err: unknown) => {
          this.log.warn({ err }, 'charger sign-in could not be checked');
          reject(503, 'The central system cannot check credentials just now: retry');
        });
    });
    this.server.on('client', (client: unknown) => this.attach(client as RpcClient));
    this.server.on('error', (err: unknown) => this.log.warn({ err }, 'OCPP server error'));
  }

  /**
   * Takes a WebSocket upgrade for /ocpp/<identity>. Never throws and never leaves a promise
   * unhandled: whatever fails (a malformed address, the library, the database) ends in an HTTP
   * error on the socket and the socket closed.
   */
  readonly handleUpgrade = (req: IncomingMessage, socket: Duplex, head: Buffer): void => {
    // Errors on the raw socket before the library attaches its own listener (a reset, a write
    // after the peer left) would otherwise be thrown as unhandled 'error' events.
    socket.on('error', (err) => this.log.debug({ err }, 'charger socket error'));
    try {
      // The identity exactly as ocpp-rpc will read it (which throws on malformed percent-encoding).
      const identity = decodeURIComponent(new URL(`http://localhost${req.url || '/'}`).pathname.split('/').pop() ?? '');
      if (!identity) throw new URIError('no identity');
    } catch {
      refuseUpgrade(socket, 400, 'The address must be /ocpp/<charger identity>, percent-encoded as UTF-8');
      return;
    }
    this.server.handleUpgrade(req, socket as never, head).catch((err: unknown) => {
      this.log.error({ err }, 'OCPP upgrade failed');
      refuseUpgrade(socket, 500, 'The connection could not be set up');
    });
  };

  /** Routes an HTTP server's upgrade requests: /ocpp/<identity> here, anything else refused. */
  attachTo(server: Server): void {
    server.on('upgrade', (req: IncomingMessage, socket: Duplex, head: Buffer) => {
      if (req.url?.startsWith('/ocpp/')) this.handleUpgrade(req, socket, head);
      else refuseUpgrade(socket, 404, 'Only /ocpp/<charger identity> takes WebSocket connections');
    });
  }

  private async authenticate(identity: string, password: Buffer | undefined) {
    const [c] = await this.db.select().from(chargers).where(eq(chargers.ocppIdentity, identity));
    // One bcrypt comparison whether or not the identity exists: timing does not tell which do.
    const ok = await checkPassword(password?.toString('utf8') ?? '', c?.ocppPasswordHash ?? DUMMY_HASH);
    if (!c?.ocppPasswordHash || !password || !ok) return null;
    return { chargerId: c.id, depotId: c.depotId, label: c.label };
  }

  /** Listens to chargers' live state changes (the live streams); call the answer to stop. */
  onLiveChange(listener: LiveChangeListener): () => void {
    this.liveListeners.add(listener);
    return () => this.liveListeners.delete(listener);
  }

  private writerFor(session: RpcClient['session']): LiveStateWriter {
    const { chargerId, depotId, label } = session;
    let writer = this.writers.get(chargerId);
    if (!writer) {
      // What this charger last said, and what the live streams were last told.
      const state: Required<LiveValues> = { liveConnected: false, liveStatus: 'offline', livePowerW: null };
      let told: LiveCharger | null = null;
      writer = new LiveStateWriter(
        async (values) => {
          const seenAt = this.clock();
          Object.assign(state, values);
          await this.db.update(chargers).set({ ...values, liveSeenAt: seenAt }).where(eq(chargers.id, chargerId)).then(
            () => undefined,
            (err: unknown) => this.log.warn({ err, chargerId }, 'live status not stored'),
          );
          // Pushed even when the write failed: the yard must hear of a fault whatever the database does.
          const now = liveChargerOf({ id: chargerId, label, ...state, liveSeenAt: seenAt });
          if (told && told.status === now.status && told.powerKw === now.powerKw) return;
          told = now;
          for (const listener of this.liveListeners) {
            try {
              listener(depotId, now);
            } catch (err) {
              this.log.warn({ err, chargerId }, 'live change listener failed');
            }
          }
        },
        this.clock,
      );
      this.writers.set(chargerId, writer);
    }
    return writer;
  }

  /** Resolves once every charger's pending live-state write has been made (tests, shutdown). */
  async settled(): Promise<void> {
    await Promise.all([...this.writers.values()].map((w) => w.settled()));
  }

  private attach(client: RpcClient) {
    const { chargerId } = client.session;
    const older = this.connected.get(chargerId);
    this.connected.set(chargerId, client);
    // The charger reconnected: its older connection is stale (often half-open) and is ended.
    if (older) void older.close({ code: 1000, reason: 'Replaced by a newer connection', force: true }).catch(() => undefined);
    // Stations set their clocks from these answers (BootNotification, Heartbeat): the API's clock.
    const now = () => this.clock().toISOString();
    const live = this.writerFor(client.session);
    live.set({ liveConnected: true, liveStatus: 'available' });
    this.log.info({ identity: client.identity, protocol: client.protocol }, 'charger connected');

    // Every handler: ids checked first; an unexpected failure is logged and answered with the
    // protocol's InternalError and a fixed text (never the error's own message or stack).
    const on = (method: string, handler: (args: { params: Record<string, unknown> }) => unknown) =>
      client.handle(method, async (call) => {
        assertIdsInRange(call.params);
        try {
          return await handler(call);
        } catch (err) {
          if ((err as { rpcErrorCode?: string }).rpcErrorCode) throw err;
          this.log.error({ err, method, identity: client.identity }, 'OCPP message handler failed');
          throw createRPCError('InternalError', 'The central system could not handle this message');
        }
      });

    on('BootNotification', () => {
      // Send the night's profile once the charger has been told it is accepted.
      setTimeout(() => {
        this.sendCurrentPlan(chargerId).catch((err: unknown) => this.log.warn({ err, chargerId }, 'current plan not sent'));
      }, 50);
      return { status: 'Accepted', currentTime: now(), interval: 30 };
    });
    on('Heartbeat', () => {
      live.touch();
      return { currentTime: now() };
    });
    on('StatusNotification', ({ params }) => {
      const status = (params.status ?? params.connectorStatus) as string;
      live.set({ liveStatus: liveStatusOf(status) });
      return {};
    });
    on('MeterValues', ({ params }) => {
      const w = powerFromMeterValues(params.meterValue);
      if (w !== null) live.set({ livePowerW: w });
      return {};
    });
    on('Authorize', () => (client.protocol === 'ocpp1.6' ? { idTagInfo: { status: 'Accepted' } } : { idTokenInfo: { status: 'Accepted' } }));
    on('StartTransaction', () => ({ transactionId: Math.floor(Math.random() * 2 ** 31), idTagInfo: { status: 'Accepted' } }));
    on('StopTransaction', () => ({}));
    on('TransactionEvent', ({ params }) => {
      const w = powerFromMeterValues(params.meterValue);
      if (w !== null) live.set({ livePowerW: w });
      return {};
    });
    on('DataTransfer', () => {
      throw createRPCError('NotSupported', 'This central system takes no vendor data');
    });
    client.on('close', () => {
      // Only the current connection's end takes the charger offline, not a replaced one's.
      if (this.connected.get(chargerId) !== client) return;
      this.connected.delete(chargerId);
      live.set({ liveConnected: false, liveStatus: 'offline', livePowerW: null });
    });
  }

  isConnected(chargerId: string): boolean {
    return this.connected.has(chargerId);
  }

  /** Sends a published plan's profiles to its depot's connected chargers (or just one). */
  async sendPlan(planId: string, onlyChargerId?: string): Promise<number> {
    const [plan] = await this.db.select().from(plans).where(eq(plans.id, planId));
    if (!plan?.result || plan.state !== 'published') return 0;
    const result = planResultSchema.parse(plan.result);
    const list = await this.db.select().from(chargers).where(and(eq(chargers.depotId, plan.depotId), isNotNull(chargers.ocppIdentity)));
    let sent = 0;
    for (const c of list) {
      const client = this.connected.get(c.id);
      if (!client || (onlyChargerId && c.id !== onlyChargerId)) continue;
      const version: OcppVersion = client.protocol === 'ocpp2.0.1' ? '2.0.1' : '1.6';
      const [profile] = chargingProfiles(result, plan.serviceDate, [{ label: c.label, connectorId: c.connectorId, evseId: c.evseId }], version);
      try {
        const reply = (await client.call('SetChargingProfile', profile!.payload)) as { status?: string };
        this.log.info({ charger: c.label, status: reply?.status, planId }, 'charging profile sent');
        sent++;
      } catch (err) {
        this.log.warn({ err, charger: c.label }, 'charging profile refused');
      }
    }
    return sent;
  }

  /** On (re)connection: tonight's published plan (the night in force, else the next one). */
  private async sendCurrentPlan(chargerId: string) {
    const [c] = await this.db.select().from(chargers).where(eq(chargers.id, chargerId));
    if (!c) return;
    const [depot] = await this.db.select({ id: depots.id, timezone: depots.timezone }).from(depots).where(eq(depots.id, c.depotId));
    const { tonight } = await nightOfDepot(this.db, depot!, this.clock());
    const [published] = await this.db
      .select()
      .from(plans)
      .where(and(eq(plans.depotId, c.depotId), eq(plans.serviceDate, tonight.serviceDate), eq(plans.state, 'published')));
    if (published) await this.sendPlan(published.id, chargerId);
  }

  async close(): Promise<void> {
    await this.server.close({ force: true });
  }
}
