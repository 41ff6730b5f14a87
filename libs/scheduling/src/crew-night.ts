import {
  arrangeCharger,
  cloneAssignment,
  initialAssignment,
  leastLostHandover,
  layoutScore,
  permutations,
  type Assignment,
  type AssignmentHints,
} from './assignment.js';
import { fitCrew, minWindow, pinStays } from './crew.js';
import { cheaper, type LpResult } from './highs-solver.js';
import type { AssignedModel } from './local-search.js';
import type { Problem } from './problem.js';
import { sweepAssignment } from './sweep.js';

// Stage-1 candidates that follow the crew-aware bound (crew-bound.ts) instead of the plain
// relaxation. The plain relaxation spreads the crew-less night over every bus, so its powers
// say little about who should hold a charger through it; the crew-aware bound's powers keep one
// bus per charger there, the others charging before (the evening) or after (the early morning).
// Ordered by where their charging lies, each charger's stays come out as the crew's night is:
// an evening sequence, the bus that holds the charger through the gap, a morning sequence.

/** Hints (energy per stay, power, load, service-order centre) from a bound's powers. */
export function hintsFrom(problem: Problem, base: AssignmentHints, power: Float64Array[]): AssignmentHints {
  const dt = problem.slotHours;
  const hints: AssignmentHints = {
    ...base,
    energy: new Float64Array(problem.stays.length),
    weight: new Float64Array(problem.slotCount),
    power,
    centre: new Float64Array(problem.stays.length),
  };
  for (const stay of problem.stays) {
    let e = 0;
    let m = 0;
    for (let t = stay.arriveSlot; t < stay.departSlot; t++) {
      e += power[stay.bus]![t]! * dt;
      m += power[stay.bus]![t]! * dt * (t + 0.5);
    }
    hints.energy[stay.id] = e;
    hints.centre[stay.id] = e > 1e-9 ? m / e : (stay.arriveSlot + stay.departSlot) / 2;
  }
  for (const p of power) for (let t = 0; t < problem.slotCount; t++) hints.weight[t] = hints.weight[t]! + p[t]!;
  return hints;
}

/**
 * Each charger's night as the bound has it: the stay holding it through the crew-less stretch
 * (`holders`), then the other stays in the evening or the morning by where the bound charges
 * them, each to the charger with the least work per kW in that part of the night so far
 * (`by: 'kw'`) or the fewest stays (`by: 'count'`); hand-overs laid out by the bound's powers.
 */
export function holderAssignment(
  problem: Problem,
  hints: AssignmentHints,
  holders: Int32Array,
  stretch: [number, number],
  by: 'kw' | 'count',
  night = false,
): Assignment {
  const C = problem.chargers.length;
  const n = problem.stays.length;
  const a: Assignment = {
    chargerOf: new Int32Array(n).fill(-1),
    from: new Int32Array(n),
    to: new Int32Array(n),
    sequence: problem.chargers.map((): number[] => []),
  };
  const dt = problem.slotHours;
  const work = [new Float64Array(C), new Float64Array(C)];
  const count = [new Int32Array(C), new Int32Array(C)];
  const rest: { id: number; part: 0 | 1; kwh: number }[] = [];
  for (const s of problem.stays) {
    if (s.departSlot <= s.arriveSlot) continue;
    const h = holders[s.id]!;
    if (h >= 0) {
      a.chargerOf[s.id] = h;
      a.sequence[h]!.push(s.id);
      continue;
    }
    let before = 0;
    let after = 0;
    const p = hints.power[s.bus]!;
    for (let t = s.arriveSlot; t < s.departSlot; t++) {
      if (t < stretch[0]) before += p[t]! * dt;
      else if (t > stretch[1]) after += p[t]! * dt;
    }
    if (before + after <= 1e-6) continue;
    rest.push({ id: s.id, part: before >= after ? 0 : 1, kwh: before + after });
  }
  // Most energy first, so the big ones spread over the chargers.
  rest.sort((x, y) => y.kwh - x.kwh || x.id - y.id);
  for (const r of rest) {
    const s = problem.stays[r.id]!;
    let best = -1;
    let bestKey = Infinity;
    for (const c of problem.chargers) {
      if (!c.available[Math.min(s.arriveSlot, problem.slotCount - 1)]) continue;
      const kw = Math.min(c.maxKw, problem.buses[s.bus]!.maxKw);
      if (kw <= 0) continue;
      const key =
        by === 'kw'
          ? (work[r.part]![c.index]! + r.kwh) / kw
          : count[r.part]![c.index]! * 1e6 + (work[r.part]![c.index]! + r.kwh) / kw;
      if (key < bestKey - 1e-9) {
        bestKey = key;
        best = c.index;
      }
    }
    if (best < 0) continue;
    work[r.part]![best] = work[r.part]![best]! + r.kwh;
    count[r.part]![best] = count[r.part]![best]! + 1;
    a.chargerOf[r.id] = best;
    a.sequence[best]!.push(r.id);
  }
  const arrange: AssignmentHints = { ...hints, order: 'best', handover: 'least-cut' };
  for (let c = 0; c < C; c++) {
    if (night) {
      for (const id of a.sequence[c]!) {
        a.from[id] = problem.stays[id]!.arriveSlot;
        a.to[id] = problem.stays[id]!.departSlot;
      }
      arrangeNight(problem, hints, a, c, stretch);
      continue;
    }
    a.sequence[c]!.sort((x, y) => hints.centre[x]! - hints.centre[y]! || x - y);
    for (const id of a.sequence[c]!) {
      a.from[id] = problem.stays[id]!.arriveSlot;
      a.to[id] = problem.stays[id]!.departSlot;
    }
    arrangeCharger(problem, arrange, a, c);
  }
  return a;
}

