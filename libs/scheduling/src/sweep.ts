import type { Assignment } from './assignment.js';
import { acceptance } from './baseline.js';
import type { Problem } from './problem.js';

// Stage 1 by a sweep through time that follows the lower bound's site load. The relaxation
// says how much the site should draw in each slot (its load profile) and how much each stay
// should receive; it does not say which charger does it. The sweep walks the slots in order and
// meets the relaxation's load with real chargers: stays that must draw now to be served by their
// departure first, then stays already on a charger, then, when they cannot reach the slot's
// load, more stays present at the depot are plugged in (earliest departure or least slack
// first) on the strongest free charger or the best-fitting one. A stay keeps its charger until
// it has had its energy (one plug-in per stay), then frees it; with `reserve` it keeps back the
// energy the relaxation gives it in scarce slots until then. The windows found this way are
// moved to idle chargers where that can only help and widened into the idle time around them;
// the LP decides the power inside.

export interface SweepInput {
  /** Site charging load per slot in the relaxation (kW). */
  load: Float64Array;
  /** Grid kWh each stay receives in the relaxation. */
  energy: Float64Array;
  /** Order among stays of equal slack (optional): lower first. */
  tieBreak?: Float64Array;
  /** How a new stay picks its charger: the weakest that serves it at full power ('fit') or the
   *  strongest free one ('strong'). */
  pick?: 'fit' | 'strong';
  /** Which stays draw first: least slack ('slack') or earliest departure ('deadline'). */
  order?: 'slack' | 'deadline';
  /** Move stays to chargers idle around them (default true; see spreadStays). */
  spread?: boolean;
  /**
   * Hold energy back for scarce slots: grid kW per bus per slot in the relaxation, and the share
   * of what the buses present could draw above which a slot counts as scarce (the relaxation
   * then needs those very buses there). A stay keeps, until such a slot, the energy the
   * relaxation gives it there. Absent: nothing is held back.
   */
  reserve?: { power: Float64Array[]; above: number };
}

const EPS = 1e-6;
/** A stay with at most this many slots to spare must draw now. */
const URGENT = 1;

