import { DateTime } from 'luxon';
import type { PlanResult } from '@nightyard/contracts';
import { localToMillis, type Plan, type Replan, type Scenario } from '@nightyard/scheduling';
import { runInPool } from '../workers/pool';
import { DomainError } from '../http/errors';
import { mergeSessions } from '../yard/yard-steps';
import { chargingBySlot, wholeNightFigures } from './whole-night';

const LOCAL = "yyyy-MM-dd'T'HH:mm";

/** How a plan for a night already under way is made: from `from` on, the past kept as it was. */
export interface PlanFrom {
  /** Local wall-clock cut-off (the engine starts at the next slot boundary). */
  from: string;
  /** The published plan the night was following, whose sessions before the cut-off stand. */
  previousPlanId: string | null;
  /** Buses the yard confirmed on a charger at the cut-off: they stay there. */
  plugged: Record<string, string>;
  /** States of charge the yard read tonight (in the plan followed): the plan starts those buses from them. */
  socReadings?: Record<string, SocReading>;
}

/**
 * Where a plan for this scenario must start at `now`: null while the night has not begun; the
 * cut-off while it is under way; refused once it is over. Nothing is ever planned in the past.
 */
export function cutOffAt(scenario: Scenario, now: Date): string | null {
  const zone = scenario.timezone;
  const start = localToMillis(scenario.start, zone)!;
  const end = localToMillis(scenario.end, zone)!;
  const t = now.getTime();
  const last = end - scenario.slotMinutes * 60_000;
  if (t >= last) {
    throw new DomainError(
      'validation_failed',
      `That night ended at ${DateTime.fromMillis(end, { zone }).toFormat('ccc d LLL HH:mm')}: plans are for nights still to come`,
      { serviceDate: 'The night is over' },
    );
  }
  return t > start ? DateTime.fromMillis(t, { zone }).toFormat(LOCAL) : null;
}

/** Plans the rest of a night from its cut-off: the engine's re-plan, with the past merged back in. */
export async function planFromCutOff(
  scenario: Scenario,
  at: PlanFrom,
  previous: PlanResult | null,
): Promise<PlanResult> {
  // The engine runs in a worker thread, like every plan. A stored result is the engine's whole
  // plan (the contract reads only some of its fields; the row keeps them all).
  // A reading the yard made tonight stands here too, as in the yard's own re-plans.
  const cutMs = localToMillis(at.from, scenario.timezone)!;
  const { energyKwh } = previous
    ? readingsAtCutOff(scenario, previous, at.socReadings ?? {}, cutMs, scenario.timezone)
    : { energyKwh: {} };
  const next = await runInPool({
    kind: 'replan',
    scenario,
    state: {
      now: at.from,
      plugged: at.plugged,
      ...(Object.keys(energyKwh).length ? { energyKwh } : {}),
      ...(previous ? { previous: previous as Plan } : {}),
    },
  });
  return mergeReplan(previous, next, scenario);
}

/**
 * What a stored re-plan keeps of the engine's account: where it starts, the chargers out, the
 * buses plugged in, and which buses it moved and why (the review and the Yard say so); not the
 * kept sessions, which are in the plan's own.
 */
function replanFacts(next: Replan): NonNullable<PlanResult['replan']> {
  const { from, outOfService, plugged, moved } = next.replan;
  return { from, outOfService, plugged, ...(moved ? { moved } : {}) };
}

/**
 * The night as a whole: what stood before the re-plan's first slot, then the re-plan, its cost
 * the whole night's (`scenario`: the one the engine re-planned).
 */
