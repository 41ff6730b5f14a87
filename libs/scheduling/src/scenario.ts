import { z } from 'zod';
import { DateTime, IANAZone } from 'luxon';

// Scenario file version 1 (see the scenario-format brief). Structural rules live in the zod
// schema; rules that relate fields to each other run afterwards in `checkScenario`, so a file
// with a broken structure reports that first and a well-formed file reports every semantic slip.

const localTime = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/, 'must be a local time written YYYY-MM-DDTHH:mm (no offset)');
const clock = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$|^24:00$/, 'must be a time of day HH:mm (00:00-24:00)');
const kw = z.number().finite().positive('must be greater than 0');
const kwh = z.number().finite().nonnegative('must be 0 or more');
const id = z.string().min(1, 'must not be empty');

const windowSchema = z.strictObject({
  days: z
    .array(
      z
        .number()
        .int('must be a whole ISO weekday number')
        .min(1, 'must be 1 (Monday) to 7 (Sunday)')
        .max(7, 'must be 1 (Monday) to 7 (Sunday)'),
    )
    .min(1, 'must list at least one ISO weekday (1 = Monday ... 7 = Sunday)'),
  from: clock,
  to: clock,
});

const limitWindowSchema = z.strictObject({
  from: localTime,
  to: localTime,
  limitKw: kw,
});

const periodSchema = z.strictObject({
  name: id,
  price: kwh,
  demandCharge: kwh.default(0),
  windows: z.array(windowSchema).min(1, 'must list at least one window'),
});

const staySchema = z.strictObject({
  arrive: localTime,
  depart: localTime,
  departMinKwh: kwh,
  runKwh: kwh.default(0),
});

const busSchema = z.strictObject({
  id,
  usableKwh: kw,
  maxKw: kw,
  arrivalKwh: kwh,
  ceilingKwh: kw.optional(),
  reserveKwh: kwh.default(0),
  taperFromKwh: kwh.optional(),
  stays: z.array(staySchema).min(1, 'must list at least one stay at the depot'),
});

const crewWindowSchema = z.strictObject({
  from: localTime,
  to: localTime,
  movesPerSlot: z.number().int('must be a whole number of moves').positive('must be 1 or more'),
});

/** Extension: the yard crew (who plugs buses in and out, and when). */
export const yardSchema = z.strictObject({
  minPlugInMinutes: z.number().int('must be a whole number of minutes').nonnegative('must be 0 or more').default(0),
  driversPlugIn: z.boolean().default(true),
  crew: z.array(crewWindowSchema).optional(),
  /**
   * Format extension: how much dearer (per cent of the night's cost, or amount in the tariff's
   * currency, whichever is larger) a plan may be to make fewer crew moves or, when re-planning,
   * to move fewer buses. Defaults: 0.5 % or 5.
   */
  costTolerancePercent: z.number().min(0, 'must be 0 or more').max(10, 'must be at most 10').default(0.5),
  costToleranceAmount: z.number().min(0, 'must be 0 or more').max(1000, 'must be at most 1000').default(5),
});

export const scenarioSchema = z.strictObject({
  version: z.literal(1, 'must be 1'),
  timezone: z.string().refine((s) => IANAZone.isValidZone(s), 'must be an IANA time zone such as America/Chicago'),
  start: localTime,
  end: localTime,
  slotMinutes: z
    .number()
    .int('must be a whole number of minutes')
    .refine((m) => m > 0 && 60 % m === 0, 'must divide the hour (e.g. 15)')
    .default(15),
  efficiency: z.number().gt(0, 'must be above 0').max(1, 'must be at most 1').default(1),
  site: z.strictObject({
    limitKw: kw,
    otherLoadKw: kwh.default(0),
    /** Format extension: the other load by local hour of day (0-23); overrides otherLoadKw. */
    otherLoadByHourKw: z.array(kwh).length(24, 'must list 24 values (kW), one per local hour 0-23').optional(),
    /** Format extension: the utility's load-reduction requests, a lower site limit inside each. */
    limitWindows: z.array(limitWindowSchema).optional(),
  }),
  cabinets: z.array(z.strictObject({ id, limitKw: kw })).default([]),
  chargers: z
    .array(
      z.strictObject({
        id,
        maxKw: kw,
        cabinet: id.optional(),
        /**
         * Extension: spans (local date-times) the charger is out of service, e.g. planned
         * maintenance over a weekend; no bus is plugged into it then.
         */
        outOfService: z
          .array(z.strictObject({ from: localTime, to: localTime }))
          .max(50)
          .optional(),
      }),
    )
    .min(1, 'must list at least one charger'),
  tariff: z.strictObject({
    currency: z
      .string()
      .regex(/^[A-Z]{3}$/, 'must be a three-letter currency code such as USD')
      .default('USD'),
    offPeakPrice: kwh,
    periods: z.array(periodSchema).default([]),
    facilityDemandCharge: kwh.default(0),
    peaksSoFarKw: z.record(z.string(), kwh).default({}),
  }),
  buses: z.array(busSchema).min(1, 'must list at least one bus'),
  yard: yardSchema.optional(),
});