export function sweepAssignment(problem: Problem, input: SweepInput): Assignment {
  const { slotCount: T, slotHours: dt, eta, stays, chargers, buses } = problem;
  const n = stays.length;
  const C = chargers.length;
  const chargerOf = new Int32Array(n).fill(-1);
  const start = new Int32Array(n).fill(-1);
  const finish = new Int32Array(n).fill(-1);
  const remaining = Float64Array.from(input.energy);
  const occupant = new Int32Array(C).fill(-1);
  const energy = buses.map((b) => b.arrivalKwh);
  const done = new Uint8Array(n);
  const cabinetUse = new Float64Array(problem.cabinets.length);
  const byArrival = stays.slice().sort((x, y) => x.arriveSlot - y.arriveSlot || x.id - y.id);
  let nextArrival = 0;
  const present: number[] = [];
  const pick = input.pick ?? 'fit';
  const order = input.order ?? 'slack';
  // Energy held back: heldAfter[s][i] is the relaxation's grid kWh for stay s in scarce slots
  // from slot a + i on (so held(s) at slot t is what the stay keeps for scarce slots after t).
  const heldAfter: (Float64Array | null)[] = stays.map(() => null);
  if (input.reserve) {
    const { power, above } = input.reserve;
    const scarce = new Uint8Array(T);
    const load = new Float64Array(T);
    const could = new Float64Array(T);
    const top = new Float64Array(T);
    for (const c of chargers) for (let t = 0; t < T; t++) if (c.available[t]) top[t] = Math.max(top[t]!, c.maxKw);
    for (const b of buses) for (let t = 0; t < T; t++) load[t] = load[t]! + power[b.index]![t]!;
    for (const st of stays)
      for (let t = st.arriveSlot; t < st.departSlot; t++)
        could[t] = could[t]! + Math.min(buses[st.bus]!.maxKw, top[t]!);
    for (let t = 0; t < T; t++) scarce[t] = load[t]! > 1e-6 && load[t]! >= above * could[t]! ? 1 : 0;
    for (const st of stays) {
      const row = new Float64Array(st.departSlot - st.arriveSlot + 1);
      for (let t = st.departSlot - 1; t >= st.arriveSlot; t--)
        row[t - st.arriveSlot] = row[t - st.arriveSlot + 1]! + (scarce[t] ? power[st.bus]![t]! * dt : 0);
      if (row[0]! > 1e-9) heldAfter[st.id] = row;
    }
  }
  const held = (s: number): number => {
    const row = heldAfter[s];
    if (!row) return 0;
    const i = currentT + 1 - stays[s]!.arriveSlot;
    return i < row.length ? Math.min(remaining[s]!, row[Math.max(0, i)]!) : 0;
  };

  const powerOn = (s: number, c: number): number => {
    const stay = stays[s]!;
    const ch = chargers[c]!;
    if (!ch.available[currentT]) return 0;
    let p = acceptance(problem, stay.bus, energy[stay.bus]!, ch.maxKw, true);
    if (ch.cabinet >= 0 && problem.cabinets[ch.cabinet]!.binding)
      p = Math.min(p, problem.cabinets[ch.cabinet]!.limitKw - cabinetUse[ch.cabinet]!);
    return Math.max(0, Math.min(p, (remaining[s]! - held(s)) / dt));
  };
  const strongest = Math.max(0, ...chargers.filter((c) => c.available.some((a) => a === 1)).map((c) => c.maxKw));
  // Re-planning: a stay already plugged in keeps its charger from its first slot.
  const pinnedAt: number[][] = Array.from({ length: T }, () => []);
  if (problem.pinned)
    for (const s of stays) if (problem.pinned[s.id]! >= 0 && s.arriveSlot < T) pinnedAt[s.arriveSlot]!.push(s.id);
  /** Slots to spare before the stay must draw without pause to get its energy by departure. */
  const slack = (s: number): number => {
    const stay = stays[s]!;
    const bus = buses[stay.bus]!;
    const c = chargerOf[s]!;
    const rate = Math.max(1e-6, Math.min(bus.maxKw, c >= 0 ? chargers[c]!.maxKw : strongest) * dt);
    return stay.departSlot - currentT - remaining[s]! / rate + 1e-9 * (input.tieBreak?.[s] ?? s);
  };
  /** Which stay draws first among those not urgent. */
  const priority = (s: number): number =>
    order === 'deadline' ? stays[s]!.departSlot + 1e-9 * (input.tieBreak?.[s] ?? s) : slack(s);
  let currentT = 0;

  for (let t = 0; t < T; t++) {
    currentT = t;
    // Stays that have ended free their chargers; the bus's runs come off its battery.
    for (let c = 0; c < C; c++) {
      const s = occupant[c]!;
      if (s >= 0 && stays[s]!.departSlot <= t) occupant[c] = -1;
    }
    while (nextArrival < byArrival.length && byArrival[nextArrival]!.arriveSlot <= t) {
      const stay = byArrival[nextArrival++]!;
      if (stay.indexOnBus > 0) {
        const prev = buses[stay.bus]!.stays[stay.indexOnBus - 1]!;
        energy[stay.bus] = energy[stay.bus]! - prev.runKwh;
      }
      present.push(stay.id);
    }
    for (let i = present.length - 1; i >= 0; i--) if (stays[present[i]!]!.departSlot <= t) present.splice(i, 1);
    for (const s of pinnedAt[t]!) {
      const c = problem.pinned![s]!;
      if (occupant[c]! >= 0 || stays[s]!.departSlot <= t) continue;
      occupant[c] = s;
      chargerOf[s] = c;
      start[s] = t;
    }
    cabinetUse.fill(0);
    let left = input.load[t]!;
    // Stays that must draw now to finish by their departure come first, even above the
    // relaxation's load; then stays on a charger, then more stays plugged in, least slack first.
    const draw = (s: number, c: number, must: boolean) => {
      const p = must ? powerOn(s, c) : Math.min(powerOn(s, c), Math.max(0, left));
      if (p <= EPS) return;
      left -= p;
      remaining[s] = remaining[s]! - p * dt;
      energy[stays[s]!.bus] = energy[stays[s]!.bus]! + eta * dt * p;
      const g = chargers[c]!.cabinet;
      if (g >= 0) cabinetUse[g] = cabinetUse[g]! + p;
      finish[s] = t + 1;
    };
    const plugIn = (s: number): number => {
      let best = -1;
      let bestKey = 0;
      const want = Math.min(Math.max(left, 0), buses[stays[s]!.bus]!.maxKw);
      for (let c = 0; c < C; c++) {
        if (occupant[c]! >= 0 || !chargers[c]!.available[t]) continue;
        const p = powerOn(s, c);
        if (p <= EPS) continue;
        // 'fit': the weakest charger that gives what is wanted, else the strongest.
        const key = pick === 'strong' ? -p : p >= want - EPS ? chargers[c]!.maxKw : 1e6 - p;
        if (best < 0 || key < bestKey - 1e-9) {
          best = c;
          bestKey = key;
        }
      }
      if (best >= 0) {
        occupant[best] = s;
        chargerOf[s] = best;
        start[s] = t;
      }
      return best;
    };
    const active: number[] = [];
    for (let c = 0; c < C; c++) if (occupant[c]! >= 0) active.push(c);
    active.sort((x, y) => slack(occupant[x]!) - slack(occupant[y]!));
    const waiting = present.filter((s) => chargerOf[s]! < 0 && !done[s] && remaining[s]! > EPS);
    waiting.sort((x, y) => slack(x) - slack(y));
    const drawn = new Uint8Array(C);
    const plugged = new Uint8Array(n);
    for (const c of active) {
      if (slack(occupant[c]!) > URGENT) break;
      draw(occupant[c]!, c, true);
      drawn[c] = 1;
    }
    for (let w = 0; w < waiting.length && slack(waiting[w]!) <= URGENT; w++) {
      const c = plugIn(waiting[w]!);
      plugged[waiting[w]!] = 1;
      if (c >= 0) {
        draw(waiting[w]!, c, true);
        drawn[c] = 1;
      }
    }
    if (order === 'deadline') {
      active.sort((x, y) => priority(occupant[x]!) - priority(occupant[y]!));
      waiting.sort((x, y) => priority(x) - priority(y));
    }
    for (const c of active) {
      if (left <= EPS) break;
      if (!drawn[c]) draw(occupant[c]!, c, false);
    }
    for (let w = 0; w < waiting.length && left > EPS; w++) {
      if (plugged[waiting[w]!]) continue;
      const c = plugIn(waiting[w]!);
      if (c >= 0) draw(waiting[w]!, c, false);
    }
    // Stays that have had their energy free their chargers.
    for (let c = 0; c < C; c++) {
      const s = occupant[c]!;
      if (s >= 0 && remaining[s]! <= 1e-6 * Math.max(1, input.energy[s]!)) {
        occupant[c] = -1;
        done[s] = 1;
      }
    }
  }

  // Windows. The sweep needs each stay on its charger only from its start to its last slot
  // with power (its core); around that the LP may use any time the charger is idle. First,
  // stays move to a charger that is idle over a longer stretch around their core (as strong
  // for the bus, no binding cabinet added, available): every such move only widens what the LP
  // may do, so it never costs. Then each window grows into the idle time beside it (half of a
  // gap between two windows to either side, the ends to arrival and departure).
  for (const s of stays) if (chargerOf[s.id]! >= 0 && finish[s.id]! < 0) finish[s.id] = start[s.id]! + 1;
  if (input.spread !== false) spreadStays(problem, chargerOf, start, finish);
  const assignment: Assignment = {
    chargerOf,
    from: new Int32Array(n),
    to: new Int32Array(n),
    sequence: chargers.map(() => []),
  };
  for (const s of stays) {
    const c = chargerOf[s.id]!;
    if (c >= 0) assignment.sequence[c]!.push(s.id);
  }
  for (let c = 0; c < C; c++) {
    const seq = assignment.sequence[c]!;
    seq.sort((x, y) => start[x]! - start[y]! || x - y);
    for (const s of seq) {
      assignment.from[s] = stays[s]!.arriveSlot;
      assignment.to[s] = stays[s]!.departSlot;
    }
    for (let i = 1; i < seq.length; i++) {
      const p = seq[i - 1]!;
      const s = seq[i]!;
      // p may run on to s's core, s may start right after p's core; where both could, split.
      let pTo = Math.min(stays[p]!.departSlot, start[s]!);
      let sFrom = Math.max(stays[s]!.arriveSlot, finish[p]!);
      if (sFrom < pTo) {
        const h = Math.ceil((sFrom + pTo) / 2);
        pTo = h;
        sFrom = h;
      }
      assignment.to[p] = pTo;
      assignment.from[s] = sFrom;
    }
  }
  return assignment;
}

