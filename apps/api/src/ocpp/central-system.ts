import { and, eq, inArray, isNotNull } from 'drizzle-orm';
import type { IncomingMessage, Server } from 'node:http';
import type { Duplex } from 'node:stream';
import { RPCServer, createRPCError } from 'ocpp-rpc';
import type { Logger } from 'pino';
import { planResultSchema, type PlanResult } from '@nightyard/contracts';
import type { Clock } from '../time/clock';
import { nightOfDepot } from '../night/depot-night';
import type { Db } from '../db/client';
import { chargers, depots, plans } from '../db/schema';
import { DUMMY_HASH, checkPassword } from '../auth/secrets';
import { chargingProfiles, type OcppVersion, type ProfileNight } from './charging-profiles';
import { profileNightsOf } from './profile-nights';
import { FailureThrottle } from './failure-throttle';
import { LiveStateWriter, type LiveValues } from './live-state-writer';
import type { LiveCharger, LiveStatus } from '@nightyard/contracts';
import { liveChargerOf } from '../live/live-charger';

/** Told of a charger's new live state (status or power changed), once it is stored. */
export type LiveChangeListener = (depotId: string, charger: LiveCharger) => void;

type RpcClient = {
  identity: string;
  protocol?: string;
  session: { chargerId: string; depotId: string; label: string };
  handle(method: string, handler: (args: { params: Record<string, unknown> }) => unknown): void;
  call(method: string, params: unknown, options?: { callTimeoutMs?: number }): Promise<unknown>;
  close(opts?: { code?: number; reason?: string; force?: boolean }): Promise<unknown>;
  on(event: 'close', listener: () => void): void;
};