/** The candidates, each made one the crew can carry out (names for `stats.construction`). */
export function crewNightCandidates(
  problem: Problem,
  hints: AssignmentHints,
  holders: Int32Array | null = null,
  stretch: [number, number] | null = null,
): [string, Assignment][] {
  const load = hints.weight;
  const energy = hints.energy;
  const out: [string, () => Assignment][] = [];
  if (holders && stretch)
    out.push(
      ['crew-holders-kw', () => holderAssignment(problem, hints, holders, stretch, 'kw')],
      ['crew-holders-count', () => holderAssignment(problem, hints, holders, stretch, 'count')],
      ['crew-holders-kw-night', () => holderAssignment(problem, hints, holders, stretch, 'kw', true)],
      ['crew-holders-count-night', () => holderAssignment(problem, hints, holders, stretch, 'count', true)],
    );
  out.push(
    [
      'crew-sequence-best-least-cut',
      () => initialAssignment(problem, { ...hints, order: 'best', handover: 'least-cut' }),
    ],
    ['crew-sequence-best-share', () => initialAssignment(problem, { ...hints, order: 'best', handover: 'share' })],
    ['crew-sweep-strong-deadline', () => sweepAssignment(problem, { load, energy, pick: 'strong', order: 'deadline' })],
    ['crew-sweep-fit-slack', () => sweepAssignment(problem, { load, energy, pick: 'fit', order: 'slack' })],
  );
  // Re-planning, buses already plugged in stay where they are (the layouts know nothing of them).
  return out.map(([name, make]) => [name, fitCrew(problem, pinStays(problem, make()), energy)]);
}

/**
 * A charger's night with a holder: the evening stays in `order` before it, the holder through
 * the crew-less stretch, the morning stays after it. Each hand-over falls where it cuts least of
 * the hints' charging (as `layoutCharger` with 'least-cut'), but the one onto the holder at the
 * stretch's first slot at the latest and the one off it after the stretch; the evening stays
 * share the time up to the stretch, the morning ones the time after it.
 */