/**
 * Moves stays to chargers that are idle over a longer stretch around their core [start, finish)
 * (see sweepAssignment), longest gain first, stays already plugged in (re-planning) left alone.
 */
function spreadStays(problem: Problem, chargerOf: Int32Array, start: Int32Array, finish: Int32Array): void {
  const { slotCount: T, stays, chargers, buses } = problem;
  const C = chargers.length;
  const owner = chargers.map(() => new Int32Array(T).fill(-1));
  for (const s of stays) {
    const c = chargerOf[s.id]!;
    if (c >= 0) for (let t = start[s.id]!; t < finish[s.id]!; t++) owner[c]![t] = s.id;
  }
  const binding = (c: number) => chargers[c]!.cabinet >= 0 && problem.cabinets[chargers[c]!.cabinet]!.binding;
  /** Idle stretch on charger c around [lo, hi) within the stay (length), or -1 if the core is not free. */
  const room = (c: number, s: number, lo: number, hi: number): number => {
    const o = owner[c]!;
    const av = chargers[c]!.available;
    for (let t = lo; t < hi; t++) if ((o[t]! >= 0 && o[t] !== s) || !av[t]) return -1;
    const stay = stays[s]!;
    let a = lo;
    while (a > stay.arriveSlot && o[a - 1]! < 0 && av[a - 1]) a--;
    let b = hi;
    while (b < stay.departSlot && o[b]! < 0 && av[b]) b++;
    return b - a;
  };
  const order = stays
    .filter((s) => chargerOf[s.id]! >= 0 && !(problem.pinned && problem.pinned[s.id]! >= 0))
    .map((s) => s.id);
  order.sort((x, y) => finish[x]! - start[x]! - (finish[y]! - start[y]!) || x - y);
  for (const s of order) {
    const c = chargerOf[s]!;
    const bus = buses[stays[s]!.bus]!;
    const power = Math.min(bus.maxKw, chargers[c]!.maxKw);
    const lo = start[s]!;
    const hi = finish[s]!;
    let best = c;
    let bestRoom = room(c, s, lo, hi);
    for (let k = 0; k < C; k++) {
      if (k === c || chargers[k]!.maxKw < power - 1e-9) continue;
      if (binding(k) && chargers[k]!.cabinet !== chargers[c]!.cabinet) continue;
      const r = room(k, s, lo, hi);
      if (r > bestRoom) {
        best = k;
        bestRoom = r;
      }
    }
    if (best === c) continue;
    for (let t = lo; t < hi; t++) {
      owner[c]![t] = -1;
      owner[best]![t] = s;
    }
    chargerOf[s] = best;
  }
}