export type Scenario = z.output<typeof scenarioSchema>;
export type ScenarioInput = z.input<typeof scenarioSchema>;
export interface Problem {
  path: string;
  message: string;
}
export type ParseResult = { ok: true; scenario: Scenario } | { ok: false; problems: Problem[] };

export function formatPath(path: readonly PropertyKey[]): string {
  let out = '';
  for (const part of path) {
    if (typeof part === 'number') out += `[${part}]`;
    else out += out === '' ? String(part) : `.${String(part)}`;
  }
  return out === '' ? '(file)' : out;
}

/** Validates a parsed JSON document as a scenario; every problem carries its field path. */
export function parseScenario(json: unknown): ParseResult {
  const result = scenarioSchema.safeParse(json);
  if (!result.success) {
    const problems: Problem[] = [];
    for (const issue of result.error.issues) {
      if (issue.code === 'unrecognized_keys') {
        for (const key of issue.keys)
          problems.push({ path: formatPath([...issue.path, key]), message: 'unknown field: remove it' });
      } else if (issue.code === 'invalid_type' && issue.input === undefined) {
        problems.push({ path: formatPath(issue.path), message: `is required (${issue.expected})` });
      } else {
        problems.push({ path: formatPath(issue.path), message: issue.message });
      }
    }
    return { ok: false, problems };
  }
  const problems = checkScenario(result.data);
  return problems.length ? { ok: false, problems } : { ok: true, scenario: result.data };
}

/**
 * A local wall-clock time in a zone, as epoch milliseconds. In an hour that occurs twice the
 * first occurrence is meant (the format says so; luxon alone would pick the later one). Returns
 * null for a time that does not exist (the hour skipped in spring).
 */
export function localToMillis(local: string, zone: string): number | null {
  const dt = DateTime.fromISO(local, { zone });
  if (!dt.isValid) return null;
  if (dt.toFormat("yyyy-MM-dd'T'HH:mm") !== local) return null;
  const options = dt.getPossibleOffsets();
  let best = dt.toMillis();
  for (const o of options) best = Math.min(best, o.toMillis());
  return best;
}

/** The depot's other load (kW) in the slot that starts at `ms`: by local hour if given. */
export function otherLoadAt(s: Scenario, ms: number): number {
  const byHour = s.site.otherLoadByHourKw;
  if (!byHour) return s.site.otherLoadKw;
  return byHour[DateTime.fromMillis(ms, { zone: s.timezone }).hour]!;
}

/**
 * The site limit (kW) of the slot [ms, ms + slotMs): site.limitKw, lowered by every limit window
 * that overlaps the slot (a window that starts or ends inside a slot holds for the whole slot,
 * since demand is the slot's average). A window above site.limitKw does not raise it.
 */
export function siteLimitAt(s: Scenario, ms: number, slotMs: number, windows = limitWindowsMs(s)): number {
  let limit = s.site.limitKw;
  for (const w of windows) if (w.from < ms + slotMs && w.to > ms) limit = Math.min(limit, w.limitKw);
  return limit;
}

/** The limit windows in absolute time (windows whose times do not exist are left out). */
export function limitWindowsMs(s: Scenario): { from: number; to: number; limitKw: number }[] {
  const out: { from: number; to: number; limitKw: number }[] = [];
  for (const w of s.site.limitWindows ?? []) {
    const from = localToMillis(w.from, s.timezone);
    const to = localToMillis(w.to, s.timezone);
    if (from !== null && to !== null) out.push({ from, to, limitKw: w.limitKw });
  }
  return out;
}

