import type { Charger, Tonight, TonightPlan, YardStep } from '@nightyard/contracts';
import {
  addDays,
  dayAt,
  depotParts,
  pastMidnightAt,
  timeAt,
  weekdayAt,
  weekdayTimeAt,
} from '@nightyard/contracts/depot-time';

/** Times, the night's span, steps and chargers as the yard reads them. Pure functions only. */

/** A step is late this long after its time with nobody confirming it (as the API counts it). */
export const OVERDUE_AFTER_MS = 10 * 60_000;
const SLOT_MS = 15 * 60_000;

const collator = new Intl.Collator(undefined, { numeric: true, sensitivity: 'base' });
/** C2 before C10; bus 9 before bus 10. */
export const naturalCompare = (a: string, b: string) => collator.compare(a, b);

/** "21:30" at the depot. */
export const clock = timeAt;
/** "Tue, Dec 1" at the depot. */
export const day = dayAt;
/** The depot's wall clock at an instant: `{ date: 'YYYY-MM-DD', time: 'HH:mm', hour }`. */
export const localParts = depotParts;

/** "in 25 min", "in 2 h 5 min", "15 min ago". */
export function relative(atMs: number, nowMs: number): string {
  const minutes = Math.round((atMs - nowMs) / 60_000);
  const abs = Math.abs(minutes);
  const text = abs < 60 ? `${abs} min` : `${Math.floor(abs / 60)} h${abs % 60 ? ` ${abs % 60} min` : ''}`;
  if (abs === 0) return 'now';
  return minutes > 0 ? `in ${text}` : `${text} ago`;
}

export function kwh(value: number): string {
  return `${new Intl.NumberFormat(undefined, { maximumFractionDigits: 1 }).format(value)} kWh`;
}

/**
 * The local date-time the API wants for a late bus (`YYYY-MM-DDTHH:mm`): the next time the depot's
 * clock reads `time` after now (later today, or else tomorrow morning).
 */
export function expectedAtFor(time: string, nowMs: number, timeZone: string): string {
  const now = localParts(nowMs, timeZone);
  if (time > now.time) return `${now.date}T${time}`;
  // Past midnight the night's morning is today: an earlier time has passed (it read as tomorrow,
  // a day away, at 05:05 for 04:00). In the evening an earlier time is tomorrow morning.
  if (pastMidnightAt(nowMs, timeZone)) return `${now.date}T${time}`;
  return `${addDays(now.date, 1)}T${time}`;
}

/** Night colours while the night is under way: from its first slot to its last (the server's night). */
export function isNightAt(nowMs: number, night: Horizon | null): boolean {
  return night !== null && nowMs >= night.start && nowMs < night.end;
}

// ---------------------------------------------------------------------------------------------
// The night's span and positions on a timeline

export interface Horizon {
  start: number;
  end: number;
}

/** Where an instant sits across the night, 0-100 (clamped). */
export function pct(ms: number, h: Horizon): number {
  if (h.end <= h.start) return 0;
  return Math.min(100, Math.max(0, ((ms - h.start) / (h.end - h.start)) * 100));
}

/** The now-line's position, or null when now is outside the night. */
export function nowLinePct(nowMs: number, h: Horizon): number | null {
  if (nowMs < h.start || nowMs > h.end) return null;
  return pct(nowMs, h);
}

export interface Tick {
  at: number;
  left: number;
  label: string;
}

/**
 * Whole local hours across the night, every `every` hours (local hour divisible by it); by
 * default as many as a card's narrow track holds (about six: every 3 hours on a weeknight, every
 * 12 over a weekend). On a night longer than a day, midnight is named by its day ("Sat").
 */
export function hourTicks(h: Horizon, timeZone: string, every = tickEvery(h)): Tick[] {
  const ticks: Tick[] = [];
  const days = spansDays(h);
  for (let t = Math.ceil(h.start / SLOT_MS) * SLOT_MS; t <= h.end; t += SLOT_MS) {
    const local = localParts(t, timeZone);
    if (local.time.endsWith(':00') && local.hour % every === 0)
      ticks.push({ at: t, left: pct(t, h), label: days && local.hour === 0 ? weekdayAt(t, timeZone) : local.time });
  }
  return ticks;
}

