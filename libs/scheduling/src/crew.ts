import type { Assignment } from './assignment.js';
import type { Problem, Stay } from './problem.js';

// The yard crew (scenario extension `yard`): every plug-in and unplug is a person walking to a
// bus. A session lasts at least the minimum plug-in (or the whole stay when the stay is
// shorter); with drivers plugging in, a session that starts in the stay's first slot or ends
// with the stay needs no crew at that end; every other plug-in or unplug is a crew move, allowed
// only in slots inside a crew window and at most so many per slot. A move at time T counts in the
// slot that starts at T (an unplug at the end of slot t-1 counts in slot t).

export type Move = 'driver' | 'crew';

/** Is a plug-in of this stay at slot f done without the crew? */
export function startIsFree(problem: Problem, stay: Stay, f: number): boolean {
  if (f !== stay.arriveSlot) return false;
  if (problem.pinned && problem.pinned[stay.id]! >= 0) return true; // already on its charger
  if (problem.arrivedEarlier?.[stay.id]) return false;
  return problem.yard ? problem.yard.driversPlugIn : true;
}

/** Is an unplug of this stay at slot t (the end of slot t-1) done without the crew? */
export function endIsFree(problem: Problem, stay: Stay, t: number): boolean {
  if (t >= problem.slotCount) return true; // after the horizon: not part of this plan
  if (t !== stay.departSlot) return false;
  return problem.yard ? problem.yard.driversPlugIn : true;
}

/** Shortest window a stay may get, in slots (the whole stay when it is shorter than the minimum). */
export function minWindow(problem: Problem, stay: Stay): number {
  // Already plugged in at a re-plan's start: its plug-in was earlier, the minimum is behind it.
  if (problem.pinned && problem.pinned[stay.id]! >= 0) return 1;
  const len = stay.departSlot - stay.arriveSlot;
  const min = problem.yard?.minSlots ?? 0;
  return Math.max(1, len < min ? len : min);
}

/**
 * Makes an assignment one the crew can carry out: each charger's hand-overs moved to the nearest
 * slot where the crew has room for the moves they need and both sessions keep the minimum
 * length; a stay whose hand-over fits nowhere is taken off that charger (the search may place it
 * elsewhere). Capacity is taken charger by charger, in charger order, so the result is the same
 * for the same input. Changes the assignment in place and returns it.
 */
export function fitCrew(
  problem: Problem,
  assignment: Assignment,
  energy?: Float64Array,
  fewerMoves = false,
): Assignment {
  const yard = problem.yard;
  if (!yard) return assignment;
  const used = new Int32Array(problem.slotCount + 1);
  const dropped: number[] = [];
  const taken: number[][] = problem.chargers.map(() => []);
  for (const charger of problem.chargers) {
    const res = fitCharger(
      problem,
      assignment,
      charger.index,
      assignment.sequence[charger.index]!,
      used,
      false,
      energy,
      fewerMoves,
    );
    taken[charger.index] = res.taken;
    for (const id of res.dropped) dropped.push(id);
  }
  // A stay that fitted nowhere on its charger: another charger may take it where the crew has
  // room (tried on the chargers with the fewest stays first, every place in their order).
  for (const id of dropped) {
    const stay = problem.stays[id]!;
    if (problem.pinned && problem.pinned[id]! >= 0) continue;
    const order = problem.chargers
      .filter((c) => c.available[Math.min(stay.arriveSlot, problem.slotCount - 1)])
      .map((c) => c.index)
      .sort(
        (x, y) =>
          assignment.sequence[x]!.length - assignment.sequence[y]!.length ||
          problem.chargers[y]!.maxKw - problem.chargers[x]!.maxKw ||
          x - y,
      );
    let placed = false;
    for (const c of order.slice(0, 40)) {
      const seq = assignment.sequence[c]!;
      for (const t of taken[c]!) used[t]!--;
      for (let pos = 0; pos <= seq.length && !placed; pos++) {
        if (seq.some((x) => problem.pinned && problem.pinned[x]! >= 0) && pos === 0) continue;
        const trial = [...seq.slice(0, pos), id, ...seq.slice(pos)];
        const saved = trial.map((x) => [assignment.from[x]!, assignment.to[x]!, assignment.chargerOf[x]!] as const);
        assignment.from[id] = stay.arriveSlot;
        assignment.to[id] = stay.departSlot;
        const res = fitCharger(problem, assignment, c, trial, used, true, energy, fewerMoves);
        if (res.dropped.length === 0) {
          for (const t of res.taken) used[t]!++;
          taken[c] = res.taken;
          assignment.chargerOf[id] = c;
          placed = true;
        } else {
          trial.forEach((x, i) => {
            assignment.from[x] = saved[i]![0];
            assignment.to[x] = saved[i]![1];
            assignment.chargerOf[x] = saved[i]![2];
          });
        }
      }
      if (placed) break;
      for (const t of taken[c]!) used[t]!++;
    }
    if (!placed) {
      assignment.chargerOf[id] = -1;
      assignment.from[id] = 0;
      assignment.to[id] = 0;
    }
  }
  return assignment;
}

