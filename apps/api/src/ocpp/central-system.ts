import { and, desc, eq, isNotNull } from 'drizzle-orm';
import type { IncomingMessage } from 'node:http';
import type { Socket } from 'node:net';
import { RPCServer, createRPCError } from 'ocpp-rpc';
import type { Logger } from 'pino';
import { planResultSchema } from '@nightyard/contracts';
import type { Clock } from '../time/clock';
import { nightOfDepot } from '../night/depot-night';
import type { Db } from '../db/client';
import { chargers, depots, plans } from '../db/schema';
import { checkPassword } from '../auth/secrets';
import { chargingProfiles, type OcppVersion } from './charging-profiles';

type RpcClient = {
  identity: string;
  protocol?: string;
  session: { chargerId: string; depotId: string };
  handle(method: string, handler: (args: { params: Record<string, unknown> }) => unknown): void;
  call(method: string, params: unknown): Promise<unknown>;
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

/**
 * The OCPP-J central system: chargers connect over WebSocket (security profile 1: HTTP basic auth
 * with a per-charger password), report their state, and receive the published plan as charging
 * profiles. Messages are checked against the official schemas (strict mode).
 */
export class CentralSystem {
  readonly server: InstanceType<typeof RPCServer>;
  private readonly connected = new Map<string, RpcClient>();

  constructor(private readonly db: Db, private readonly log: Logger, private readonly clock: Clock) {
    this.server = new RPCServer({ protocols: ['ocpp1.6', 'ocpp2.0.1'], strictMode: true, pingIntervalMs: 30_000 });
    this.server.auth((accept, reject, handshake) => {
      this.authenticate(handshake.identity, handshake.password)
        .then((session) => (session ? accept(session) : reject(401, 'Unknown charger identity or wrong password')))
        .catch(() => reject(500, 'Authentication failed'));
    });
    this.server.on('client', (client: unknown) => this.attach(client as RpcClient));
  }

  get handleUpgrade(): (req: IncomingMessage, socket: Socket, head: Buffer) => Promise<void> {
    return this.server.handleUpgrade;
  }

  private async authenticate(identity: string, password: Buffer | undefined) {
    const [c] = await this.db.select().from(chargers).where(eq(chargers.ocppIdentity, identity));
    if (!c?.ocppPasswordHash || !password) return null;
    if (!(await checkPassword(password.toString('utf8'), c.ocppPasswordHash))) return null;
    return { chargerId: c.id, depotId: c.depotId };
  }

  private attach(client: RpcClient) {
    const { chargerId } = client.session;
    this.connected.set(chargerId, client);
    // Stations set their clocks from these answers (BootNotification, Heartbeat): the API's clock.
    const now = () => this.clock().toISOString();
    const set = (values: Partial<typeof chargers.$inferInsert>) =>
      this.db.update(chargers).set({ ...values, liveSeenAt: this.clock() }).where(eq(chargers.id, chargerId)).catch((err) => this.log.error({ err }, 'live status not stored'));
    void set({ liveConnected: true, liveStatus: 'available' });
    this.log.info({ identity: client.identity, protocol: client.protocol }, 'charger connected');

    client.handle('BootNotification', () => {
      // Send the night's profile once the charger has been told it is accepted.
      setTimeout(() => void this.sendCurrentPlan(chargerId), 50);
      return { status: 'Accepted', currentTime: now(), interval: 30 };
    });
    client.handle('Heartbeat', () => {
      void set({});
      return { currentTime: now() };
    });
    client.handle('StatusNotification', ({ params }) => {
      const status = (params.status ?? params.connectorStatus) as string;
      void set({ liveStatus: liveStatusOf(status) });
      return {};
    });
    client.handle('MeterValues', ({ params }) => {
      const w = powerFromMeterValues(params.meterValue);
      if (w !== null) void set({ livePowerW: w });
      return {};
    });
    client.handle('Authorize', () => (client.protocol === 'ocpp1.6' ? { idTagInfo: { status: 'Accepted' } } : { idTokenInfo: { status: 'Accepted' } }));
    client.handle('StartTransaction', () => ({ transactionId: Math.floor(Math.random() * 2 ** 31), idTagInfo: { status: 'Accepted' } }));
    client.handle('StopTransaction', () => ({}));
    client.handle('TransactionEvent', ({ params }) => {
      const w = powerFromMeterValues(params.meterValue);
      if (w !== null) void set({ livePowerW: w });
      return {};
    });
    client.handle('DataTransfer', () => {
      throw createRPCError('NotSupported', 'This central system takes no vendor data');
    });
    client.on('close', () => {
      if (this.connected.get(chargerId) === client) this.connected.delete(chargerId);
      void set({ liveConnected: false, liveStatus: 'offline', livePowerW: null });
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
