import standardValidators from 'ocpp-rpc/lib/standard-validators.js';
import { describe, expect, it } from 'vitest';
import { addDays, type PlanResult } from '@nightyard/contracts';
import type { ServiceDayTimes } from '@nightyard/scheduling';
import { chargingProfiles, profileNightOf, stackLevelOf } from './charging-profiles';

const validators = standardValidators as unknown as {
  subprotocol: string;
  validate(id: string, params: unknown): boolean;
}[];
const validate = (protocol: 'ocpp1.6' | 'ocpp2.0.1', payload: unknown) =>
  validators.find((v) => v.subprotocol === protocol)!.validate('urn:SetChargingProfile.req', payload);

const ZONE = 'America/Chicago';
/** A school day at the depot: first pull-in 08:40, last bus's first pull-out 06:15 (CST, -06:00). */
const day = (date: string, firstIn = '08:40', lastOut = '06:15'): ServiceDayTimes => ({
  serviceDate: date,
  firstPullIn: `${date}T${firstIn}:00-06:00`,
  lastFirstPullOut: `${date}T${lastOut}:00-06:00`,
});
// Wednesday 9 to Friday 11 December 2026, then Monday 14 (a weekend between).
const WEEK = [day('2026-12-09'), day('2026-12-10'), day('2026-12-11'), day('2026-12-14')];

/** A small plan result: one session on charger A, 40 kW for two quarters, from 22:00. */
function result(kw = [40, 40]): PlanResult {
  const start = Date.parse('2026-12-09T22:00:00-06:00');
  const slots = Array.from({ length: 4 }, (_, i) => ({ start: new Date(start + i * 900_000).toISOString() }));
  return { slots, sessions: [{ bus: '31', charger: 'A', start: slots[1]!.start, kw }] } as unknown as PlanResult;
}

describe('stack levels of consecutive nights', () => {
  it('alternate 1 and 2 through a school week and its weekend', () => {
    const levels = [
      ['2026-12-09', '2026-12-10'],
      ['2026-12-10', '2026-12-11'],
      ['2026-12-11', '2026-12-14'],
      ['2026-12-14', '2026-12-15'],
    ].map(([d, next]) => stackLevelOf(d!, next!));
    expect(new Set(levels)).toEqual(new Set([1, 2]));
    levels.forEach((l, i) => i && expect(l).not.toBe(levels[i - 1]));
  });

  it('differ for any two neighbouring nights, whatever the gaps (holidays, Saturday service, breaks)', () => {
    // Every start day over a year, every first gap up to 63 days and (on some days all, else a spread of) second gaps.
    for (let d = 0; d < 366; d += 1) {
      const x = addDays('2026-01-01', d);
      for (let g1 = 1; g1 < 64; g1++) {
        const y = addDays(x, g1);
        for (let g2 = 1; g2 < 64; g2 += d % 11 === 0 ? 1 : 7) {
          if (stackLevelOf(x, y) === stackLevelOf(y, addDays(y, g2)))
            throw new Error(`${x} (+${g1}) and ${y} (+${g2}) share a stack level`);
        }
      }
    }
    // A Thursday holiday: Wednesday's and Friday's nights are neighbours two days apart.
    expect(stackLevelOf('2026-12-09', '2026-12-11')).not.toBe(stackLevelOf('2026-12-11', '2026-12-14'));
  });

  it('stay within 1..12', () => {
    for (let g = 1; g < 400; g++)
      expect(stackLevelOf('2026-12-09', addDays('2026-12-09', g))).toBeGreaterThanOrEqual(1);
    for (let g = 1; g < 400; g++) expect(stackLevelOf('2026-12-09', addDays('2026-12-09', g))).toBeLessThanOrEqual(12);
  });
});