/**
 * Fits one charger's stays, in order, to the crew's room (`used`: moves already taken per slot).
 * Without `dryRun` it takes the moves into `used` and writes the charger's sequence; with it,
 * only the windows are written and the caller decides. Returns the stays left out and the slots
 * of the moves taken.
 */
function fitCharger(
  problem: Problem,
  assignment: Assignment,
  c: number,
  sequence: number[],
  used: Int32Array,
  dryRun = false,
  energy?: Float64Array,
  fewerMoves = false,
): { dropped: number[]; taken: number[] } {
  const yard = problem.yard!;
  const { slotCount: T } = problem;
  const stays = problem.stays;
  const charger = problem.chargers[c]!;
  const local = new Int32Array(T + 1);
  // A window never spans a slot the charger is out of service (planned outage): clear[t] is the
  // first such slot from t on (T if none), so [a, b) is clear when b <= clear[a].
  const clear = new Int32Array(T + 1).fill(T);
  for (let t = T - 1; t >= 0; t--) clear[t] = charger.available[t] ? clear[t + 1]! : t;
  const taken: number[] = [];
  const dropped: number[] = [];
  const room = (t: number): number => (t >= T || !yard.capacity ? Infinity : yard.capacity[t]! - used[t]! - local[t]!);
  const take = (t: number) => {
    if (t >= T) return;
    local[t]!++;
    taken.push(t);
  };
  const drop = (id: number) => {
    dropped.push(id);
    if (dryRun) return;
    assignment.chargerOf[id] = -1;
    assignment.from[id] = 0;
    assignment.to[id] = 0;
  };
  // A stay already plugged in at a re-plan's start stays first on its charger, from its first slot.
  if (problem.pinned) {
    const pin = problem.pinned;
    sequence = [...sequence.filter((x) => pin[x]! === c), ...sequence.filter((x) => pin[x]! !== c)];
    for (const x of sequence) if (pin[x]! === c) assignment.from[x] = problem.stays[x]!.arriveSlot;
  }
  const kept: number[] = [];
  let cur = -1;
  /** First slot the charger is free again after the sessions placed so far. */
  let freeFrom = 0;
  /**
   * Ends the current session on its own: at the proposed unplug if the crew can make it there
   * (or the driver does), else the nearest slot that works; the stay is left out if none does.
   */
  const closeEnd = (): boolean => {
    const p = stays[cur]!;
    const fromP = assignment.from[cur]!;
    const wanted = Math.min(p.departSlot, Math.max(assignment.to[cur]!, fromP + minWindow(problem, p)));
    let best = -1;
    for (let t = fromP + minWindow(problem, p); t <= Math.min(p.departSlot, clear[fromP]!); t++) {
      if (!endIsFree(problem, p, t) && room(t) < 1) continue;
      if (
        best < 0 ||
        Math.abs(t - wanted) < Math.abs(best - wanted) ||
        (Math.abs(t - wanted) === Math.abs(best - wanted) && endIsFree(problem, p, t))
      )
        best = t;
    }
    if (best < 0) {
      drop(cur);
      kept.pop();
      return false;
    }
    if (!endIsFree(problem, p, best)) take(best);
    assignment.to[cur] = best;
    freeFrom = best;
    return true;
  };
  for (const id of sequence) {
    const s = stays[id]!;
    const pinned = problem.pinned !== undefined && problem.pinned[id]! >= 0;
    if (
      s.departSlot <= s.arriveSlot ||
      (!pinned && assignment.to[id]! <= assignment.from[id]!) ||
      !charger.available[Math.min(Math.max(assignment.from[id]!, s.arriveSlot), T - 1)]
    ) {
      drop(id);
      continue;
    }
    const minS = minWindow(problem, s);
    if (
      cur >= 0 &&
      (assignment.from[id]! > assignment.to[cur]! || clear[assignment.from[cur]!]! < assignment.from[id]!)
    ) {
      // The charger stands idle between the two (as proposed), or is out of service between the
      // current session's start and this one's: end the current session on its own, then start
      // this one as if first.
      closeEnd();
      cur = -1;
    }
    if (cur < 0) {
      // First session on the charger (or after an idle stretch): the plug-in nearest the proposed
      // one that the crew can do, after the charger is free.
      const wanted = assignment.from[id]!;
      let best = -1;
      for (let f = Math.max(s.arriveSlot, freeFrom); f <= s.departSlot - minS; f++) {
        if (clear[f]! < f + minS) continue;
        if (!startIsFree(problem, s, f) && room(f) < 1) continue;
        if (best < 0 || Math.abs(f - wanted) < Math.abs(best - wanted)) best = f;
      }
      if (best < 0) {
        drop(id);
        continue;
      }
      if (!startIsFree(problem, s, best)) take(best);
      assignment.from[id] = best;
      cur = id;
      kept.push(id);
      continue;
    }
    // Hand-over from the current stay p to s at slot h: p unplugged at min(h, p.d), s plugged
    // in at max(h, s.a).
    const p = stays[cur]!;
    const fromP = assignment.from[cur]!;
    const minP = minWindow(problem, p);
    const lo = Math.max(fromP + minP, Math.min(p.departSlot, s.arriveSlot));
    const hi = s.departSlot - minS;
    const wanted = assignment.to[cur]!;
    // Grid kWh a slot gives each at 85 % of full power (the taper near the top of the battery
    // takes the rest).
    const slotKwhP = 0.85 * Math.min(problem.buses[p.bus]!.maxKw, charger.maxKw) * problem.slotHours;
    const slotKwhS = 0.85 * Math.min(problem.buses[s.bus]!.maxKw, charger.maxKw) * problem.slotHours;
    let best = -1;
    let bestKey = Infinity;
    for (let h = lo; h <= hi; h++) {
      const toP = Math.min(h, p.departSlot);
      const fromS = Math.max(h, s.arriveSlot);
      if (toP < fromP + minP) continue;
      if (toP > clear[fromP]! || clear[fromS]! < fromS + minS) continue;
      const unplug = endIsFree(problem, p, toP) ? 0 : 1;
      const plug = startIsFree(problem, s, fromS) ? 0 : 1;
      if (unplug && plug && toP === fromS) {
        if (room(toP) < 2) continue;
      } else {
        if (unplug && room(toP) < 1) continue;
        if (plug && room(fromS) < 1) continue;
      }
      // First the energy the two windows cannot hold at full power (when the grid kWh each stay
      // wants is known), then closeness to the proposed hand-over, then fewer moves.
      const lack = energy
        ? Math.max(0, energy[p.id]! - slotKwhP * (toP - fromP)) +
          Math.max(0, energy[s.id]! - slotKwhS * (s.departSlot - fromS))
        : 0;
      // Asked for fewer moves: a hand-over at a pull-in or pull-out (one move, not two) comes
      // before closeness to the proposed slot.
      const key =
        Math.round(lack * 100) * 1000 +
        (fewerMoves ? (unplug + plug) * 500 + Math.abs(h - wanted) : Math.abs(h - wanted) * 4 + unplug + plug);
      if (key < bestKey) {
        bestKey = key;
        best = h;
      }
    }
    if (best < 0 || pinned) {
      // A stay already on its charger is never moved off it; it is first on the charger anyway.
      if (pinned) {
        cur = id;
        kept.push(id);
      } else drop(id);
      continue;
    }
    const toP = Math.min(best, p.departSlot);
    const fromS = Math.max(best, s.arriveSlot);
    if (!endIsFree(problem, p, toP)) take(toP);
    if (!startIsFree(problem, s, fromS)) take(fromS);
    assignment.to[cur] = toP;
    assignment.from[id] = fromS;
    cur = id;
    kept.push(id);
  }
  if (cur >= 0) closeEnd();
  if (!dryRun) {
    for (const t of taken) used[t]!++;
    assignment.sequence[c] = kept;
  } else if (dropped.length === 0) {
    assignment.sequence[c] = kept;
  }
  return { dropped, taken };
}

