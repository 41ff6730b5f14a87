import type { Plan } from './plan.js';
import type { Problem } from './problem.js';

// The plan a new one is made against (stable.ts keeps it wherever it can): a re-plan's plan being
// carried out, or a regeneration's published plan. Its sessions become windows of the new
// problem's stays; the buses whose charging differs are "moved".

/** The previous plan's charger and window of each stay, from the cut-off on. */
export function previousWindows(problem: Problem, previous: Plan) {
  const n = problem.stays.length;
  const chargerOf = new Int32Array(n).fill(-1);
  const from = new Int32Array(n);
  const to = new Int32Array(n);
  const slotMs = problem.slots[0]!.endMs - problem.slots[0]!.startMs;
  const startMs = problem.slots[0]!.startMs;
  const chargerIndex = new Map(problem.chargers.map((c) => [c.id, c.index]));
  const busIndex = new Map(problem.buses.map((b) => [b.id, b]));
  for (const s of previous.sessions) {
    const bus = busIndex.get(s.bus);
    const c = chargerIndex.get(s.charger);
    if (!bus || c === undefined) continue;
    const a = Math.max(0, Math.round((Date.parse(s.start) - startMs) / slotMs));
    const b = Math.min(problem.slotCount, Math.round((Date.parse(s.end) - startMs) / slotMs));
    if (b <= a) continue;
    const stay = bus.stays.find((st) => st.arriveSlot < b && a < st.departSlot);
    if (!stay) continue;
    // One window per stay: the longest session of the stay from the cut-off on.
    if (chargerOf[stay.id]! >= 0 && to[stay.id]! - from[stay.id]! >= b - a) continue;
    chargerOf[stay.id] = c;
    from[stay.id] = Math.max(a, stay.arriveSlot);
    to[stay.id] = Math.min(b, stay.departSlot);
  }
  // What it left short, for the buses still to plan (a bus's later shortfall counts from the cut-off).
  let shortfallKwh = 0;
  for (const b of previous.buses) if (busIndex.has(b.id)) shortfallKwh += b.shortfallKwh;
  return { chargerOf, from, to, shortfallKwh };
}

/** Buses whose sessions from the problem's first slot on differ between the two plans (sorted). */
export function changedBuses(problem: Problem, previous: Plan, plan: Plan): string[] {
  const cutMs = problem.slots[0]!.startMs;
  const key = (p: Plan, bus: string) =>
    p.sessions
      .filter((s) => s.bus === bus && Date.parse(s.end) > cutMs)
      .map((s) => `${s.charger}@${Math.max(Date.parse(s.start), cutMs)}-${Date.parse(s.end)}`)
      .join(',');
  return problem.buses
    .map((b) => b.id)
    .filter((id) => key(previous, id) !== key(plan, id))
    .sort();
}

/**
 * Why `subject` was not kept, in words: shortfall first, in kWh ("… could not be kept:
 * keeping it would leave buses 24.7 kWh short that a new plan delivers"), else the cost against the tolerance ("… could not
 * be kept within the depot's cost tolerance (keeping it: $21.54 more, where $5.00 is allowed)").
 */
export function notKeptWhy(subject: string, refused: Plan['previousRefused'], currency: string): string {
  const money = (v: number) => new Intl.NumberFormat('en-US', { style: 'currency', currency }).format(v);
  const dearer = refused && refused.extraCost >= 0.005 ? refused.extraCost : 0;
  const short = refused && refused.extraShortKwh >= 0.05 ? refused.extraShortKwh : 0;
  // Shortfall first, in kWh: full service comes before the cost tolerance, which is in money.
  if (short > 0)
    return `${subject} could not be kept: keeping it would leave buses ${short.toFixed(1)} kWh short that a new plan delivers${dearer ? `, and cost ${money(dearer)} more, where ${money(refused!.allowed)} is allowed` : ''}`;
  const why = dearer ? ` (keeping it: ${money(dearer)} more, where ${money(refused!.allowed)} is allowed)` : '';
  return `${subject} could not be kept within the depot's cost tolerance${why}`;
}

/**
 * A regeneration's moved buses and why: the night planned again (new data, or asked again) against
 * the plan published for it, kept wherever it still fits within the depot's tolerance.
 */
export function regeneratedMoved(problem: Problem, previous: Plan, plan: Plan, currency: string) {
  const buses = changedBuses(problem, previous, plan);
  const reasons: string[] = [];
  const n = buses.length;
  const were = n === 1 ? 'bus' : 'buses';
  if (n > 0 && plan.keptPrevious)
    reasons.push(`the night's data changed or a change keeps the cost down; every other bus keeps the published plan`);
  else if (n > 0)
    reasons.push(
      `${notKeptWhy('the published plan', plan.previousRefused, currency)}: the night was planned afresh (${n} ${were} changed)`,
    );
  return { buses, reasons };
}
