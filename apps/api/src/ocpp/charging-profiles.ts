import type { PlanResult } from '@nightyard/contracts';
import { calendarNight, nightsOfDays, type ServiceDayTimes } from '@nightyard/scheduling';

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
 * What binds a plan's charging profiles to its night.
 *
 * - `id`: the night's service date as YYYYMMDD. Every version of one night's plan has the same
 *   id, so a revision of tonight replaces tonight's profile (OCPP 1.6 and 2.0.1 both replace a
 *   profile with the same id) and nothing else.
 * - `validFrom` / `validTo`: the night's span from the night model (first pull-in to the last
 *   bus's first pull-out next service day). Where the night model lets two nights overlap, the
 *   older one keeps the overlap (as it stays "in force" there), so the later night's profile
 *   starts where the older one ends: at any instant at most one of our profiles is valid.
 * - `stackLevel`: different for any two consecutive nights (see stackLevelOf). OCPP 1.6 also
 *   replaces a profile with the same stack level and purpose on the connector whatever its id,
 *   and 2.0.1 refuses one whose validity overlaps; with different levels the next night's profile
 *   is held beside tonight's instead of replacing it.
 *
 * The central system only ever holds tonight's and the next night's profiles on a charger
 * (sending tonight's first), so "different from its neighbours" is all the stack level needs.
 */
export interface ProfileNight {
  serviceDate: string;
  id: number;
  stackLevel: number;
  validFrom: string;
  validTo: string;
}

const PURPOSE = 'TxDefaultProfile';
const SLOT_MS = 15 * 60_000;
/** Stack levels run from 1 to 2 * (MAX_LEVEL_BIT + 1): 1 and 2 in a normal week, at most 12. */
const MAX_LEVEL_BIT = 5;

/** The profile id of a night: its service date as YYYYMMDD, the same for every version. */
export function profileIdOf(serviceDate: string): number {
  return Number(serviceDate.replace(/-/g, ''));
}

const dayNumber = (date: string) => Math.round(Date.parse(`${date}T00:00:00Z`) / 86_400_000);

/**
 * The stack level of the night after `serviceDate`, whose next service day is `nextServiceDate`.
 *
 * With a gap of one or three days (a school week, a weekend) it is the day's parity: 1 for even
 * days since 1970-01-01, 2 for odd ones, so consecutive nights alternate. Parity alone fails on an
 * even gap (a Thursday holiday makes Wednesday and Friday neighbours), so in general: let g be the
 * gap in days and i the number of trailing zero bits of g (0 for odd gaps); the level is
 * 1 + 2i + (bit i of the day number). Two consecutive nights X -> Y -> Z always differ: if their
 * gaps have different i the levels differ; if the same i, adding the gap g (X to Y) leaves the
 * bits below i alone and flips bit i, so bit i of X and of Y differ. (i is capped at 5, so only
 * gaps that are multiples of 64 days could collide.)
 */
export function stackLevelOf(serviceDate: string, nextServiceDate: string): number {
  const day = dayNumber(serviceDate);
  const gap = dayNumber(nextServiceDate) - day;
  let i = 0;
  if (gap > 0) while (i < MAX_LEVEL_BIT && ((gap >> i) & 1) === 0) i++;
  return 1 + 2 * i + ((day >> i) & 1);
}

const utc = (iso: string) => new Date(Date.parse(iso)).toISOString().replace(/\.\d{3}Z$/, 'Z');

/**
 * The night of `serviceDate` as its profiles carry it, from the depot's service days around it
 * (the night model): where the runs do not say, a calendar night (noon to noon at the depot).
 */
export function profileNightOf(
  serviceDays: readonly ServiceDayTimes[],
  zone: string,
  serviceDate: string,
): ProfileNight {
  const nights = nightsOfDays(serviceDays, zone);
  const night = nights.find((n) => n.serviceDate === serviceDate) ?? calendarNight(serviceDate, zone);
  const previous = nights.filter((n) => n.serviceDate < serviceDate).at(-1);
  let from = Date.parse(night.start);
  const to = Date.parse(night.end);
  // The older night keeps an overlap (unless it would swallow this night whole).
  if (previous && Date.parse(previous.end) > from && Date.parse(previous.end) < to) from = Date.parse(previous.end);
  return {
    serviceDate,
    id: profileIdOf(serviceDate),
    stackLevel: stackLevelOf(serviceDate, night.nextServiceDate),
    validFrom: utc(new Date(from).toISOString()),
    validTo: utc(new Date(to).toISOString()),
  };
}

/**
 * A charger's power over the plan's horizon as OCPP schedule periods: one period per change of
 * power, limits in whole watts (OCPP validators reject fractional kW), 0 W between sessions so a
 * bus plugged in outside the plan waits for its turn.
 *
 * A session stopped inside a quarter hour (a charger reported out of service at 23:07, see
 * stopSessions) ends at that instant, and its last kW is the quarter hour's average, the energy
 * delivered before it. The charger is held at 0 W from the instant on, and until then at the power
 * that delivers that energy (the power it was drawing), so it stops when the yard said it stopped,
 * not at the end of the quarter hour.
 */
export function schedulePeriods(
  result: PlanResult,
  charger: string,
): { startSchedule: string; duration: number; periods: { startPeriod: number; limit: number }[] } {
  const slots = result.slots;
  const startMs = Date.parse(slots[0]!.start);
  const endMs = Date.parse(slots.at(-1)!.start) + SLOT_MS;
  const slotIndex = new Map(slots.map((s, i) => [Date.parse(s.start), i]));
  const watts = new Array<number>(slots.length).fill(0);
  // Stops inside a slot: slot index -> [instant, W before it].
  const stops = new Map<number, [number, number]>();
  for (const s of result.sessions.filter((x) => x.charger === charger)) {
    const first = slotIndex.get(Date.parse(s.start));
    if (first === undefined) continue;
    s.kw.forEach((kw, k) => {
      if (first + k < watts.length) watts[first + k] = Math.round(kw * 1000);
    });
    const stopMs = Date.parse(s.end);
    const last = first + s.kw.length - 1;
    const lastStart = startMs + last * SLOT_MS;
    if (s.kw.length && last < slots.length && stopMs > lastStart && stopMs < lastStart + SLOT_MS)
      stops.set(last, [stopMs, Math.round((s.kw[s.kw.length - 1]! * 1000 * SLOT_MS) / (stopMs - lastStart))]);
  }
  const changes: { atMs: number; limit: number }[] = [];
  watts.forEach((w, i) => {
    const stop = stops.get(i);
    const slotStart = Date.parse(slots[i]!.start);
    if (!stop) return void changes.push({ atMs: slotStart, limit: w });
    changes.push({ atMs: slotStart, limit: stop[1] }, { atMs: stop[0], limit: 0 });
  });
  const periods: { startPeriod: number; limit: number }[] = [];
  for (const c of changes) {
    if (periods.at(-1)?.limit === c.limit) continue;
    periods.push({ startPeriod: Math.round((c.atMs - startMs) / 1000), limit: c.limit });
  }
  return {
    startSchedule: utc(new Date(startMs).toISOString()),
    duration: Math.round((endMs - startMs) / 1000),
    periods,
  };
}

/** SetChargingProfile payloads for every charger of the plan of `night`, in the chosen OCPP version. */
export function chargingProfiles(
  result: PlanResult,
  night: ProfileNight,
  chargers: ChargerRef[],
  version: OcppVersion,
): ProfileExport[] {
  const { id, stackLevel, validFrom, validTo } = night;
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
            stackLevel,
            chargingProfilePurpose: PURPOSE,
            chargingProfileKind: 'Absolute',
            validFrom,
            validTo,
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
          stackLevel,
          chargingProfilePurpose: PURPOSE,
          chargingProfileKind: 'Absolute',
          validFrom,
          validTo,
          chargingSchedule: [{ id, startSchedule, duration, chargingRateUnit: 'W', chargingSchedulePeriod: periods }],
        },
      },
    };
  });
}