export function mergeReplan(previous: PlanResult | null, next: Replan, scenario: Scenario): PlanResult {
  const result: PlanResult = next;
  if (!previous)
    return {
      ...result,
      replan: replanFacts(next),
    };
  const firstNew = Date.parse(next.replan.from);
  // From the cut-off on, the re-plan's slots whole: its load, and the limit and prices it was
  // planned under (a service limit lowered since the plan followed; before, the followed plan's
  // 450 kW stood beside a re-plan made under 170 kW).
  const newSlots = new Map(next.slots.map((s) => [Date.parse(s.start), s]));
  const sessions = staysPluggedIn(
    mergeSessions(
      keptAsBefore(previous, next.replan.kept as PlanResult['sessions']),
      pluggedAsFollowed(previous, next.sessions, next.replan.plugged, firstNew),
    ),
    scenario,
    firstNew,
  );
  // Before the cut-off the load is what was drawn: a late bus's sessions there never happened.
  const was = chargingBySlot(previous.sessions);
  const kept = chargingBySlot(sessions);
  const drawn = (s: PlanResult['slots'][number]) => {
    const t = Date.parse(s.start);
    const kw = s.loadKw - (was.get(t) ?? 0) + (kept.get(t) ?? 0);
    return Math.abs(kw - s.loadKw) > 1e-6 ? { ...s, loadKw: Math.round(kw * 1e6) / 1e6 } : s;
  };
  const merged: PlanResult = {
    ...result,
    slots: previous.slots.map((s) =>
      Date.parse(s.start) >= firstNew ? { ...s, ...newSlots.get(Date.parse(s.start)) } : drawn(s),
    ),
    sessions,
    outOfService: joinSpans([
      ...(previous.outOfService ?? [])
        .filter((o) => Date.parse(o.from) < firstNew)
        .map((o) => (Date.parse(o.to) > firstNew ? { ...o, to: next.replan.from } : o)),
      ...next.outOfService,
    ]),
    replan: replanFacts(next),
  };
  return wholeNightFigures(merged, scenario, next.replan.scenario, firstNew, next.replan.night, previous.baseline.kind);
}

/**
 * A bus the yard already plugged in where the plan followed has its plug-in at the cut-off or
 * after (confirmed early): the re-plan starts it on its charger with no move of its own, which the
 * engine marks as nobody's (a driver's), and with no session before the cut-off to join, the run
 * sheet said "Driver, on pulling in" for a plug-in the crew made. It keeps the plan followed's.
 */
function pluggedAsFollowed(
  previous: PlanResult,
  next: PlanResult['sessions'],
  plugged: Record<string, string>,
  firstNew: number,
): PlanResult['sessions'] {
  return next.map((s) => {
    if (plugged[s.bus] !== s.charger || Date.parse(s.start) !== firstNew) return s;
    const was = previous.sessions.find(
      (p) => p.bus === s.bus && p.charger === s.charger && Date.parse(p.end) > firstNew,
    );
    const startMove = was?.startMove ?? 'crew';
    return startMove === s.startMove ? s : { ...s, startMove };
  });
}

/**
 * A bus whose session the cut-off ends (the plan followed had it on a charger there), put back on
 * the same charger by the re-plan a little later with nothing else on that charger in between and
 * the bus at the depot throughout: it stays plugged in (no charging in the gap), one session. The
 * engine took it as unplugged (nobody confirmed its plug-in), so the crew was told to unplug it and
 * plug it back in 15 minutes later: two high-voltage handlings for nothing.
 */
export function staysPluggedIn(
  sessions: PlanResult['sessions'],
  scenario: Pick<Scenario, 'buses' | 'timezone' | 'slotMinutes'>,
  firstNew: number,
): PlanResult['sessions'] {
  const slotMs = scenario.slotMinutes * 60_000;
  const out = sessions.map((s) => ({ ...s, kw: [...s.kw] }));
  const stayOf = (bus: string, from: number, to: number) =>
    scenario.buses
      .find((b) => b.id === bus)
      ?.stays.some(
        (st) =>
          localToMillis(st.arrive, scenario.timezone)! <= from && to <= localToMillis(st.depart, scenario.timezone)!,
      ) ?? false;
  for (let i = 0; i < out.length; i++) {
    const a = out[i]!;
    const aEnd = Date.parse(a.end);
    if (aEnd !== firstNew || Date.parse(a.start) >= firstNew) continue;
    const b = out.find((x) => x !== a && x.bus === a.bus && x.charger === a.charger && Date.parse(x.start) >= firstNew);
    if (!b) continue;
    const bStart = Date.parse(b.start);
    const between = (x: PlanResult['sessions'][number]) =>
      x !== a && x !== b && Date.parse(x.start) < bStart && Date.parse(x.end) > aEnd;
    // The charger idle in between, and the bus on no other charger then and at the depot throughout.
    if (out.some((x) => (x.charger === a.charger || x.bus === a.bus) && between(x))) continue;
    if (!stayOf(a.bus, Date.parse(a.start), Date.parse(b.end))) continue;
    const gap = Math.round((bStart - aEnd) / slotMs);
    a.kw.push(...Array<number>(gap).fill(0), ...b.kw);
    a.kwh = Math.round((a.kwh + b.kwh) * 1e6) / 1e6;
    a.end = b.end;
    if (b.endMove) a.endMove = b.endMove;
    out.splice(out.indexOf(b), 1);
  }
  return out;
}