describe('a night as its profiles carry it', () => {
  it("is valid over the night of the night model: first pull-in to the next service day's last first pull-out", () => {
    const n = profileNightOf(WEEK, ZONE, '2026-12-09');
    expect(n).toEqual({
      serviceDate: '2026-12-09',
      id: 20261209,
      stackLevel: stackLevelOf('2026-12-09', '2026-12-10'),
      validFrom: '2026-12-09T14:40:00Z',
      validTo: '2026-12-10T12:15:00Z',
    });
    // Friday's night runs to Monday's pull-outs.
    expect(profileNightOf(WEEK, ZONE, '2026-12-11')).toMatchObject({
      validFrom: '2026-12-11T14:40:00Z',
      validTo: '2026-12-14T12:15:00Z',
    });
  });

  it('consecutive nights: different ids and stack levels, validity back to back, never overlapping', () => {
    const nights = ['2026-12-09', '2026-12-10', '2026-12-11'].map((d) => profileNightOf(WEEK, ZONE, d));
    expect(new Set(nights.map((n) => n.id)).size).toBe(3);
    for (let i = 1; i < nights.length; i++) {
      expect(nights[i]!.stackLevel).not.toBe(nights[i - 1]!.stackLevel);
      expect(Date.parse(nights[i]!.validFrom)).toBeGreaterThanOrEqual(Date.parse(nights[i - 1]!.validTo));
    }
  });

  it('where two nights overlap, the later one starts when the older one ends', () => {
    // Thursday's first bus is back at 06:05, before Thursday's last bus has left at 06:15.
    const overlap = [day('2026-12-09'), day('2026-12-10', '06:05'), day('2026-12-11')];
    const wed = profileNightOf(overlap, ZONE, '2026-12-09');
    const thu = profileNightOf(overlap, ZONE, '2026-12-10');
    expect(wed.validTo).toBe('2026-12-10T12:15:00Z');
    expect(thu.validFrom).toBe('2026-12-10T12:15:00Z');
  });

  it('without runs: a calendar night, noon to noon at the depot', () => {
    expect(profileNightOf([], ZONE, '2026-12-24')).toMatchObject({
      id: 20261224,
      validFrom: '2026-12-24T18:00:00Z',
      validTo: '2026-12-25T18:00:00Z',
    });
  });
});

describe('charging profile payloads', () => {
  const refs = [
    { label: 'A', connectorId: 1, evseId: 1 },
    { label: 'B', connectorId: 2, evseId: 2 },
  ];

  it('carry id, stack level and validity in 1.6 and 2.0.1, and pass the official schemas', () => {
    const night = profileNightOf(WEEK, ZONE, '2026-12-09');
    const [v16] = chargingProfiles(result(), night, refs, '1.6');
    expect(validate('ocpp1.6', v16!.payload)).toBe(true);
    expect(v16!.payload.csChargingProfiles).toMatchObject({
      chargingProfileId: 20261209,
      stackLevel: night.stackLevel,
      chargingProfilePurpose: 'TxDefaultProfile',
      validFrom: '2026-12-09T14:40:00Z',
      validTo: '2026-12-10T12:15:00Z',
      chargingSchedule: {
        startSchedule: '2026-12-10T04:00:00Z',
        duration: 3600,
        chargingSchedulePeriod: [
          { startPeriod: 0, limit: 0 },
          { startPeriod: 900, limit: 40_000 },
          { startPeriod: 2700, limit: 0 },
        ],
      },
    });
    const [v201] = chargingProfiles(result(), night, refs, '2.0.1');
    expect(validate('ocpp2.0.1', v201!.payload)).toBe(true);
    expect(v201!.payload.chargingProfile).toMatchObject({
      id: 20261209,
      stackLevel: night.stackLevel,
      validFrom: night.validFrom,
      validTo: night.validTo,
    });
  });

  it('a revision of a night keeps its id, stack level and validity; only the schedule changes', () => {
    const night = profileNightOf(WEEK, ZONE, '2026-12-09');
    const first = chargingProfiles(result([40, 40]), night, refs, '1.6')[0]!.payload.csChargingProfiles as Record<
      string,
      unknown
    >;
    const revision = chargingProfiles(result([30, 50]), profileNightOf(WEEK, ZONE, '2026-12-09'), refs, '1.6')[0]!
      .payload.csChargingProfiles as Record<string, unknown>;
    const { chargingSchedule: s1, ...binding1 } = first;
    const { chargingSchedule: s2, ...binding2 } = revision;
    expect(binding2).toEqual(binding1);
    expect(s2).not.toEqual(s1);
  });

  it("the next night's profile differs from tonight's in id and stack level on every charger", () => {
    const tonight = chargingProfiles(result(), profileNightOf(WEEK, ZONE, '2026-12-09'), refs, '1.6');
    const next = chargingProfiles(result(), profileNightOf(WEEK, ZONE, '2026-12-10'), refs, '1.6');
    tonight.forEach((t, i) => {
      const a = t.payload.csChargingProfiles as { chargingProfileId: number; stackLevel: number };
      const b = next[i]!.payload.csChargingProfiles as { chargingProfileId: number; stackLevel: number };
      expect(b.chargingProfileId).not.toBe(a.chargingProfileId);
      expect(b.stackLevel).not.toBe(a.stackLevel);
    });
  });
});