/** Hours between ticks: the fewest of 3, 6, 12 and 24 that leave at most six across the night. */
export function tickEvery(h: Horizon): number {
  const hours = (h.end - h.start) / 3_600_000;
  return [3, 6, 12].find((n) => hours / n <= 6) ?? 24;
}

// ---------------------------------------------------------------------------------------------
// Steps

/** What the client knows of a confirmation it has queued (see ConfirmationOutbox). */
export type OutboxState =
  | { state: 'saving'; retrying: boolean; message: string | null }
  | { state: 'saved'; confirmedAt: string; confirmedBy: string | null }
  | { state: 'failed'; message: string };

export type StepState = 'done' | 'saving' | 'overdue' | 'upcoming' | 'missed';

export interface StepView {
  step: YardStep;
  state: StepState;
  /** As the night shows it: "21:30", or "Fri 21:30" on a night longer than a day. */
  time: string;
  /** "21:30" at the depot on any night: what a late confirmation's time field takes. */
  clockTime: string;
  /** The server's words for it: "Plug in bus 214 at charger C3", "Unplug bus 218 from charger C3 now (…)" */
  title: string;
  /** "Plug in bus 214 at charger C3 at 21:30" */
  sentence: string;
  /** Why the plan changed it ("Charger C3 out of service (cable cut)"), else null. */
  reason: string | null;
  caution: string;
  /** "Done 21:32 by Sam Reyes" */
  doneNote: string | null;
  outbox: OutboxState | null;
}

export const CONNECT_CAUTION =
  'High voltage: trained and authorised staff only. Inspect the connector and cable before use.';
export const DISCONNECT_CAUTION =
  "High voltage: trained and authorised staff only. Follow the charger maker's instructions; tag out and report any damage.";

export function stepTitle(step: Pick<YardStep, 'action' | 'bus' | 'charger'> & { text?: string }): string {
  if (step.text) return step.text;
  return step.action === 'connect'
    ? `Plug in bus ${step.bus} at charger ${step.charger}`
    : `Unplug bus ${step.bus} from charger ${step.charger}`;
}

/** Who makes a step, in the run sheet's words: "Crew", "Driver, on pulling in" or "Driver, on pulling out". */
export function moveBy(step: Pick<YardStep, 'action' | 'by'>): string {
  if (step.by !== 'driver') return 'Crew';
  return step.action === 'connect' ? 'Driver, on pulling in' : 'Driver, on pulling out';
}

/** A step's state now: confirmed (or confirmed here and being saved), overdue or upcoming. */
export function stepState(step: YardStep, nowMs: number, outbox: OutboxState | null): StepState {
  if (step.status === 'missed') return 'missed';
  if (step.status === 'done' || step.confirmedAt) return 'done';
  if (outbox?.state === 'saved') return 'done';
  if (outbox?.state === 'saving') return 'saving';
  return Date.parse(step.at) + OVERDUE_AFTER_MS < nowMs ? 'overdue' : 'upcoming';
}

/** A night longer than a day (a weekend's) names the day with each step's time: 15:00 comes round more than once. */
export function spansDays(horizon: { start: number; end: number } | null | undefined): boolean {
  return !!horizon && horizon.end - horizon.start > 24 * 3_600_000;
}

export function stepViews(
  steps: readonly YardStep[],
  nowMs: number,
  timeZone: string,
  outbox: (key: string) => OutboxState | null = () => null,
  days = false,
): StepView[] {
  return [...steps]
    .sort(
      (a, b) => Date.parse(a.at) - Date.parse(b.at) || (a.action === b.action ? 0 : a.action === 'disconnect' ? -1 : 1),
    )
    .map((step) => {
      const box = outbox(step.key);
      const state = stepState(step, nowMs, box);
      const clockTime = clock(step.at, timeZone);
      const time = days ? weekdayTimeAt(step.at, timeZone) : clockTime;
      const title = stepTitle(step);
      const confirmedAt = step.confirmedAt ?? (box?.state === 'saved' ? box.confirmedAt : null);
      const confirmedBy = step.confirmedBy ?? (box?.state === 'saved' ? box.confirmedBy : null);
      return {
        step,
        state,
        time,
        clockTime,
        title,
        // An unplug forced by a report says "now" itself; its time is when the report was made.
        sentence: step.reason ? `${title} (reported ${time})` : `${title} at ${time}`,
        reason: step.reason ?? null,
        caution: step.action === 'connect' ? CONNECT_CAUTION : DISCONNECT_CAUTION,
        doneNote: confirmedAt ? `Done ${clock(confirmedAt, timeZone)}${confirmedBy ? ` by ${confirmedBy}` : ''}` : null,
        outbox: box,
      };
    });
}

