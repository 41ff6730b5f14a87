import { initialAssignment, type Assignment, type AssignmentHints } from './assignment.js';
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

/** The candidates, each made one the crew can carry out (names for `stats.construction`). */
export function crewNightCandidates(problem: Problem, hints: AssignmentHints): [string, Assignment][] {
  const load = hints.weight;
  const energy = hints.energy;
  const out: [string, () => Assignment][] = [
    [
      'crew-sequence-best-least-cut',
      () => initialAssignment(problem, { ...hints, order: 'best', handover: 'least-cut' }),
    ],
    ['crew-sequence-best-share', () => initialAssignment(problem, { ...hints, order: 'best', handover: 'share' })],
    ['crew-sweep-strong-deadline', () => sweepAssignment(problem, { load, energy, pick: 'strong', order: 'deadline' })],
    ['crew-sweep-fit-slack', () => sweepAssignment(problem, { load, energy, pick: 'fit', order: 'slack' })],
  ];
  return out.map(([name, make]) => [name, fitCrew(problem, make(), energy)]);
}