export function layoutNight(
  problem: Problem,
  hints: AssignmentHints,
  a: Assignment,
  order: number[],
  holderAt: number,
  stretch: [number, number],
): void {
  const T = problem.slotCount;
  const dt = problem.slotHours;
  const st = problem.stays;
  const w = hints.weight;
  const prefix = new Float64Array(T + 1);
  for (let t = 0; t < T; t++) prefix[t + 1] = prefix[t]! + w[t]! + 1e-6;
  const cap = (x: number, y: number) => (y > x ? prefix[y]! - prefix[x]! : 0);
  const n = order.length;
  // The holder's charging in the hints before and after the stretch (its share of those parts).
  const part = (id: number, side: 'before' | 'after') => {
    const s = st[id]!;
    const p = hints.power[s.bus]!;
    let e = 0;
    for (let t = s.arriveSlot; t < s.departSlot; t++)
      if (side === 'before' ? t < stretch[0] : t > stretch[1]) e += p[t]! * dt;
    return e;
  };
  const want = order.map((id, i) => (i === holderAt ? 0 : hints.energy[id]!));
  const holder = order[holderAt]!;
  const kwOf = (id: number) =>
    Math.min(problem.buses[st[id]!.bus]!.maxKw, problem.chargers[a.chargerOf[holder]!]!.maxKw);
  // Slots at full power the stay at position j needs (0 for the holder).
  const need = (j: number) => (j === holderAt ? 0 : Math.ceil(want[j]! / (kwOf(order[j]!) * dt) - 1e-9));
  const holderBefore = part(holder, 'before');
  const holderAfter = part(holder, 'after');
  const lastEnd = st[order[n - 1]!]!.departSlot;
  let start = st[order[0]!]!.arriveSlot;
  for (let i = 0; i < n; i++) {
    const s = st[order[i]!]!;
    start = Math.max(start, s.arriveSlot);
    if (i === n - 1) {
      a.from[s.id] = Math.min(start, s.departSlot);
      a.to[s.id] = s.departSlot;
      break;
    }
    const next = st[order[i + 1]!]!;
    const evening = i < holderAt;
    let remaining = 1e-3;
    if (evening) {
      for (let j = i; j < holderAt; j++) remaining += want[j]! + 1e-3;
      remaining += holderBefore;
    } else {
      for (let j = i; j < n; j++) remaining += (j === holderAt ? holderAfter : want[j]!) + 1e-3;
    }
    const mine = (i === holderAt ? holderAfter : want[i]!) + 1e-3;
    const spanEnd = evening ? stretch[0] : lastEnd;
    const target = cap(start, spanEnd) * (mine / remaining);
    let h = start;
    while (h < T && cap(start, h) < target) h++;
    let lo = Math.max(start, Math.min(next.arriveSlot, s.departSlot));
    let hi = Math.min(Math.max(s.departSlot, next.arriveSlot), Math.max(next.departSlot - 1, lo));
    // The evening stays after this one (and their needs) must still fit before the stretch.
    let later = 0;
    let laterNeed = 0;
    for (let j = i + 1; j < holderAt; j++) {
      later += minWindow(problem, st[order[j]!]!);
      laterNeed += Math.max(minWindow(problem, st[order[j]!]!), need(j));
    }
    if (evening) {
      hi = Math.min(hi, stretch[0] - later);
      lo = Math.min(lo, hi);
    }
    if (i === holderAt) {
      lo = Math.max(lo, stretch[1] + 1);
      hi = Math.max(hi, lo);
    }
    const needA = i === holderAt ? 0 : need(i);
    const lo2 = Math.max(lo, start + needA);
    const hi2 = evening ? Math.min(hi, stretch[0] - laterNeed) : Math.min(hi, next.departSlot - need(i + 1));
    if (lo2 <= hi2) {
      lo = lo2;
      hi = hi2;
    }
    h = leastLostHandover(hints.power, s, next, lo, hi, Math.min(Math.max(h, lo), hi), T);
    a.from[s.id] = Math.min(start, s.departSlot);
    a.to[s.id] = Math.max(Math.min(h, s.departSlot), a.from[s.id]!);
    start = Math.max(h, next.arriveSlot);
  }
  a.sequence[a.chargerOf[holder]!] = order.slice();
}

/**
 * Lays out one charger's stays as a night with a holder (see `layoutNight`): the holder is the
 * stay the hints charge most in the stretch (none: `arrangeCharger`), the others in the evening
 * or the morning by where the hints charge them; orders tried (every order of up to 4 stays,
 * else by arrival, by the hints' centre and by departure), the one whose windows hold the stays'
 * energy best kept.
 */
