import type { Assignment } from '../assignment.js';
import type { Plan } from '../plan.js';
import type { Problem } from '../problem.js';

/**
 * A plan's sessions as an assignment of the exact model (one session per stay), e.g. to give the
 * MILP the plan as its first solution in the tests and benches that check plans against it.
 */
export function assignmentOfPlan(problem: Problem, plan: Plan): Assignment {
  const n = problem.stays.length;
  const out: Assignment = {
    chargerOf: new Int32Array(n).fill(-1),
    from: new Int32Array(n),
    to: new Int32Array(n),
    sequence: problem.chargers.map(() => []),
  };
  const t0 = problem.slots[0]!.startMs;
  const slotMs = problem.slots[0]!.endMs - t0;
  for (const s of plan.sessions) {
    const bus = problem.buses.find((b) => b.id === s.bus)!;
    const from = Math.round((Date.parse(s.start) - t0) / slotMs);
    const stay = bus.stays.find((st) => st.arriveSlot <= from && from < st.departSlot)!;
    const c = problem.chargers.findIndex((ch) => ch.id === s.charger);
    out.chargerOf[stay.id] = c;
    out.from[stay.id] = from;
    out.to[stay.id] = Math.round((Date.parse(s.end) - t0) / slotMs);
    out.sequence[c]!.push(stay.id);
  }
  return out;
}