/** Out-of-service spans with those of one charger that meet (the cut-off's two sides) made one. */
function joinSpans(spans: NonNullable<PlanResult['outOfService']>): NonNullable<PlanResult['outOfService']> {
  const out: NonNullable<PlanResult['outOfService']> = [];
  for (const s of [...spans].sort(
    (a, b) => a.charger.localeCompare(b.charger) || Date.parse(a.from) - Date.parse(b.from),
  )) {
    const last = out.at(-1);
    if (last?.charger === s.charger && Date.parse(s.from) <= Date.parse(last.to)) {
      if (Date.parse(s.to) > Date.parse(last.to)) last.to = s.to;
    } else out.push({ ...s });
  }
  return out;
}

/**
 * The engine gives a kept session the end of its last whole slot; a session the previous plan
 * stopped inside a slot (see `stopSessions`) keeps that earlier end, so a later re-plan does not
 * put the bus back on the charger until the slot's end.
 */
function keptAsBefore(previous: PlanResult, kept: PlanResult['sessions']): PlanResult['sessions'] {
  return kept.map((k) => {
    const was = previous.sessions.find(
      (s) => s.bus === k.bus && s.charger === k.charger && Date.parse(s.start) === Date.parse(k.start),
    );
    return was && Date.parse(was.end) < Date.parse(k.end) ? { ...k, end: was.end } : k;
  });
}

/** Sessions to stop: on `charger` (of `bus` only, when given; of the session starting `start`, when given) from `at` on. */
export interface SessionStop {
  charger: string;
  bus?: string;
  start?: string;
  at: Date;
}

/**
 * The plan followed, with charging stopped at an instant: a charger reported out of service at
 * 23:07 delivers nothing after 23:07; a connect that did not happen delivered nothing at all.
 *
 * Why not a partial first slot in the re-plan: the engine's model is whole 15-minute slots (prices,
 * peaks, charger profiles), and a shorter first slot would change every part of it for at most
 * 14 minutes of charging, which moving a bus to another charger takes anyway. So the current
 * slot's remainder is no-charge on the stopped charger: the session ends at the instant itself and
 * its last slot's kW is that slot's average (energy delivered before the instant only). The
 * engine, handed this plan as the one followed, then counts exactly that energy into the bus and
 * the peaks, and plans the bus (elsewhere) from the next slot boundary.
 */
export function stopSessions(
  previous: PlanResult,
  stops: readonly SessionStop[],
  zone: string,
  slotMinutes = 15,
): PlanResult {
  if (!stops.length) return previous;
  const slotMs = slotMinutes * 60_000;
  const removed = new Map<number, number>();
  const sessions: PlanResult['sessions'] = [];
  for (const s of previous.sessions) {
    const start = Date.parse(s.start);
    const stop = stops.find(
      (x) =>
        x.charger === s.charger &&
        (x.bus === undefined || x.bus === s.bus) &&
        (x.start === undefined || Date.parse(x.start) === start) &&
        x.at.getTime() < Date.parse(s.end),
    );
    if (!stop) {
      sessions.push(s);
      continue;
    }
    const at = Math.max(stop.at.getTime(), start);
    const kw = s.kw.map((v, k) => {
      const from = start + k * slotMs;
      const share = Math.min(1, Math.max(0, (at - from) / slotMs));
      const kept = v * share;
      removed.set(from, (removed.get(from) ?? 0) + v - kept);
      return kept;
    });
    const whole = Math.ceil((at - start) / slotMs);
    if (whole === 0) continue;
    const cut = kw.slice(0, whole);
    sessions.push({
      ...s,
      end: DateTime.fromMillis(at, { zone }).toISO()!,
      kw: cut,
      kwh: Math.round(cut.reduce((a, v) => a + (v * slotMinutes) / 60, 0) * 1e6) / 1e6,
    });
  }
  return {
    ...previous,
    sessions,
    slots: previous.slots.map((sl) => {
      const less = removed.get(Date.parse(sl.start));
      return less ? { ...sl, loadKw: Math.max(0, Math.round((sl.loadKw - less) * 1e6) / 1e6) } : sl;
    }),
  };
}