/** The live states the product shows, from OCPP's richer connector statuses. */
export function liveStatusOf(ocppStatus: string): LiveStatus {
  switch (ocppStatus) {
    case 'Charging':
      return 'charging';
    // A bus on the connector, not drawing: 1.6's states around a transaction, and 2.0.1's
    // Occupied, which is also charging while power flows (see liveChargerOf).
    case 'Preparing':
    case 'SuspendedEV':
    case 'SuspendedEVSE':
    case 'Finishing':
    case 'Occupied':
      return 'connected';
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

/**
 * The battery's state of charge in % from a MeterValues sample list (measurand `SoC`, in 1.6 and
 * 2.0.1 shapes), with whether the sample was taken as the transaction began (the reading at
 * plug-in); null when no sample is a state of charge in the physical range.
 */
export function socFromMeterValues(meterValue: unknown): { pct: number; atBegin: boolean } | null {
  for (const mv of (meterValue as { sampledValue?: Record<string, unknown>[] }[] | undefined) ?? []) {
    for (const sv of mv.sampledValue ?? []) {
      if (sv.measurand !== 'SoC') continue;
      const pct = Number(sv.value);
      if (Number.isFinite(pct) && pct >= 0 && pct <= 100) return { pct, atBegin: sv.context === 'Transaction.Begin' };
    }
  }
  return null;
}

/** A charger's plug-in readings closer together than this are one plug-in: only the first is taken. */
export const SOC_READING_GAP_MS = 5 * 60_000;

/** A state of charge a charger read from the bus at plug-in. */
export interface ChargerSocReading {
  depotId: string;
  chargerId: string;
  charger: string;
  socPct: number;
  at: Date;
}
export type SocReadingListener = (reading: ChargerSocReading) => Promise<void>;

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
/** How long a charger has to answer a SetChargingProfile: a silent one must not hold up its depot's sends. */
const PROFILE_CALL_TIMEOUT_MS = 15_000;
const WRONG_CREDENTIALS = 'Unknown charger identity or wrong password';

/** Writes a plain HTTP refusal on a socket that asked for an upgrade, and closes it. */
export function refuseUpgrade(socket: Duplex, status: 400 | 401 | 404 | 500 | 503, message: string): void {
  const reason = {
    400: 'Bad Request',
    401: 'Unauthorized',
    404: 'Not Found',
    500: 'Internal Server Error',
    503: 'Service Unavailable',
  }[status];
  if (socket.writable) {
    socket.write(
      `HTTP/1.1 ${status} ${reason}\r\nConnection: close\r\nContent-Type: text/plain\r\nContent-Length: ${Buffer.byteLength(message)}\r\n\r\n${message}`,
    );
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
  const ids = [
    ['connectorId', params?.connectorId],
    ['evseId', params?.evseId],
    ['evse.id', evse?.id],
    ['evse.connectorId', evse?.connectorId],
  ] as const;
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
  /** Per connection: what it was last sent (tonight's and the next night's plans and bindings). */
  private readonly sentTo = new WeakMap<RpcClient, string>();
  /** Per depot: its profile sends, one after another (and tonight's before the next night's, always). */
  private readonly sending = new Map<string, Promise<unknown>>();
  /** Per depot: the send waiting for its turn, and for which chargers. */
  private readonly waiting = new Map<string, { targets: Set<string> | 'all'; done: Promise<number> }>();
  /** Chargers whose heartbeat check is queued: a further heartbeat meanwhile adds none. */
  private readonly checking = new Set<string>();
  /** Connections whose plug-in began and whose state of charge has not been read yet. */
  private readonly awaitingSoc = new WeakSet<RpcClient>();
  /** When each charger's last plug-in reading was taken (epoch ms, the API's clock). */
  private readonly lastSocAt = new Map<string, number>();
  /** Readings are taken one after another, in the order the chargers sent them. */
  private socWork: Promise<void> = Promise.resolve();
  private readonly liveListeners = new Set<LiveChangeListener>();
  /** Told of each state of charge read at plug-in (the yard's arrival reading and re-plan). */
  private socListener: SocReadingListener | null = null;

  constructor(
    private readonly db: Db,
    private readonly log: Logger,
    private readonly clock: Clock,
    limits: AuthFailureLimits = DEFAULT_AUTH_FAILURE_LIMITS,
  ) {
    this.failuresByIdentity = new FailureThrottle(limits.perIdentity, limits.windowMs, clock);
    this.failuresByAddress = new FailureThrottle(limits.perAddress, limits.windowMs, clock);
    this.server = new RPCServer({
      protocols: [...OCPP_PROTOCOLS],
      strictMode: true,
      pingIntervalMs: 30_000,
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

  /** Hears each plug-in's state of charge reading (one listener; main wires it to the yard). */
  onSocReading(listener: SocReadingListener): void {
    this.socListener = listener;
  }

  /**
   * A plug-in's first state of charge reading: the sample taken as the transaction began, or the
   * first one after it started. Later samples of the same plug-in are charging progress, not news.
   */
  private socSample(client: RpcClient, meterValue: unknown, started: boolean): void {
    const soc = socFromMeterValues(meterValue);
    if (started) this.awaitingSoc.add(client);
    if (!soc || !(soc.atBegin || this.awaitingSoc.has(client))) return;
    this.awaitingSoc.delete(client);
    const listener = this.socListener;
    if (!listener) return;
    const { chargerId, depotId, label } = client.session;
    const at = this.clock();
    // One reading per plug-in: a charger repeating Transaction.Begin samples (a fault, a replay)
    // must not re-plan the night and mail the staff again and again.
    const last = this.lastSocAt.get(chargerId);
    if (last !== undefined && at.getTime() - last < SOC_READING_GAP_MS) return;
    this.lastSocAt.set(chargerId, at.getTime());
    const reading = { depotId, chargerId, charger: label, socPct: soc.pct, at };
    // The charger's message is answered at once; the reading (and any re-plan) follows on its own.
    this.socWork = this.socWork
      .then(() => listener(reading))
      .catch((err: unknown) => this.log.warn({ err, chargerId }, 'state of charge reading not taken'));
  }

  /** Resolves once every reading heard so far has been taken (tests, shutdown). */
  async socSettled(): Promise<void> {
    await this.socWork;
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
      writer = new LiveStateWriter(async (values) => {
        const seenAt = this.clock();
        Object.assign(state, values);
        await this.db
          .update(chargers)
          .set({ ...values, liveSeenAt: seenAt })
          .where(eq(chargers.id, chargerId))
          .then(
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
      }, this.clock);
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
    if (older)
      void older.close({ code: 1000, reason: 'Replaced by a newer connection', force: true }).catch(() => undefined);
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
      // Send tonight's and the next night's profiles once the charger has been told it is accepted.
      this.sentTo.delete(client);
      setTimeout(() => {
        this.sendNights(client.session.depotId, chargerId).catch((err: unknown) =>
          this.log.warn({ err, chargerId }, 'current plan not sent'),
        );
      }, 50);
      return { status: 'Accepted', currentTime: now(), interval: 30 };
    });
    on('Heartbeat', () => {
      live.touch();
      // A night that has just become the next one (a plan published further ahead) goes out now.
      if (!this.checking.has(chargerId)) {
        this.checking.add(chargerId);
        this.sendNights(client.session.depotId, chargerId)
          .catch((err: unknown) => this.log.warn({ err, chargerId }, 'profiles not brought up to date'))
          .finally(() => this.checking.delete(chargerId));
      }
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
      this.socSample(client, params.meterValue, false);
      return {};
    });
    on('Authorize', () =>
      client.protocol === 'ocpp1.6' ? { idTagInfo: { status: 'Accepted' } } : { idTokenInfo: { status: 'Accepted' } },
    );
    on('StartTransaction', () => {
      this.awaitingSoc.add(client);
      return { transactionId: Math.floor(Math.random() * 2 ** 31), idTagInfo: { status: 'Accepted' } };
    });
    on('StopTransaction', () => ({}));
    on('TransactionEvent', ({ params }) => {
      const w = powerFromMeterValues(params.meterValue);
      if (w !== null) live.set({ livePowerW: w });
      this.socSample(client, params.meterValue, params.eventType === 'Started');
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

  /**
   * After a plan is published (a new night or a revision): its depot's chargers get tonight's and
   * the next night's profiles. A plan for a night further ahead waits on the central system until
   * its night is the next one (the chargers' heartbeats bring it then): a charger holds at most
   * those two nights of ours, whose stack levels always differ (see ProfileNight).
   */
  async sendPlan(planId: string): Promise<number> {
    const [plan] = await this.db
      .select({ depotId: plans.depotId, state: plans.state })
      .from(plans)
      .where(eq(plans.id, planId));
    if (!plan || plan.state !== 'published') return 0;
    return this.sendNights(plan.depotId);
  }

  /**
   * Tonight's (the night in force, else the next one) and the next night's published profiles, to
   * the depot's connected chargers (or one), tonight's first; a connection that already has
   * exactly these is skipped. One depot's sends run one after another, so a revision's profile is
   * never overtaken by an older one. Returns the number of profiles sent.
   */
  sendNights(depotId: string, onlyChargerId?: string): Promise<number> {
    // Requests while one waits its turn join it (ten chargers booting at once make one send).
    const waiting = this.waiting.get(depotId);
    if (waiting) {
      if (!onlyChargerId) waiting.targets = 'all';
      else if (waiting.targets !== 'all') waiting.targets.add(onlyChargerId);
      return waiting.done;
    }
    const entry: { targets: Set<string> | 'all'; done: Promise<number> } = {
      targets: onlyChargerId ? new Set([onlyChargerId]) : 'all',
      done: Promise.resolve(0),
    };
    this.waiting.set(depotId, entry);
    entry.done = this.inTurn(depotId, () => {
      this.waiting.delete(depotId);
      return this.sendNightsNow(depotId, entry.targets);
    });
    return entry.done;
  }

  private async sendNightsNow(depotId: string, only: Set<string> | 'all'): Promise<number> {
    const targets = (
      await this.db
        .select()
        .from(chargers)
        .where(and(eq(chargers.depotId, depotId), isNotNull(chargers.ocppIdentity)))
    ).filter((c) => (only === 'all' || only.has(c.id)) && this.connected.has(c.id));
    if (!targets.length) return 0;
    const [depot] = await this.db
      .select({ id: depots.id, timezone: depots.timezone })
      .from(depots)
      .where(eq(depots.id, depotId));
    if (!depot) return 0;
    const { tonight } = await nightOfDepot(this.db, depot, this.clock());
    const dates = [tonight.serviceDate, tonight.nextServiceDate];
    const published = await this.db
      .select({ id: plans.id, serviceDate: plans.serviceDate })
      .from(plans)
      .where(
        and(
          eq(plans.depotId, depotId),
          inArray(plans.serviceDate, dates),
          eq(plans.state, 'published'),
          isNotNull(plans.result),
        ),
      );
    const bindings = await profileNightsOf(this.db, depot, dates);
    const nights = dates.flatMap((date, k) => {
      const plan = published.find((p) => p.serviceDate === date);
      return plan ? [{ planId: plan.id, night: bindings[k]! }] : [];
    });
    const signature = JSON.stringify(nights);
    // Results are read only when some connection needs them (heartbeats mostly find none does).
    const results = new Map<string, Promise<PlanResult>>();
    const resultOf = (planId: string) => {
      let r = results.get(planId);
      if (!r) {
        r = this.db
          .select({ result: plans.result })
          .from(plans)
          .where(eq(plans.id, planId))
          .then(([p]) => planResultSchema.parse(p!.result));
        results.set(planId, r);
      }
      return r;
    };
    let sent = 0;
    await Promise.all(
      targets.map(async (c) => {
        const client = this.connected.get(c.id);
        // The charger's connector / EVSE is part of what it was sent (facilities may change it).
        const sentKey = `${signature}|${c.connectorId}|${c.evseId}`;
        if (!client || this.sentTo.get(client) === sentKey) return;
        const version: OcppVersion = client.protocol === 'ocpp2.0.1' ? '2.0.1' : '1.6';
        let all = true;
        for (const n of nights) {
          if (await this.sendProfile(client, c, n.planId, await resultOf(n.planId), n.night, version)) sent++;
          else all = false;
        }
        if (all) this.sentTo.set(client, sentKey);
      }),
    );
    return sent;
  }

  private async sendProfile(
    client: RpcClient,
    c: typeof chargers.$inferSelect,
    planId: string,
    result: PlanResult,
    night: ProfileNight,
    version: OcppVersion,
  ) {
    const [profile] = chargingProfiles(
      result,
      night,
      [{ label: c.label, connectorId: c.connectorId, evseId: c.evseId }],
      version,
    );
    try {
      const reply = (await client.call('SetChargingProfile', profile!.payload, {
        callTimeoutMs: PROFILE_CALL_TIMEOUT_MS,
      })) as { status?: string };
      this.log.info(
        { charger: c.label, status: reply?.status, planId, night: night.serviceDate },
        'charging profile sent',
      );
      return reply?.status === 'Accepted';
    } catch (err) {
      this.log.warn({ err, charger: c.label }, 'charging profile refused');
      return false;
    }
  }

  /** Runs `work` after the depot's earlier sends have finished. */
  private inTurn<T>(depotId: string, work: () => Promise<T>): Promise<T> {
    const next = (this.sending.get(depotId) ?? Promise.resolve()).then(work, work);
    const tail = next.then(
      () => undefined,
      () => undefined,
    );
    this.sending.set(depotId, tail);
    void tail.then(() => {
      if (this.sending.get(depotId) === tail) this.sending.delete(depotId);
    });
    return next;
  }

  /**
   * Closes every charger's connection and waits for the live states that closing writes (each
   * charger goes offline): the database pool is ended after this, not under them.
   */
  async close(): Promise<void> {
    await this.server.close({ force: true });
    // The sockets' close handlers (each sets its charger offline) run after the server has closed.
    await new Promise((resolve) => setImmediate(resolve));
    await Promise.all([...this.writers.values()].map((w) => w.settled()));
  }
}
