// The charging profiles a simulated station holds and the limit they set, as OCPP has a station
// work it out: profiles are kept per connector (1.6) or EVSE (2.0.1); at any instant the valid
// ones (validFrom <= t < validTo, and the schedule running) are stacked and the highest stack
// level sets the limit. No valid profile: no plan, the station draws nothing (0 W).

export type Protocol = 'ocpp1.6' | 'ocpp2.0.1';

export interface HeldProfile {
  id: number;
  /** Connector (1.6) or EVSE (2.0.1) id; 0 is the whole station. */
  target: number;
  stackLevel: number;
  purpose: string;
  validFromMs: number;
  validToMs: number;
  startMs: number;
  durationS: number;
  periods: { startPeriod: number; limit: number }[];
}

const time = (iso: unknown, fallback: number) =>
  typeof iso === 'string' && Number.isFinite(Date.parse(iso)) ? Date.parse(iso) : fallback;

/** A SetChargingProfile request as the profile it asks the station to hold. */
export function profileOf(params: Record<string, unknown>, protocol: Protocol): HeldProfile {
  const v16 = protocol === 'ocpp1.6';
  const p = (v16 ? params.csChargingProfiles : params.chargingProfile) as Record<string, unknown>;
  const schedule = (v16 ? p.chargingSchedule : (p.chargingSchedule as unknown[])[0]) as {
    startSchedule?: string;
    duration?: number;
    chargingSchedulePeriod: { startPeriod: number; limit: number }[];
  };
  return {
    id: Number(v16 ? p.chargingProfileId : p.id),
    target: Number(v16 ? params.connectorId : params.evseId),
    stackLevel: Number(p.stackLevel),
    purpose: String(p.chargingProfilePurpose),
    validFromMs: time(p.validFrom, -Infinity),
    validToMs: time(p.validTo, Infinity),
    startMs: time(schedule.startSchedule, -Infinity),
    durationS: schedule.duration ?? Infinity,
    periods: schedule.chargingSchedulePeriod,
  };
}

export class ProfileStore {
  private held: HeldProfile[] = [];

  constructor(private readonly protocol: Protocol) {}

  get profiles(): readonly HeldProfile[] {
    return this.held;
  }

  /**
   * Takes a profile as the protocol says. 1.6: one with the same id, or the same stack level and
   * purpose on the same connector, is replaced. 2.0.1: one with the same id is replaced; one with
   * the same stack level, purpose and EVSE whose validity overlaps makes the request Rejected.
   */
  set(profile: HeldProfile): 'Accepted' | 'Rejected' {
    const sameSlot = (h: HeldProfile) =>
      h.target === profile.target && h.stackLevel === profile.stackLevel && h.purpose === profile.purpose;
    if (this.protocol === 'ocpp2.0.1') {
      const clash = this.held.some(
        (h) =>
          h.id !== profile.id && sameSlot(h) && h.validFromMs < profile.validToMs && profile.validFromMs < h.validToMs,
      );
      if (clash) return 'Rejected';
      this.held = this.held.filter((h) => h.id !== profile.id);
    } else {
      this.held = this.held.filter((h) => h.id !== profile.id && !sameSlot(h));
    }
    this.held.push(profile);
    return 'Accepted';
  }

  /** ClearChargingProfile: by id, else by the criteria given (none: all). */
  clear(params: Record<string, unknown>): 'Accepted' | 'Unknown' {
    const v16 = this.protocol === 'ocpp1.6';
    const criteria = (v16 ? params : (params.chargingProfileCriteria ?? {})) as Record<string, unknown>;
    const id = v16 ? params.id : params.chargingProfileId;
    const target = v16 ? criteria.connectorId : criteria.evseId;
    const level = criteria.stackLevel;
    const purpose = criteria.chargingProfilePurpose;
    const match = (h: HeldProfile) =>
      id !== undefined
        ? h.id === id
        : (target === undefined || h.target === target) &&
          (level === undefined || h.stackLevel === level) &&
          (purpose === undefined || h.purpose === purpose);
    const before = this.held.length;
    this.held = this.held.filter((h) => !match(h));
    return this.held.length < before ? 'Accepted' : 'Unknown';
  }

  /** The limit (W) at `at`: the highest stack level among the profiles valid and running then. */
  limitW(at: Date): number {
    const top = this.running(at.getTime());
    if (!top) return 0;
    const offset = (at.getTime() - top.startMs) / 1000;
    let limit = 0;
    for (const p of top.periods) if (p.startPeriod <= offset) limit = p.limit;
    return limit;
  }

  /**
   * Whether the profile in force at `at` gives power both before and after it (at `at` itself it
   * may give none): inside a session paused for cheaper hours, where a bus waits on the connector.
   */
  pausedAt(at: Date): boolean {
    const t = at.getTime();
    const top = this.running(t);
    if (!top) return false;
    const offset = (t - top.startMs) / 1000;
    const end = Math.min(top.durationS, (top.validToMs - top.startMs) / 1000);
    const periods = top.periods.slice().sort((a, b) => a.startPeriod - b.startPeriod);
    const before = periods.some((p) => p.startPeriod < offset && p.limit > 0);
    const after = periods.some(
      (p, i) => p.limit > 0 && (periods[i + 1]?.startPeriod ?? end) > offset && p.startPeriod < end,
    );
    return before && after;
  }

  private running(t: number): HeldProfile | undefined {
    return this.held
      .filter((h) => h.validFromMs <= t && t < h.validToMs && h.startMs <= t && t < h.startMs + h.durationS * 1000)
      .sort((a, b) => b.stackLevel - a.stackLevel)[0];
  }
}
