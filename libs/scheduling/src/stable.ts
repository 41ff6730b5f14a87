import type { Assignment } from './assignment.js';
import { fitCrew } from './crew.js';
import type { Problem } from './problem.js';

// Stable re-plans: a re-plan keeps every session of the plan being carried out that it still can
// (same bus, same charger, same window from the cut-off on) and finds places only for the stays it
// must: those on a charger now out of service, or with no session before. Each such stay goes
// into the largest idle stretch of a charger that is free while the bus is there, so no other
// bus moves; the LP then sets the power. The engine takes this plan when it costs at most the
// tolerance more than the best it finds otherwise.

/** The plan being carried out, kept; null when there is none to keep. */
export function keptAssignment(problem: Problem, energy: Float64Array): Assignment | null {
  const prev = problem.previous;
  if (!prev) return null;
  const n = problem.stays.length;
  const C = problem.chargers.length;
  const out: Assignment = {
    chargerOf: new Int32Array(n).fill(-1),
    from: new Int32Array(n),
    to: new Int32Array(n),
    sequence: problem.chargers.map(() => []),
  };
  const busy = problem.chargers.map(() => new Uint8Array(problem.slotCount));
  const open: number[] = [];
  for (const stay of problem.stays) {
    const c = prev.chargerOf[stay.id]!;
    const from = Math.max(stay.arriveSlot, prev.from[stay.id]!);
    const to = Math.min(stay.departSlot, prev.to[stay.id]!);
    if (c >= 0 && to > from && problem.chargers[c]!.available[from]) {
      out.chargerOf[stay.id] = c;
      out.from[stay.id] = from;
      out.to[stay.id] = to;
      for (let t = from; t < to; t++) busy[c]![t] = 1;
    } else if (energy[stay.id]! > 1e-6 && stay.departSlot > stay.arriveSlot) open.push(stay.id);
  }
  // Stays that need a place, those needing most first.
  open.sort((x, y) => energy[y]! - energy[x]! || x - y);
  for (const id of open) {
    const stay = problem.stays[id]!;
    let best: { c: number; from: number; to: number; kwh: number } | null = null;
    for (let c = 0; c < C; c++) {
      const ch = problem.chargers[c]!;
      const kw = Math.min(ch.maxKw, problem.buses[stay.bus]!.maxKw);
      let t = stay.arriveSlot;
      while (t < stay.departSlot) {
        if (busy[c]![t] || !ch.available[t]) {
          t++;
          continue;
        }
        let u = t;
        while (u < stay.departSlot && !busy[c]![u] && ch.available[u]) u++;
        const kwh = Math.min(energy[id]!, kw * problem.slotHours * (u - t));
        if (!best || kwh > best.kwh + 1e-9) best = { c, from: t, to: u, kwh };
        t = u;
      }
    }
    if (!best) continue;
    out.chargerOf[id] = best.c;
    out.from[id] = best.from;
    out.to[id] = best.to;
    for (let t = best.from; t < best.to; t++) busy[best.c]![t] = 1;
  }
  for (const stay of problem.stays) {
    const c = out.chargerOf[stay.id]!;
    if (c >= 0) out.sequence[c]!.push(stay.id);
  }
  for (const seq of out.sequence) seq.sort((x, y) => out.from[x]! - out.from[y]! || x - y);
  return fitCrew(problem, out, energy);
}