/**
 * A charger reported out is out from the report, where its charging was stopped (`stopSessions`),
 * not from the re-plan's first quarter-hour: the timeline and Compare say 22:49, as the Yard does,
 * not 23:00.
 */
export function outFromReport(whole: PlanResult, charger: string, at: Date, zone: string): PlanResult {
  const from = Date.parse(whole.replan?.from ?? '');
  return {
    ...whole,
    outOfService: (whole.outOfService ?? []).map((o) =>
      o.charger === charger && Date.parse(o.from) === from
        ? { ...o, from: DateTime.fromJSDate(at, { zone }).toISO()! }
        : o,
    ),
  };
}

/** A state of charge the yard read tonight, kept for the re-plans after it. */
export interface SocReading {
  kwh: number;
  /** ISO instant of the reading (the re-plan's cut-off it was made at). */
  at: string;
}

/**
 * A bus's energy at a later cut-off from a reading taken earlier in the same stay: the reading plus
 * what the plan followed delivered to it since. A re-plan otherwise works the energy out from the
 * scenario's arrival estimate, so each re-plan after a reading forgot it. Null when the bus has left
 * the depot since (its next arrival is the scenario's business again) or the reading is not in a stay.
 */
export function energySinceReading(
  scenario: Pick<Scenario, 'buses' | 'efficiency' | 'slotMinutes'>,
  followed: Pick<PlanResult, 'sessions'>,
  bus: string,
  reading: SocReading,
  cutMs: number,
  zone: string,
): number | null {
  const readMs = Date.parse(reading.at);
  const stays = scenario.buses.find((b) => b.id === bus)?.stays ?? [];
  const stay = stays.find((s) => localToMillis(s.arrive, zone)! <= readMs && readMs < localToMillis(s.depart, zone)!);
  if (!stay || cutMs < readMs || cutMs >= localToMillis(stay.depart, zone)!) return null;
  const slotMs = scenario.slotMinutes * 60_000;
  let kwh = reading.kwh;
  for (const s of followed.sessions) {
    if (s.bus !== bus) continue;
    const start = Date.parse(s.start);
    s.kw.forEach((kw, k) => {
      const from = start + k * slotMs;
      const overlap = Math.max(0, Math.min(from + slotMs, cutMs) - Math.max(from, readMs));
      kwh += scenario.efficiency * kw * (overlap / 3_600_000);
    });
  }
  return kwh;
}

/**
 * The energy at a cut-off of each bus read tonight (`energySinceReading`, to the hundredth), and
 * the readings that still stand: one whose bus has left the depot since is dropped.
 */
export function readingsAtCutOff(
  scenario: Pick<Scenario, 'buses' | 'efficiency' | 'slotMinutes'>,
  followed: Pick<PlanResult, 'sessions'>,
  readings: Record<string, SocReading>,
  cutMs: number,
  zone: string,
): { energyKwh: Record<string, number>; standing: Record<string, SocReading> } {
  const energyKwh: Record<string, number> = {};
  const standing: Record<string, SocReading> = {};
  for (const [bus, reading] of Object.entries(readings)) {
    const kwh = energySinceReading(scenario, followed, bus, reading, cutMs, zone);
    if (kwh === null) continue;
    energyKwh[bus] = Math.round(kwh * 100) / 100;
    standing[bus] = reading;
  }
  return { energyKwh, standing };
}