export function arrangeNight(
  problem: Problem,
  hints: AssignmentHints,
  a: Assignment,
  c: number,
  stretch: [number, number],
): void {
  const st = problem.stays;
  const seq = a.sequence[c]!;
  const dt = problem.slotHours;
  const inStretch = (id: number) => {
    const s = st[id]!;
    if (s.arriveSlot > stretch[0] || s.departSlot <= stretch[1]) return -1;
    let e = 0;
    for (let t = stretch[0]; t <= stretch[1]; t++) e += hints.power[s.bus]![t]! * dt;
    return e;
  };
  let holder = -1;
  let most = 1e-6;
  for (const id of seq) {
    const e = inStretch(id);
    if (e > most) {
      most = e;
      holder = id;
    }
  }
  if (holder < 0) {
    arrangeCharger(problem, { ...hints, order: 'best', handover: 'least-cut' }, a, c);
    return;
  }
  const evening: number[] = [];
  const morning: number[] = [];
  for (const id of seq) {
    if (id === holder) continue;
    const s = st[id]!;
    const p = hints.power[s.bus]!;
    let before = 0;
    let after = 0;
    for (let t = s.arriveSlot; t < s.departSlot; t++) {
      if (t < stretch[0]) before += p[t]!;
      else if (t > stretch[1]) after += p[t]!;
    }
    const roomBefore = stretch[0] - s.arriveSlot;
    const roomAfter = s.departSlot - stretch[1] - 1;
    if (roomAfter <= 0 || (roomBefore > 0 && (before > after || (before === after && roomBefore >= roomAfter))))
      evening.push(id);
    else morning.push(id);
  }
  const orders = (xs: number[]) =>
    xs.length <= 4
      ? permutations(xs)
      : [
          xs.slice().sort((x, y) => st[x]!.arriveSlot - st[y]!.arriveSlot || x - y),
          xs.slice().sort((x, y) => hints.centre[x]! - hints.centre[y]! || x - y),
          xs.slice().sort((x, y) => st[x]!.departSlot - st[y]!.departSlot || x - y),
        ];
  let best: number[] | null = null;
  let bestScore = Infinity;
  for (const e of orders(evening))
    for (const m of orders(morning)) {
      const order = [...e, holder, ...m];
      layoutNight(problem, hints, a, order, e.length, stretch);
      const score = layoutScore(problem, hints, a, c);
      if (score < bestScore - 1e-9) {
        bestScore = score;
        best = order;
      }
    }
  layoutNight(problem, hints, a, best!, evening.length, stretch);
}

/**
 * Moves the hand-overs between stays that follow each other on a charger, the unplug and the
 * plug-in together: one by one or two slots either way, or a run of neighbouring ones by one
 * slot together (an evening sequence all a slot earlier: each single move costs more first),
 * the crew's rules kept (`fitCrew`); the first change the LP finds cheaper is kept, and the
 * sweep starts again. The layouts above place hand-overs by the bound's powers; a slot either
 * way decides the demand charge (8 on 2, seed 3: the same windows one slot apart cost 722.21
 * against 658.39). Counted: at most `maxSolves` LP solves.
 */
export function polishHandovers(
  problem: Problem,
  live: AssignedModel,
  start: Assignment,
  first: LpResult,
  energy: Float64Array,
  maxSolves: number,
): { assignment: Assignment; result: LpResult; solves: number } {
  const all = problem.buses.map((b) => b.index);
  let best = cloneAssignment(start);
  let bestRes = first;
  let solves = 0;
  const same = (x: Assignment, y: Assignment) =>
    x.chargerOf.every((c, i) => c === y.chargerOf[i] && x.from[i] === y.from[i] && x.to[i] === y.to[i]);
  let improved = true;
  while (improved && solves < maxSolves) {
    improved = false;
    for (let c = 0; c < problem.chargers.length && solves < maxSolves; c++) {
      const seq = best.sequence[c]!;
      // Hand-overs i..j (between seq[m] and seq[m + 1]) moved together by delta.
      const trials: [number, number, number][] = [];
      for (let i = 0; i + 1 < seq.length; i++) {
        for (const delta of [-1, 1, -2, 2]) trials.push([i, i, delta]);
        for (let j = i + 1; j + 1 < seq.length; j++) for (const delta of [-1, 1]) trials.push([i, j, delta]);
      }
      for (const [i, j, delta] of trials) {
        if (solves >= maxSolves) break;
        const trial = cloneAssignment(best);
        let ok = true;
        for (let m = i; m <= j && ok; m++) {
          const p = seq[m]!;
          const s = seq[m + 1]!;
          const ps = problem.stays[p]!;
          const ss = problem.stays[s]!;
          trial.to[p] = Math.min(ps.departSlot, Math.max(trial.from[p]! + 1, trial.to[p]! + delta));
          trial.from[s] = Math.max(ss.arriveSlot, Math.min(trial.to[s]! - 1, trial.from[s]! + delta));
          if (trial.from[s]! < trial.to[p]!) ok = false;
        }
        if (!ok) continue;
        fitCrew(problem, trial, energy);
        if (same(trial, best)) continue;
        solves++;
        live.update(trial, all);
        const res = live.solve();
        if (res.status === 'optimal' && cheaper(res.objective, bestRes.objective)) {
          best = trial;
          bestRes = res;
          improved = true;
          break;
        }
      }
    }
  }
  live.update(best, all);
  const final = live.solve();
  return { assignment: best, result: final.status === 'optimal' ? final : bestRes, solves };
}
