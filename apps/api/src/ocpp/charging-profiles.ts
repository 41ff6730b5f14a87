import type { PlanResult } from '@nightyard/contracts';

export type OcppVersion = '1.6' | '2.0.1';

export interface ChargerRef {
  label: string;
  connectorId: number;
  evseId: number;
}

export interface ProfileExport {
  chargerId: string;
  connectorId?: number;
  evseId?: number;
  payload: Record<string, unknown>;
}

/**
 * One stack level and purpose for every plan: a charger keeps one TxDefaultProfile of ours, and
 * a revision (same id, same stack level and purpose) replaces it rather than stacking on it.
 */
export const PROFILE_STACK_LEVEL = 1;
const PURPOSE = 'TxDefaultProfile';

/** The profile id of a night: its service date as YYYYMMDD, the same for every version. */
export function profileIdOf(serviceDate: string): number {
  return Number(serviceDate.replace(/-/g, ''));
}

/**
 * A charger's power over the plan's horizon as OCPP schedule periods: one period per change of
 * power, limits in whole watts (OCPP validators reject fractional kW), 0 W between sessions so a
 * bus plugged in outside the plan waits for its turn.
 */
export function schedulePeriods(result: PlanResult, charger: string): { startSchedule: string; duration: number; periods: { startPeriod: number; limit: number }[] } {
  const slots = result.slots;
  const startMs = Date.parse(slots[0]!.start);
  const slotIndex = new Map(slots.map((s, i) => [Date.parse(s.start), i]));
  const watts = new Array<number>(slots.length).fill(0);
  for (const s of result.sessions.filter((x) => x.charger === charger)) {
    const first = slotIndex.get(Date.parse(s.start));
    if (first === undefined) continue;
    s.kw.forEach((kw, k) => {
      if (first + k < watts.length) watts[first + k] = Math.round(kw * 1000);
    });
  }
  const periods: { startPeriod: number; limit: number }[] = [];
  watts.forEach((w, i) => {
    if (periods.at(-1)?.limit === w) return;
    periods.push({ startPeriod: Math.round((Date.parse(slots[i]!.start) - startMs) / 1000), limit: w });
  });
  const endMs = Date.parse(slots.at(-1)!.start) + 15 * 60_000;
  return { startSchedule: new Date(startMs).toISOString().replace(/\.\d{3}Z$/, 'Z'), duration: Math.round((endMs - startMs) / 1000), periods };
}

/** SetChargingProfile payloads for every charger of the plan, in the chosen OCPP version. */
export function chargingProfiles(result: PlanResult, serviceDate: string, chargers: ChargerRef[], version: OcppVersion): ProfileExport[] {
  const id = profileIdOf(serviceDate);
  return chargers.map((c) => {
    const { startSchedule, duration, periods } = schedulePeriods(result, c.label);
    if (version === '1.6') {
      return {
        chargerId: c.label,
        connectorId: c.connectorId,
        payload: {
          connectorId: c.connectorId,
          csChargingProfiles: {
            chargingProfileId: id,
            stackLevel: PROFILE_STACK_LEVEL,
            chargingProfilePurpose: PURPOSE,
            chargingProfileKind: 'Absolute',
            chargingSchedule: { duration, startSchedule, chargingRateUnit: 'W', chargingSchedulePeriod: periods },
          },
        },
      };
    }
    return {
      chargerId: c.label,
      evseId: c.evseId,
      payload: {
        evseId: c.evseId,
        chargingProfile: {
          id,
          stackLevel: PROFILE_STACK_LEVEL,
          chargingProfilePurpose: PURPOSE,
          chargingProfileKind: 'Absolute',
          chargingSchedule: [{ id, startSchedule, duration, chargingRateUnit: 'W', chargingSchedulePeriod: periods }],
        },
      },
    };
  });
}
