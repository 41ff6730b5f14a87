import { DateTime } from 'luxon';

/**
 * The one model of "which night it is" at a depot. Every consumer (Tonight, Yard, Plans and Fleet
 * defaults, e-mails, the OCPP hand-off, the demo seed, costs) asks this module; nothing else
 * decides it.
 *
 * A service night runs from the first pull-in of a service day to the moment the last bus has
 * made its first pull-out on the next service day. Days without runs (weekends, holidays) belong
 * to the night before them: Friday's night ends with Monday's pull-outs.
 */
export interface ServiceNight {
  /** The service day the night follows (YYYY-MM-DD at the depot). */
  serviceDate: string;
  /** The service day whose pull-outs end it. */
  nextServiceDate: string;
  /** ISO instants with the depot's offset. */
  start: string;
  end: string;
  /** False when the runs do not say (no runs, or no next service day yet): a calendar estimate. */
  fromRuns: boolean;
}

/** One run's times: the model needs only these. */
export interface RunTimes {
  serviceDate: string;
  bus: string;
  pullOut: Date | string;
  pullIn: Date | string;
}

/** What the model needs of a service day: its first pull-in and its last bus's first pull-out. */
export interface ServiceDayTimes {
  serviceDate: string;
  firstPullIn: Date | string;
  lastFirstPullOut: Date | string;
}

export interface NightAt {
  /** The night under way at the instant, if any. */
  inForce: ServiceNight | null;
  /** The next night to start after the instant. */
  next: ServiceNight;
  /** What every screen means by "tonight": the night in force, else the next one. */
  tonight: ServiceNight;
}

/** Calendar nights (no runs to go by) run from noon to noon at the depot: common practice. */
const CALENDAR_HOUR = 12;

const ms = (t: Date | string) => (typeof t === 'string' ? Date.parse(t) : t.getTime());
const iso = (t: number, zone: string) => DateTime.fromMillis(t, { zone }).toISO({ suppressMilliseconds: true })!;

/** A night estimated from the calendar: noon on `date` to noon on the next day, at the depot. */
export function calendarNight(date: string, zone: string): ServiceNight {
  const start = DateTime.fromISO(date, { zone }).set({ hour: CALENDAR_HOUR });
  const end = start.plus({ days: 1 });
  return {
    serviceDate: date,
    nextServiceDate: end.toISODate()!,
    start: start.toISO({ suppressMilliseconds: true })!,
    end: end.toISO({ suppressMilliseconds: true })!,
    fromRuns: false,
  };
}

/** Each service day's first pull-in and last first pull-out, from its runs. */
export function serviceDayTimes(runs: readonly RunTimes[]): ServiceDayTimes[] {
  const days = new Map<string, { firstIn: number; firstOut: Map<string, number> }>();
  for (const r of runs) {
    const day = days.get(r.serviceDate) ?? { firstIn: Infinity, firstOut: new Map<string, number>() };
    day.firstIn = Math.min(day.firstIn, ms(r.pullIn));
    day.firstOut.set(r.bus, Math.min(day.firstOut.get(r.bus) ?? Infinity, ms(r.pullOut)));
    days.set(r.serviceDate, day);
  }
  return [...days].map(([serviceDate, d]) => ({
    serviceDate,
    firstPullIn: new Date(d.firstIn),
    lastFirstPullOut: new Date(Math.max(...d.firstOut.values())),
  }));
}

/**
 * The nights the service days describe, in order: one per service day that has a next service
 * day. The last service day's night is open-ended: it ends at noon after it, marked as an estimate.
 */
export function nightsOfDays(serviceDays: readonly ServiceDayTimes[], zone: string): ServiceNight[] {
  const days = [...serviceDays].sort((a, b) => a.serviceDate.localeCompare(b.serviceDate));
  return days.map((day, k) => {
    const firstIn = ms(day.firstPullIn);
    const next = days[k + 1];
    if (!next) {
      const cal = calendarNight(day.serviceDate, zone);
      return { ...cal, start: iso(firstIn, zone), end: iso(Math.max(Date.parse(cal.end), firstIn + 3_600_000), zone) };
    }
    const lastOut = ms(next.lastFirstPullOut);
    return {
      serviceDate: day.serviceDate,
      nextServiceDate: next.serviceDate,
      start: iso(firstIn, zone),
      end: iso(Math.max(lastOut, firstIn), zone),
      fromRuns: true,
    };
  });
}

/** The nights the runs describe (see nightsOfDays). */
export function serviceNights(runs: readonly RunTimes[], zone: string): ServiceNight[] {
  return nightsOfDays(serviceDayTimes(runs), zone);
}

/**
 * The night in force at `now` and the next one, from the runs around it. Where the runs stop
 * (or there are none) calendar nights take over, so there is always a next night.
 * Where two nights overlap (a bus back from a morning run before another has left), the older
 * night stays in force until its last pull-out.
 */
export function nightAt(runs: readonly RunTimes[], zone: string, now: Date): NightAt {
  return nightAtDays(serviceDayTimes(runs), zone, now);
}

/** nightAt from each service day's times (what a database can sum up for it). */
export function nightAtDays(serviceDays: readonly ServiceDayTimes[], zone: string, now: Date): NightAt {
  return nightAmong(nightsOfDays(serviceDays, zone), zone, now);
}

/** As `nightAtDays`, from the nights of the service days already worked out (`nightsOfDays`). */
export function nightAmong(nightsOfRuns: readonly ServiceNight[], zone: string, now: Date): NightAt {
  const t = now.getTime();
  const nights = nightsOfRuns.slice();
  const last = nights.at(-1);
  if (!nights.some((n) => Date.parse(n.start) > t)) {
    // Fill from the end of what the runs say (or from yesterday) with calendar nights past `now`.
    const today = DateTime.fromMillis(t, { zone }).startOf('day');
    let date = last ? DateTime.fromISO(last.nextServiceDate, { zone }) : today.minus({ days: 1 });
    if (date < today.minus({ days: 1 })) date = today.minus({ days: 1 });
    for (let i = 0; i < 4; i++, date = date.plus({ days: 1 })) {
      const cal = calendarNight(date.toISODate()!, zone);
      if (!last || Date.parse(cal.start) >= Date.parse(last.end)) nights.push(cal);
    }
  }
  const inForce = nights.find((n) => Date.parse(n.start) <= t && t < Date.parse(n.end)) ?? null;
  const next = nights.find((n) => Date.parse(n.start) > t)!;
  return { inForce, next, tonight: inForce ?? next };
}

/** The service day an instant belongs to: tonight's (the night in force, else the next one). */
export function serviceDayAt(runs: readonly RunTimes[], zone: string, now: Date): string {
  return nightAt(runs, zone, now).tonight.serviceDate;
}
