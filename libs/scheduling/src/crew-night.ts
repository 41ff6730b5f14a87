import { arrangeCharger, initialAssignment, type Assignment, type AssignmentHints } from './assignment.js';
import { fitCrew } from './crew.js';
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
  return out.map(([name, make]) => [name, fitCrew(problem, make(), energy)]);
}
