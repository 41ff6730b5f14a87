// A simulated OCPP charging station: it connects to Nightyard's central system, accepts charging
// profiles (kept as a station keeps them, station-profiles.ts) and reports meter values that follow
// them. The API's tests drive it; tools/station-simulator.ts runs the demo depot's chargers with it.
import { RPCClient } from 'ocpp-rpc';
import { ProfileStore, profileOf, type Protocol } from './station-profiles';
import { systemClock } from '../time/clock';

export interface StationOptions {
  url: string;
  identity: string;
  password: string;
  protocol: Protocol;
  /**
   * The station's clock; tests move it into the plan's night. Without one the station keeps the
   * central system's time, as OCPP stations do: from the currentTime of each BootNotification
   * and Heartbeat answer (so it follows the API's clock wherever that stands).
   */
  clock?: () => Date;
  meterIntervalMs?: number;
}

export class SimulatedStation {
  readonly client: InstanceType<typeof RPCClient>;
  readonly received: Record<string, unknown>[] = [];
  /** The charging profiles held, with their stack levels and validity (station-profiles.ts). */
  readonly profiles: ProfileStore;
  private timer: NodeJS.Timeout | undefined;
  private lastStatus = '';
  /** A reported fault stands until `clear()`, as a real one does until someone fixes it. */
  private faulted = false;
  /** A bus is plugged in (since `plugIn`): with no power allowed the station says so, not Available. */
  private plugged = false;
  /** Meter reports sent so far: tests wait for the next one rather than for a fixed time. */
  reports = 0;
  private transactions = 0;
  private readonly clock: () => Date;
  /** Central system time minus this machine's, learnt from its answers. */
  private offsetMs = 0;
  private heartbeat: NodeJS.Timeout | undefined;

  constructor(private readonly opts: StationOptions) {
    this.clock = opts.clock ?? (() => new Date(systemClock().getTime() + this.offsetMs));
    this.client = new RPCClient({
      endpoint: opts.url,
      identity: opts.identity,
      password: opts.password,
      protocols: [opts.protocol],
      strictMode: true,
      reconnect: true,
      maxReconnects: Infinity,
      backoff: { initialDelay: 500, maxDelay: 10_000, factor: 2, randomisationFactor: 0.2 },
    } as ConstructorParameters<typeof RPCClient>[0]);
    this.profiles = new ProfileStore(opts.protocol);
    this.client.handle('SetChargingProfile', async ({ params }) => {
      this.received.push(params ?? {});
      const status = this.profiles.set(profileOf(params ?? {}, opts.protocol));
      setTimeout(() => void this.report().catch(() => undefined), 10);
      return { status };
    });
    this.client.handle('ClearChargingProfile', async ({ params }) => ({ status: this.profiles.clear(params ?? {}) }));
  }

  /** The limit in force at `at` under the profiles held (W): the highest valid stack level's; none means no plan: 0. */
  limitW(at = this.clock()): number {
    return this.profiles.limitW(at);
  }

  async start(): Promise<void> {
    await this.client.connect();
    const v16 = this.opts.protocol === 'ocpp1.6';
    const boot = (await this.client.call(
      'BootNotification',
      v16
        ? { chargePointVendor: 'Nightyard simulator', chargePointModel: 'Depot DC' }
        : { reason: 'PowerUp', chargingStation: { vendorName: 'Nightyard simulator', model: 'Depot DC' } },
    )) as { currentTime?: string; interval?: number };
    this.setTime(boot.currentTime);
    this.heartbeat = setInterval(
      () =>
        void this.client.call('Heartbeat', {}).then(
          (r) => this.setTime((r as { currentTime?: string }).currentTime),
          () => undefined,
        ),
      Math.max(5, boot.interval ?? 30) * 1000,
    );
    await this.report();
    this.timer = setInterval(() => void this.report().catch(() => undefined), this.opts.meterIntervalMs ?? 15_000);
  }

