import { describe, expect, it } from 'vitest';
import { ProfileStore, profileOf, type HeldProfile } from './station-profiles';

const T0 = Date.parse('2026-12-10T04:00:00Z');
const at = (minutes: number) => new Date(T0 + minutes * 60_000);
const iso = (minutes: number) => at(minutes).toISOString();

/** A held profile: `limit` W from its start for an hour, valid [from, to) (minutes after T0). */
function held(id: number, stackLevel: number, limit: number, from = -600, to = 600, target = 1): HeldProfile {
  return {
    id,
    target,
    stackLevel,
    purpose: 'TxDefaultProfile',
    validFromMs: T0 + from * 60_000,
    validToMs: T0 + to * 60_000,
    startMs: T0,
    durationS: 3600,
    periods: [{ startPeriod: 0, limit }],
  };
}

describe("the simulated station's profiles", () => {
  it('reads 1.6 and 2.0.1 requests with validity', () => {
    const schedule = {
      startSchedule: iso(0),
      duration: 3600,
      chargingRateUnit: 'W',
      chargingSchedulePeriod: [{ startPeriod: 0, limit: 5000 }],
    };
    const v16 = profileOf(
      {
        connectorId: 1,
        csChargingProfiles: {
          chargingProfileId: 7,
          stackLevel: 2,
          chargingProfilePurpose: 'TxDefaultProfile',
          validFrom: iso(-10),
          validTo: iso(50),
          chargingSchedule: schedule,
        },
      },
      'ocpp1.6',
    );
    expect(v16).toMatchObject({
      id: 7,
      target: 1,
      stackLevel: 2,
      validFromMs: T0 - 600_000,
      validToMs: T0 + 3_000_000,
      durationS: 3600,
    });
    const v201 = profileOf(
      {
        evseId: 3,
        chargingProfile: {
          id: 8,
          stackLevel: 1,
          chargingProfilePurpose: 'TxDefaultProfile',
          chargingSchedule: [schedule],
        },
      },
      'ocpp2.0.1',
    );
    expect(v201).toMatchObject({ id: 8, target: 3, validFromMs: -Infinity, validToMs: Infinity });
  });

  it('the highest stack level among the valid profiles sets the limit; none valid: 0 W', () => {
    const s = new ProfileStore('ocpp1.6');
    s.set(held(1, 1, 10_000));
    s.set(held(2, 2, 20_000, 30, 50));
    expect(s.limitW(at(10))).toBe(10_000);
    expect(s.limitW(at(40))).toBe(20_000);
    // Level 2 no longer valid: level 1 again.
    expect(s.limitW(at(49))).toBe(20_000);
    expect(s.limitW(at(50))).toBe(10_000);
    // Past the schedule's hour: nothing runs.
    expect(s.limitW(at(61))).toBe(0);
    expect(new ProfileStore('ocpp1.6').limitW(at(0))).toBe(0);
  });

  it('1.6: the same id or the same stack level and purpose on a connector replaces; another connector does not', () => {
    const s = new ProfileStore('ocpp1.6');
    s.set(held(1, 1, 10_000));
    expect(s.set(held(2, 1, 0, 120, 300))).toBe('Accepted');
    expect(s.profiles.map((p) => p.id)).toEqual([2]);
    s.set(held(3, 1, 5_000, -600, 600, 2));
    s.set(held(2, 2, 7_000));
    expect(s.profiles.map((p) => [p.id, p.stackLevel])).toEqual([
      [3, 1],
      [2, 2],
    ]);
  });

  it('2.0.1: the same id replaces; the same stack level with an overlapping validity is rejected, back to back is taken', () => {
    const s = new ProfileStore('ocpp2.0.1');
    s.set(held(1, 1, 10_000, 0, 60));
    expect(s.set(held(2, 1, 0, 30, 90))).toBe('Rejected');
    expect(s.set(held(2, 1, 0, 60, 90))).toBe('Accepted');
    expect(s.set(held(1, 1, 12_000, 0, 60))).toBe('Accepted');
    expect(s.profiles.map((p) => p.id).sort()).toEqual([1, 2]);
    expect(s.limitW(at(10))).toBe(12_000);
  });

  it('ClearChargingProfile by id or by criteria', () => {
    const s = new ProfileStore('ocpp1.6');
    s.set(held(1, 1, 10_000));
    s.set(held(2, 2, 20_000));
    expect(s.clear({ id: 2 })).toBe('Accepted');
    expect(s.clear({ id: 2 })).toBe('Unknown');
    expect(s.clear({ chargingProfilePurpose: 'TxDefaultProfile' })).toBe('Accepted');
    expect(s.profiles).toEqual([]);
  });
  it('a session paused for cheaper hours reads as a bus waiting on the connector; before and after it, as none', () => {
    const store = new ProfileStore('ocpp1.6');
    // 5 kW for 15 min, none for 30, 5 kW again for 15, then the hour is over.
    store.set({
      ...held(1, 0, 0),
      periods: [
        { startPeriod: 0, limit: 5000 },
        { startPeriod: 900, limit: 0 },
        { startPeriod: 2700, limit: 5000 },
      ],
    });
    expect(store.pausedAt(at(-5))).toBe(false); // not started
    expect(store.limitW(at(20))).toBe(0);
    expect(store.pausedAt(at(20))).toBe(true);
    expect(store.pausedAt(at(44))).toBe(true);
    expect(store.pausedAt(at(61))).toBe(false); // the schedule's hour is over
    // Power only after, or only before: no bus yet, or gone.
    const later = new ProfileStore('ocpp1.6');
    later.set({
      ...held(2, 0, 0),
      periods: [
        { startPeriod: 0, limit: 0 },
        { startPeriod: 1800, limit: 5000 },
      ],
    });
    expect(later.pausedAt(at(10))).toBe(false);
    const earlier = new ProfileStore('ocpp1.6');
    earlier.set({
      ...held(3, 0, 0),
      periods: [
        { startPeriod: 0, limit: 5000 },
        { startPeriod: 1800, limit: 0 },
      ],
    });
    expect(earlier.pausedAt(at(40))).toBe(false);
  });
});