/**
 * The step due now (or next) of each charger: its first step by time still to do that is not
 * overdue. Overdue steps wait in their own list (see `overdueSteps`), so a step missed hours ago
 * never hides what to do now.
 */
export function nextSteps(views: readonly StepView[]): Map<string, StepView> {
  const next = new Map<string, StepView>();
  for (const v of views) {
    if (v.state !== 'upcoming') continue;
    if (!next.has(v.step.charger)) next.set(v.step.charger, v);
  }
  return next;
}

/** Overdue steps, oldest first: each is confirmed with the time it happened, or said not to have happened. */
export function overdueSteps(views: readonly StepView[]): StepView[] {
  return views.filter((v) => v.state === 'overdue');
}

/** Across all chargers, the steps due from now to `withinMs` ahead (an unplug due now included), in time order. */
export function nextHour(views: readonly StepView[], nowMs: number, withinMs = 60 * 60_000): StepView[] {
  return views.filter((v) => v.state === 'upcoming' && Date.parse(v.step.at) <= nowMs + withinMs);
}

/** "Due now (23:07)", "Next, in 25 min (23:30)". */
export function dueText(view: StepView, nowMs: number): string {
  const at = Date.parse(view.step.at);
  return at <= nowMs ? `Due now (${view.time})` : `Next, ${relative(at, nowMs)} (${view.time})`;
}

// ---------------------------------------------------------------------------------------------
// Chargers

export type LiveTone = 'ok' | 'busy' | 'fault' | 'off' | 'unknown';

export interface LiveView {
  icon: string;
  text: string;
  tone: LiveTone;
  faulted: boolean;
}

/**
 * The live chip of a charger card. Out of service now (`outOfService`), it says so whatever idle
 * state the station reports: a station saying "Available" beside "Out of service" invites a bus.
 */
export function liveView(
  charger: Pick<Charger, 'live' | 'status' | 'statusReason'> | null,
  timeZone: string,
  outOfService = false,
): LiveView {
  const live = charger?.live ?? null;
  const seen = live?.seenAt ? ` (at ${clock(live.seenAt, timeZone)})` : '';
  if (outOfService && live?.status !== 'charging' && live?.status !== 'faulted')
    return { icon: 'block', text: 'Out of service', tone: 'off', faulted: false };
  if (!live) return { icon: 'help', text: 'No live report', tone: 'unknown', faulted: false };
  switch (live.status) {
    case 'charging':
      return {
        icon: 'bolt',
        text: `Charging${live.powerKw !== null ? ` at ${new Intl.NumberFormat(undefined, { maximumFractionDigits: 1 }).format(live.powerKw)} kW` : ''}${seen}`,
        tone: 'busy',
        faulted: false,
      };
    case 'connected':
      return { icon: 'electrical_services', text: `Plugged in, not charging${seen}`, tone: 'ok', faulted: false };
    case 'available':
      return { icon: 'power', text: `Available${seen}`, tone: 'ok', faulted: false };
    case 'faulted':
      return { icon: 'report', text: `Faulted${seen}`, tone: 'fault', faulted: true };
    default:
      return { icon: 'cloud_off', text: `Offline${seen}`, tone: 'off', faulted: false };
  }
}

/** A charger's report this long after a confirmation, still at odds with it, is worth a look. */
export const AT_ODDS_AFTER_MS = 2 * 60_000;

/**
 * Where the charger's own report disagrees with the last step the yard confirmed on it: nothing
 * plugged in after a bus was confirmed plugged in (a connector not seated, or the bus on another
 * charger), or power drawn after the last bus was confirmed unplugged. Only a report made after the
 * confirmation counts (with `AT_ODDS_AFTER_MS` for the charger to catch up); null where they agree
 * or nothing tells. A charger reporting a bus plugged in but not drawing after an unplug is left
 * alone: a station between two sessions of its night's profile may say so (the demo's do).
 */