function minutesOf(clockText: string): number {
  const [h, m] = clockText.split(':').map(Number);
  return h! * 60 + m!;
}

/** Minutes of the week (Monday 00:00 = 0) covered by a TOU window, for the overlap rule. */
export function windowWeekMinutes(w: { days: number[]; from: string; to: string }): [number, number][] {
  const from = minutesOf(w.from);
  let to = minutesOf(w.to);
  if (to <= from) to += 24 * 60;
  return w.days.map((d) => [(d - 1) * 1440 + from, (d - 1) * 1440 + to] as [number, number]);
}

function checkScenario(s: Scenario): Problem[] {
  const problems: Problem[] = [];
  const add = (path: string, message: string) => problems.push({ path, message });
  const zone = s.timezone;
  const startMs = localToMillis(s.start, zone);
  const endMs = localToMillis(s.end, zone);
  const slotMs = s.slotMinutes * 60_000;
  const checkTime = (path: string, text: string): number | null => {
    const ms = localToMillis(text, zone);
    if (ms === null) add(path, `${text} does not exist in ${zone} (invalid date or skipped by a clock change)`);
    return ms;
  };
  checkTime('start', s.start);
  checkTime('end', s.end);
  if (startMs !== null && endMs !== null) {
    if (endMs <= startMs) add('end', 'must be after start');
    else if (endMs - startMs > 7 * 24 * 3600_000) add('end', 'must be at most 7 days after start');
  }
  if (startMs !== null && Number(s.start.slice(14, 16)) % s.slotMinutes !== 0) {
    add('start', `must fall on a ${s.slotMinutes}-minute slot boundary`);
  }
  if (endMs !== null && Number(s.end.slice(14, 16)) % s.slotMinutes !== 0) {
    add('end', `must fall on a ${s.slotMinutes}-minute slot boundary`);
  }
  if (startMs !== null && endMs !== null && (endMs - startMs) % slotMs !== 0) {
    add('end', `must be a whole number of ${s.slotMinutes}-minute slots after start`);
  }
  if (s.site.otherLoadKw > s.site.limitKw)
    add('site.otherLoadKw', 'must not exceed site.limitKw (the other load alone would break the service limit)');
  s.site.otherLoadByHourKw?.forEach((kw, h) => {
    if (kw > s.site.limitKw)
      add(
        `site.otherLoadByHourKw[${h}]`,
        'must not exceed site.limitKw (the other load alone would break the service limit)',
      );
  });
  s.site.limitWindows?.forEach((w, i) => {
    const path = `site.limitWindows[${i}]`;
    const from = checkTime(`${path}.from`, w.from);
    const to = checkTime(`${path}.to`, w.to);
    if (from === null || to === null) return;
    if (to <= from) {
      add(`${path}.to`, 'must be after from');
      return;
    }
    if (startMs === null || endMs === null || endMs <= startMs) return;
    if (to <= startMs || from >= endMs) {
      add(path, `lies outside the horizon (${s.start} to ${s.end}): a window must be inside it or overlap it`);
      return;
    }
    // The other load alone must fit under the lowered limit in every slot the window touches.
    for (let ms = startMs; ms < endMs; ms += slotMs) {
      if (ms >= to || ms + slotMs <= from) continue;
      const other = otherLoadAt(s, ms);
      if (other > w.limitKw) {
        add(
          `${path}.limitKw`,
          `must not be below the other load in the window (${other} kW at ${DateTime.fromMillis(ms, { zone }).toFormat("yyyy-MM-dd'T'HH:mm")})`,
        );
        break;
      }
    }
  });

  const cabinetIds = new Set<string>();
  s.cabinets.forEach((c, i) => {
    if (cabinetIds.has(c.id)) add(`cabinets[${i}].id`, `duplicate cabinet id ${c.id}`);
    cabinetIds.add(c.id);
  });
  const chargerIds = new Set<string>();
  s.chargers.forEach((c, i) => {
    if (chargerIds.has(c.id)) add(`chargers[${i}].id`, `duplicate charger id ${c.id}`);
    chargerIds.add(c.id);
    if (c.cabinet !== undefined && !cabinetIds.has(c.cabinet))
      add(`chargers[${i}].cabinet`, `names cabinet ${c.cabinet}, which is not in cabinets`);
    c.outOfService?.forEach((w, j) => {
      const path = `chargers[${i}].outOfService[${j}]`;
      const from = checkTime(`${path}.from`, w.from);
      const to = checkTime(`${path}.to`, w.to);
      if (from !== null && to !== null && to <= from) add(`${path}.to`, 'must be after from');
    });
  });

  const periodNames = new Set<string>();
  const spans: { path: string; span: [number, number] }[] = [];
  s.tariff.periods.forEach((p, i) => {
    if (p.name === 'facility' || p.name === 'off-peak')
      add(`tariff.periods[${i}].name`, `"${p.name}" is reserved: choose another name`);
    if (periodNames.has(p.name)) add(`tariff.periods[${i}].name`, `duplicate period name ${p.name}`);
    periodNames.add(p.name);
    p.windows.forEach((w, j) => {
      const path = `tariff.periods[${i}].windows[${j}]`;
      if (w.from === w.to) add(`${path}.to`, 'must differ from from (a window cannot be empty)');
      if (w.from === '24:00') add(`${path}.from`, 'must be 00:00-23:59');
      if (new Set(w.days).size !== w.days.length) add(`${path}.days`, 'must not repeat a day');
      if (w.from !== w.to) for (const span of windowWeekMinutes(w)) spans.push({ path, span });
    });
  });
  // Windows overlap if their week-minute spans intersect (a Sunday night window wraps to Monday).
  const WEEK = 7 * 1440;
  for (let i = 0; i < spans.length; i++) {
    for (let j = i + 1; j < spans.length; j++) {
      const a = spans[i]!;
      const b = spans[j]!;
      if (a.path === b.path) continue;
      const hit = [-WEEK, 0, WEEK].some((shift) => a.span[0] < b.span[1] + shift && b.span[0] + shift < a.span[1]);
      if (hit) add(b.path, `overlaps ${a.path}: windows must not overlap`);
    }
  }
  for (const key of Object.keys(s.tariff.peaksSoFarKw)) {
    if (key !== 'facility' && !periodNames.has(key))
      add(`tariff.peaksSoFarKw.${key}`, 'must be "facility" or the name of a period');
  }

  s.yard?.crew?.forEach((w, i) => {
    const path = `yard.crew[${i}]`;
    const from = checkTime(`${path}.from`, w.from);
    const to = checkTime(`${path}.to`, w.to);
    if (from !== null && to !== null && to <= from) add(`${path}.to`, 'must be after from');
  });

  const busIds = new Set<string>();
  s.buses.forEach((b, i) => {
    const path = `buses[${i}]`;
    if (busIds.has(b.id)) add(`${path}.id`, `duplicate bus id ${b.id}`);
    busIds.add(b.id);
    const ceiling = b.ceilingKwh ?? b.usableKwh;
    if (b.arrivalKwh > b.usableKwh) add(`${path}.arrivalKwh`, 'must not exceed usableKwh');
    if (b.ceilingKwh !== undefined && b.ceilingKwh > b.usableKwh)
      add(`${path}.ceilingKwh`, 'must not exceed usableKwh');
    if (b.reserveKwh > ceiling) add(`${path}.reserveKwh`, 'must not exceed ceilingKwh (or usableKwh)');
    if (b.taperFromKwh !== undefined && b.taperFromKwh >= b.usableKwh)
      add(`${path}.taperFromKwh`, 'must be below usableKwh');
    let prevDepart: number | null = null;
    b.stays.forEach((st, k) => {
      const sp = `${path}.stays[${k}]`;
      const a = checkTime(`${sp}.arrive`, st.arrive);
      const d = checkTime(`${sp}.depart`, st.depart);
      if (a !== null && d !== null && d <= a) add(`${sp}.depart`, 'must be after arrive');
      if (a !== null && startMs !== null && a < startMs) add(`${sp}.arrive`, 'must not be before the scenario start');
      if (d !== null && endMs !== null && d > endMs) add(`${sp}.depart`, 'must not be after the scenario end');
      if (a !== null && prevDepart !== null && a < prevDepart)
        add(`${sp}.arrive`, 'must not be before the previous stay departs (stays in time order, no overlap)');
      if (d !== null) prevDepart = d;
      if (st.departMinKwh > ceiling)
        add(`${sp}.departMinKwh`, 'must not exceed ceilingKwh (or usableKwh): no bus could leave with it');
    });
  });
  return problems;
}