  /** Status when it changes, then the power the profile allows now (none while faulted). */
  async report(): Promise<void> {
    const w = this.faulted ? 0 : this.limitW();
    const v16 = this.opts.protocol === 'ocpp1.6';
    const timestamp = this.clock().toISOString();
    const status = this.faulted
      ? 'Faulted'
      : w > 0
        ? v16
          ? 'Charging'
          : 'Occupied'
        : // A bus on the connector: plugged in by a test, or waiting inside its session for cheaper
          // hours (the demo's stations have no buses; without this they read Available while the
          // yard had confirmed a bus plugged in).
          this.plugged || this.profiles.pausedAt(new Date(timestamp))
          ? v16
            ? 'SuspendedEVSE'
            : 'Occupied'
          : 'Available';
    if (status !== this.lastStatus) {
      await this.client.call(
        'StatusNotification',
        v16
          ? { connectorId: 1, errorCode: this.faulted ? 'GroundFailure' : 'NoError', status }
          : { timestamp, connectorStatus: status, evseId: 1, connectorId: 1 },
      );
      this.lastStatus = status;
    }
    await this.client.call(
      'MeterValues',
      v16
        ? {
            connectorId: 1,
            meterValue: [
              { timestamp, sampledValue: [{ value: String(w), measurand: 'Power.Active.Import', unit: 'W' }] },
            ],
          }
        : {
            evseId: 1,
            meterValue: [
              {
                timestamp,
                sampledValue: [{ value: w, measurand: 'Power.Active.Import', unitOfMeasure: { unit: 'W' } }],
              },
            ],
          },
    );
    this.reports++;
  }

  /**
   * A bus is plugged in: the transaction starts and the station reports the battery's state of
   * charge as the bus gave it at that moment (measurand SoC, context Transaction.Begin).
   */
  async plugIn(socPct: number): Promise<void> {
    const v16 = this.opts.protocol === 'ocpp1.6';
    const timestamp = this.clock().toISOString();
    this.plugged = true;
    if (v16) {
      const { transactionId } = (await this.client.call('StartTransaction', {
        connectorId: 1,
        idTag: 'DEPOT',
        meterStart: 0,
        timestamp,
      })) as { transactionId: number };
      await this.client.call('MeterValues', {
        connectorId: 1,
        transactionId,
        meterValue: [
          {
            timestamp,
            sampledValue: [
              {
                value: String(socPct),
                context: 'Transaction.Begin',
                measurand: 'SoC',
                location: 'EV',
                unit: 'Percent',
              },
            ],
          },
        ],
      });
    } else {
      await this.client.call('TransactionEvent', {
        eventType: 'Started',
        timestamp,
        triggerReason: 'CablePluggedIn',
        seqNo: 0,
        transactionInfo: { transactionId: `${this.opts.identity}-${++this.transactions}` },
        evse: { id: 1, connectorId: 1 },
        meterValue: [
          {
            timestamp,
            sampledValue: [
              {
                value: socPct,
                context: 'Transaction.Begin',
                measurand: 'SoC',
                location: 'EV',
                unitOfMeasure: { unit: 'Percent' },
              },
            ],
          },
        ],
      });
    }
    // Its status now (a bus on the connector), not at the next meter interval.
    await this.report();
  }

  /** Reports a fault; it stays (the station draws nothing and keeps saying so) until `clear()`. */
  async fault(): Promise<void> {
    this.faulted = true;
    await this.report();
  }

  /** The fault is fixed: the station reports its status and power as the profile says again. */
  async clear(): Promise<void> {
    this.faulted = false;
    await this.report();
  }

  get isFaulted(): boolean {
    return this.faulted;
  }

  /** Keeps the central system's time (OCPP's currentTime), unless the station was given a clock. */
  private setTime(currentTime: string | undefined): void {
    const t = currentTime ? Date.parse(currentTime) : NaN;
    // The station's own clock set to the central system's: the offset from the one clock service.
    if (Number.isFinite(t)) this.offsetMs = t - systemClock().getTime();
  }

  async stop(): Promise<void> {
    clearInterval(this.timer);
    clearInterval(this.heartbeat);
    await this.client.close({ force: true });
  }
}