export function atOdds(
  steps: readonly StepView[],
  live: Pick<NonNullable<Charger['live']>, 'status' | 'seenAt'> | null | undefined,
  timeZone: string,
): string | null {
  if (!live?.seenAt) return null;
  const last = steps
    .filter((s) => s.step.status === 'done' && s.step.confirmedAt)
    .reduce<StepView | null>(
      (a, s) => (!a || Date.parse(s.step.confirmedAt!) >= Date.parse(a.step.confirmedAt!) ? s : a),
      null,
    );
  if (!last || Date.parse(live.seenAt) - Date.parse(last.step.confirmedAt!) < AT_ODDS_AFTER_MS) return null;
  const { bus, charger, action } = last.step;
  const seen = clock(live.seenAt, timeZone);
  const confirmed = clock(last.step.confirmedAt!, timeZone);
  if (action === 'connect' && live.status === 'available')
    return (
      `Charger ${charger} reports nothing plugged in (at ${seen}), but bus ${bus} was confirmed plugged in at ${confirmed}. ` +
      'Check that the connector is seated and that the bus is on this charger; if it still does not take a charge, report it.'
    );
  // Drawing power after the last bus was unplugged, with no plug-in due yet: a bus nobody
  // confirmed is on it (a plug-in due and not confirmed is already an overdue step).
  const plugInDue = steps.some(
    (s) => s.step.action === 'connect' && s.step.status !== 'done' && Date.parse(s.step.at) <= Date.parse(live.seenAt!),
  );
  if (action === 'disconnect' && live.status === 'charging' && !plugInDue)
    return (
      `Charger ${charger} is charging a bus (at ${seen}), but bus ${bus} was confirmed unplugged at ${confirmed} ` +
      'and no plug-in is due on it yet. Check which bus is on this charger.'
    );
  return null;
}

// ---------------------------------------------------------------------------------------------
// Revisions

/**
 * "Plan revised at 23:05 (version 3): charger C3 out of service (cable damaged). 2 buses moved from
 * 23:05 on, because: …" - with the moved buses in the e-mails' words.
 */
export function revisionNotice(
  plan: Pick<TonightPlan, 'version' | 'kind' | 'revisionNote' | 'publishedAt' | 'publishedBy' | 'moved'>,
  timeZone: string,
): string {
  const note = plan.revisionNote;
  const match = note ? /^Revised at (\d{1,2}:\d{2}): (.*?)\.?$/.exec(note) : null;
  const moved = plan.moved;
  if (plan.kind === 'revision' && match) {
    const why =
      moved && moved.againstVersion === null && moved.reasons.length
        ? ` ${busCount(moved.buses.length)} moved from ${match[1]} on, because: ${moved.reasons.join('; ')}.`
        : '';
    return `Plan revised at ${match[1]} (version ${plan.version}): ${match[2]}${plan.publishedBy ? `. Reported by ${plan.publishedBy}` : ''}.${why}`;
  }
  const at = plan.publishedAt ? ` at ${clock(plan.publishedAt, timeZone)}` : '';
  const against =
    moved && moved.againstVersion !== null
      ? moved.buses.length
        ? ` Against version ${moved.againstVersion}: ${moved.buses.length === 1 ? '1 bus changes' : `${moved.buses.length} buses change`} charger or times (${moved.buses.join(', ')}).`
        : ` Against version ${moved.againstVersion}: no bus changes charger or times.`
      : '';
  return `A new plan was published${at} (version ${plan.version})${plan.publishedBy ? ` by ${plan.publishedBy}` : ''}.${against} Check your next steps.`;
}

const busCount = (n: number) => `${n} ${n === 1 ? 'bus' : 'buses'}`;

const REPORT_KINDS: Record<string, string> = {
  bus_late: 'Bus late',
  bus_absent: 'Bus absent',
  charger_out: 'Charger out of service',
  soc_reading: 'State of charge reading',
  step_missed: 'Step that did not happen',
};

export function reportLine(r: Tonight['reports'][number], timeZone: string): string {
  const what = REPORT_KINDS[r.kind] ?? r.kind;
  const subject = r.charger ? `charger ${r.charger}` : r.bus ? `bus ${r.bus}` : '';
  const reason = r.reason ? `: ${r.reason}` : '';
  const by = r.reportedBy ? ` by ${r.reportedBy}` : '';
  const version = r.revisionVersion !== null ? ` (version ${r.revisionVersion})` : '';
  return `${clock(r.reportedAt, timeZone)} ${what}, ${subject}${reason}${by}${version}`;
}