/**
 * A plan laid out without knowing which buses are already plugged in (re-planning), made to keep
 * them: each such stay moved onto its charger (its window's length kept, at least the minimum),
 * where fitCrew puts it first and fits the others after it.
 */
export function pinStays(problem: Problem, assignment: Assignment): Assignment {
  const pin = problem.pinned;
  if (!pin) return assignment;
  for (const stay of problem.stays) {
    const p = pin[stay.id]!;
    const was = assignment.chargerOf[stay.id]!;
    if (p < 0 || was === p) continue;
    const length = was >= 0 ? assignment.to[stay.id]! - assignment.from[stay.id]! : 0;
    if (was >= 0) assignment.sequence[was] = assignment.sequence[was]!.filter((x) => x !== stay.id);
    assignment.chargerOf[stay.id] = p;
    assignment.from[stay.id] = stay.arriveSlot;
    assignment.to[stay.id] = Math.min(stay.departSlot, stay.arriveSlot + Math.max(length, minWindow(problem, stay)));
    assignment.sequence[p] = [stay.id, ...assignment.sequence[p]!];
  }
  return assignment;
}

/** Does every stay already plugged in (re-planning) stay on its charger in this assignment? */
export function keepsPins(problem: Problem, assignment: Assignment): boolean {
  const pin = problem.pinned;
  if (!pin) return true;
  for (let id = 0; id < pin.length; id++) if (pin[id]! >= 0 && assignment.chargerOf[id] !== pin[id]) return false;
  return true;
}

/** Crew moves an assignment asks for (its windows as they stand, within the horizon). */
export function countCrewMoves(problem: Problem, assignment: Assignment): number {
  let n = 0;
  for (const stay of problem.stays) {
    const c = assignment.chargerOf[stay.id]!;
    const from = assignment.from[stay.id]!;
    const to = assignment.to[stay.id]!;
    if (c < 0 || to <= from) continue;
    if (!startIsFree(problem, stay, from)) n++;
    if (!endIsFree(problem, stay, to)) n++;
  }
  return n;
}
