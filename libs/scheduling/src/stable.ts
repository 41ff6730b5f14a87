import { cloneAssignment, type Assignment, type AssignmentHints } from './assignment.js';
import { endIsFree, fitCrew, minWindow, startIsFree } from './crew.js';
import type { LpResult } from './highs-solver.js';
import type { AssignedModel } from './local-search.js';
import type { Problem, Stay } from './problem.js';

// Stable re-plans: a re-plan keeps every session of the plan being carried out that it still can
// (same bus, same charger, same window from the cut-off on) and finds places only for the stays it
// must: those on a charger now out of service, or with no session before (the "open" stays).
//
// The repair (`stableRepair`):
// 1. Every kept session stays exactly as it is, its crew moves counted against the crew's room.
// 2. The open stays go into the idle time of the chargers, dearest first: each to the window
//    (charger, plug-in, unplug) that holds most of its energy at 85 % of full power, then covers
//    most of the relaxation's charging of that bus, then is shortest; the crew must have room for
//    every move it needs. Then each window is widened into the idle time beside it (more room for
//    the LP, no other bus moves). The LP sets the power.
// 3. Where idle time is missing (every charger busy through the night, no crew between the
//    evening and the morning), other buses change, one more at a time: a kept session is cut short
//    on its own charger (unplugged earlier or plugged in later, where the crew has room, its
//    minimum plug-in kept), which frees the time behind or before it for the moving stays, or it
//    is released and laid out again with them; a stay without a session may get one. Each change
//    is scored by a cheap proxy (energy the windows cannot hold, including the cut session's own,
//    then the relaxation's charging covered); the best few cuts and releases are solved by the LP.
//    A small beam (the 4 cheapest plans per number of changes; 2, and cuts only of the 16 kept
//    sessions whose release helps most, above 120 stays) keeps a first change that looks best but
//    leads nowhere from hiding a pair that serves every bus.
// 4. The plan chosen: the fewest buses changed among the plans within the depot's tolerance
//    (a share of the money cost, or the amount) of the cheapest found, where shortfall the plan
//    being carried out already had earns no credit (a fault does not justify moving unaffected
//    buses to mend an old shortage). Counted budgets only (changes, LP solves), so the same inputs
//    give the same plan.
// The engine takes the repaired plan when it is within the tolerance of its own cheapest plan;
// otherwise it searches on from it (a plan kept dearer than the depot allows is not kept).

/** The plan being carried out, kept; null when there is none to keep (the older re-seat, kept as a fallback). */
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

/** Budgets of the repair: releases and LP solves are counted, never timed. */
export interface StableLimits {
  /** The most a kept plan may cost (the cheapest plan found plus the tolerance). */
  limit: number;
  /** Smallest saving that justifies releasing one more kept session. */
  minGain: number;
  /** Kept sessions released at most. */
  releases: number;
  /** LP solves per release (the candidates with the best proxy). */
  candidates: number;
  deadline: number;
}

export interface StableRepair {
  assignment: Assignment;
  result: LpResult;
  /** Stays that had to find a new place (charger out of service, no session before, ...). */
  open: number[];
  /** Kept stays released by the repair to bring the cost within the tolerance, in order. */
  released: number[];
  lpSolves: number;
  iterations: number;
}

/** The kept windows and the crew room they leave; null when the kept sessions do not fit the crew's room. */
function keptWindows(problem: Problem, energy: Float64Array) {
  const prev = problem.previous!;
  const n = problem.stays.length;
  const T = problem.slotCount;
  const base: Assignment = {
    chargerOf: new Int32Array(n).fill(-1),
    from: new Int32Array(n),
    to: new Int32Array(n),
    sequence: problem.chargers.map(() => []),
  };
  const busy = problem.chargers.map(() => new Int32Array(T).fill(-1));
  // A bus plugged in at the cut-off whose old window cannot be kept (an unplug that did not
  // happen) still holds its charger's first slot: no kept session of another bus may start there
  // while it is on it. It is laid out again with the open stays.
  const held = problem.chargers.map(() => new Uint8Array(T));
  const open: number[] = [];
  const optional: number[] = [];
  const pin = problem.pinned;
  // Pinned stays first: they hold their charger from the first slot whatever happens.
  const order = problem.stays
    .map((s) => s.id)
    .sort((x, y) => (pin && pin[y]! >= 0 ? 1 : 0) - (pin && pin[x]! >= 0 ? 1 : 0) || x - y);
  for (const id of order) {
    const stay = problem.stays[id]!;
    const c = prev.chargerOf[id]!;
    const pinned = pin ? pin[id]! : -1;
    let from = Math.max(stay.arriveSlot, prev.from[id]!);
    const to = Math.min(stay.departSlot, prev.to[id]!);
    if (pinned >= 0) from = stay.arriveSlot;
    let ok = c >= 0 && to > from && (pinned < 0 || pinned === c);
    if (ok && pinned < 0 && to - from < minWindow(problem, stay)) ok = false;
    if (ok)
      for (let t = from; t < to && ok; t++)
        if (!problem.chargers[c]!.available[t] || busy[c]![t]! >= 0 || held[c]![t]) ok = false;
    if (!ok && pinned >= 0) held[pinned]![stay.arriveSlot] = 1;
    if (ok) {
      base.chargerOf[id] = c;
      base.from[id] = from;
      base.to[id] = to;
      for (let t = from; t < to; t++) busy[c]![t] = id;
    } else if (stay.departSlot > stay.arriveSlot && (c >= 0 || pinned >= 0)) open.push(id);
    else if (stay.departSlot > stay.arriveSlot && energy[id]! > 1e-6) optional.push(id);
  }
  const used = new Int32Array(T + 1);
  for (const stay of problem.stays) {
    if (base.chargerOf[stay.id]! < 0) continue;
    if (!startIsFree(problem, stay, base.from[stay.id]!)) used[base.from[stay.id]!]!++;
    if (!endIsFree(problem, stay, base.to[stay.id]!)) used[base.to[stay.id]!]!++;
  }
  const cap = problem.yard?.capacity;
  if (cap) for (let t = 0; t < T; t++) if (used[t]! > cap[t]!) return null;
  return { base, busy, used, open, optional };
}

interface Layout {
  assignment: Assignment;
  /** Energy the windows cannot hold at 85 % of full power, summed (kWh). */
  lack: number;
  /** The relaxation's charging the windows cover (kWh). */
  cover: number;
}

/**
 * Lays out the stays `place` into the idle time left by `base` (which is not changed), dearest
 * first, then widens each window into the idle time beside it. `busy` and `used` describe `base`.
 */
function layOut(
  problem: Problem,
  hints: AssignmentHints,
  base: Assignment,
  busyBase: Int32Array[],
  usedBase: Int32Array,
  place: number[],
  widen: number[] = [],
): Layout {
  const T = problem.slotCount;
  const dt = problem.slotHours;
  const a = cloneAssignment(base);
  const busy = busyBase.map((row) => row.slice());
  const used = usedBase.slice();
  const cap = problem.yard?.capacity ?? null;
  const room = (t: number) => (t >= T || !cap ? Infinity : cap[t]! - used[t]!);
  const pin = problem.pinned;
  const energy = hints.energy;
  const order = place
    .slice()
    .sort((x, y) => (pin && pin[y]! >= 0 ? 1 : 0) - (pin && pin[x]! >= 0 ? 1 : 0) || energy[y]! - energy[x]! || x - y);
  let lack = 0;
  let cover = 0;
  const placed: number[] = [];
  for (const id of order) {
    const stay = problem.stays[id]!;
    const bus = problem.buses[stay.bus]!;
    const need = energy[id]!;
    const p = hints.power[stay.bus]!;
    const prefix = new Float64Array(stay.departSlot - stay.arriveSlot + 1);
    for (let t = stay.arriveSlot; t < stay.departSlot; t++)
      prefix[t - stay.arriveSlot + 1] = prefix[t - stay.arriveSlot]! + p[t]! * dt;
    const coverOf = (f: number, u: number) => prefix[u - stay.arriveSlot]! - prefix[f - stay.arriveSlot]!;
    const minW = minWindow(problem, stay);
    const pinned = pin ? pin[id]! : -1;
    let best: { c: number; f: number; u: number; key: number; lack: number; cover: number } | null = null;
    for (const ch of problem.chargers) {
      if (pinned >= 0 && ch.index !== pinned) continue;
      const kw = Math.min(bus.maxKw, ch.maxKw);
      if (kw <= 0) continue;
      const slotKwh = 0.85 * kw * dt;
      let g0 = stay.arriveSlot;
      while (g0 < stay.departSlot) {
        if (busy[ch.index]![g0]! >= 0 || !ch.available[g0]) {
          g0++;
          continue;
        }
        let g1 = g0;
        while (g1 < stay.departSlot && busy[ch.index]![g1]! < 0 && ch.available[g1]) g1++;
        const fLast = pinned >= 0 ? Math.min(g0, stay.arriveSlot) : g1 - minW;
        for (let f = g0; f <= fLast; f++) {
          if (pinned >= 0 && f !== stay.arriveSlot) break;
          const plug = pinned >= 0 || startIsFree(problem, stay, f) ? 0 : 1;
          if (plug && room(f) < 1) continue;
          for (let u = f + (pinned >= 0 ? 1 : minW); u <= g1; u++) {
            const unplug = endIsFree(problem, stay, u) ? 0 : 1;
            if (unplug && room(u) < 1) continue;
            const l = Math.max(0, need - slotKwh * (u - f));
            const cv = coverOf(f, u);
            // Energy the window cannot hold first, then fewer crew moves and a shorter window (room
            // for the next stays; the widening below gives the LP the idle time back), then the
            // relaxation's charging it covers.
            const key = Math.round(l * 100) * 1e6 + (plug + unplug) * 1e5 + (u - f) * 1e3 - Math.min(999, cv);
            if (!best || key < best.key) best = { c: ch.index, f, u, key, lack: l, cover: cv };
          }
        }
        g0 = g1;
      }
    }
    if (!best) {
      lack += need;
      continue;
    }
    a.chargerOf[id] = best.c;
    a.from[id] = best.f;
    a.to[id] = best.u;
    for (let t = best.f; t < best.u; t++) busy[best.c]![t] = id;
    if (!(pinned >= 0 || startIsFree(problem, stay, best.f))) used[best.f]!++;
    if (!endIsFree(problem, stay, best.u)) used[best.u]!++;
    lack += best.lack;
    cover += best.cover;
    placed.push(id);
  }
  // Widen each placed window (and those of `widen`, stays already moved) into the idle time
  // beside it where the crew can move its ends there.
  for (const id of [...placed, ...widen]) {
    const stay = problem.stays[id]!;
    const c = a.chargerOf[id]!;
    const ch = problem.chargers[c]!;
    const row = busy[c]!;
    const pinned = pin ? pin[id]! >= 0 : false;
    const f = a.from[id]!;
    const u = a.to[id]!;
    if (!pinned) {
      let lo = f;
      while (lo > stay.arriveSlot && row[lo - 1]! < 0 && ch.available[lo - 1]) lo--;
      const freeNow = startIsFree(problem, stay, f);
      if (!freeNow) used[f]!--;
      let nf = f;
      for (let g = lo; g < f; g++) {
        if (startIsFree(problem, stay, g) || room(g) >= 1) {
          nf = g;
          break;
        }
      }
      if (!startIsFree(problem, stay, nf)) used[nf]!++;
      for (let t = nf; t < f; t++) row[t] = id;
      a.from[id] = nf;
    }
    let hi = u;
    while (hi < stay.departSlot && row[hi]! < 0 && ch.available[hi]) hi++;
    if (!endIsFree(problem, stay, u)) used[u]!--;
    let nu = u;
    for (let g = hi; g > u; g--) {
      if (endIsFree(problem, stay, g) || room(g) >= 1) {
        nu = g;
        break;
      }
    }
    if (!endIsFree(problem, stay, nu)) used[nu]!++;
    for (let t = u; t < nu; t++) row[t] = id;
    a.to[id] = nu;
  }
  for (const s of a.sequence) s.length = 0;
  for (const stay of problem.stays) {
    const c = a.chargerOf[stay.id]!;
    if (c >= 0) a.sequence[c]!.push(stay.id);
  }
  for (const seq of a.sequence) seq.sort((x, y) => a.from[x]! - a.from[y]! || x - y);
  return { assignment: a, lack, cover };
}

/**
 * The plan being carried out, repaired with as few buses moved as the cost allows (see the top of
 * this file). Null when there is no plan to keep or its kept sessions do not fit the crew's room.
 */
export function stableRepair(
  problem: Problem,
  hints: AssignmentHints,
  live: AssignedModel,
  limits: StableLimits,
): StableRepair | null {
  if (!problem.previous) return null;
  const kept = keptWindows(problem, hints.energy);
  if (!kept) return null;
  const all = problem.buses.map((b) => b.index);
  const { open, optional } = kept;
  let lpSolves = 0;
  let iterations = 0;
  const solve = (a: Assignment): LpResult => {
    live.update(a, all);
    const res = live.solve();
    lpSolves++;
    iterations += res.iterations;
    return res;
  };
  // The depot's tolerance is a share of what the plan costs in money, not of the shortfall's penalty.
  const tolerance = (st: RepairState) =>
    Math.max(
      problem.tolerance.share * Math.abs(st.result.objective - problem.shortfallPenalty * st.short),
      problem.tolerance.amount,
    );
  // Changed besides the open stays: kept sessions released (laid out again anywhere), kept
  // sessions cut short on their own charger (unplugged earlier or plugged in later, which gives
  // the moving stays the time behind or before them), stays without a session given one.
  const shortOf = (r: LpResult) => {
    let total = 0;
    for (const stay of problem.stays) {
      const c = live.model.shortCol[stay.id]!;
      if (c >= 0 && r.x.length) total += r.x[c]!;
    }
    return total;
  };
  // What the plan being carried out left short: serving that is not repairing the fault, so it
  // earns no credit when choosing how many buses to move.
  const oldShort = problem.previous.shortfallKwh ?? null;
  const credited = (st: RepairState) =>
    st.result.objective + (oldShort === null ? 0 : problem.shortfallPenalty * Math.max(0, oldShort - st.short));
  const cheapest = (states: RepairState[]) => states.reduce((a, b) => (credited(b) < credited(a) - 1e-9 ? b : a));
  const first = layOut(problem, hints, kept.base, kept.busy, kept.used, open);
  const firstResult = solve(first.assignment);
  if (firstResult.status !== 'optimal') return null;
  const start: RepairState = {
    released: [],
    cuts: new Map(),
    layout: first,
    result: firstResult,
    short: shortOf(firstResult),
    order: 0,
  };
  let counter = 1;
  const visited: RepairState[] = [start];
  const seen = new Set([stateKey(start)]);
  let beam = [start];
  for (let round = 0; round < limits.releases && performance.now() < limits.deadline; round++) {
    const children: RepairState[] = [];
    for (const st of beam) {
      for (const child of expand(st)) {
        const key = stateKey(child);
        // Each step must save something (a tenth of the tolerance's amount); which step count
        // is worth its moved buses is decided below.
        if (seen.has(key) || child.result.objective > st.result.objective - limits.minGain) continue;
        seen.add(key);
        children.push(child);
      }
    }
    if (children.length === 0) break;
    children.sort((x, y) => x.result.objective - y.result.objective || moves(x) - moves(y) || x.order - y.order);
    const bestBefore = cheapest(visited);
    const anyWithin = visited.some((v) => v.result.objective <= limits.limit);
    beam = children.slice(0, problem.stays.length > 120 ? 2 : BEAM);
    visited.push(...beam);
    // One more moved bus is worth it only for a saving beyond the tolerance; once a plan is
    // within the depot's limit and a round brings no such saving, further rounds will not either.
    const bestNow = cheapest(beam);
    if (anyWithin && credited(bestNow) > credited(bestBefore) - tolerance(bestNow)) break;
  }
  // The plan with fewest buses moved among those within the tolerance of the cheapest found
  // (shortfall the plan being carried out already had not credited), within the depot's limit.
  const within = visited.filter((v) => v.result.objective <= limits.limit);
  let chosen: RepairState;
  if (within.length) {
    const ref = cheapest(visited);
    const near = within.filter((v) => credited(v) <= credited(ref) + tolerance(ref));
    chosen = (near.length ? near : [cheapest(within)]).sort(
      (x, y) => moves(x) - moves(y) || credited(x) - credited(y) || x.order - y.order,
    )[0]!;
  } else chosen = visited.slice().sort((x, y) => x.result.objective - y.result.objective || x.order - y.order)[0]!;
  live.update(chosen.layout.assignment, all);
  const result = live.solve();
  lpSolves++;
  iterations += result.iterations;
  return {
    assignment: chosen.layout.assignment,
    result,
    open,
    released: [...chosen.released, ...chosen.cuts.keys()],
    lpSolves,
    iterations,
  };

  /** Energy a cut stay's shorter window cannot hold at 85 % of full power (kWh). */
  function ownLack(id: number, w: { from: number; to: number }) {
    const stay = problem.stays[id]!;
    const kw = Math.min(problem.buses[stay.bus]!.maxKw, problem.chargers[kept!.base.chargerOf[id]!]!.maxKw);
    return Math.max(0, hints.energy[id]! - 0.85 * kw * problem.slotHours * (w.to - w.from));
  }

  /** The plans one change away: one more kept session released or cut, or a cut one changed again. */
  function expand(st: RepairState): RepairState[] {
    const { released, cuts } = st;
    let cutLack = 0;
    for (const [id, w] of cuts) cutLack += ownLack(id, w);
    const moving = [...open, ...released];
    const overlaps = (x: number) => {
      const s = problem.stays[x]!;
      return moving.some((m) => {
        const o = problem.stays[m]!;
        return s.arriveSlot < o.departSlot && o.arriveSlot < s.departSlot;
      });
    };
    // Candidates: kept sessions of stays at the depot while a moving stay is (the only ones whose
    // place can help it), released or cut short, and stays without a session that the relaxation
    // charges. Each is laid out again with the moving stays; the best proxies (energy the windows
    // cannot hold, counting the needs of stays left without a session, then the relaxation's
    // charging covered) go to the LP.
    const candidates: Candidate[] = [];
    const cutCandidates: Candidate[] = [];
    const unserved = (extra: number) =>
      optional.reduce((a, id) => a + (released.includes(id) || id === extra ? 0 : hints.energy[id]!), 0);
    for (const stay of problem.stays) {
      const id = stay.id;
      if (released.includes(id)) continue;
      const isKept = kept!.base.chargerOf[id]! >= 0;
      if (cuts.has(id)) {
        // Already moved: another cut, or laid out anywhere, moves no one more.
        const others = new Map(cuts);
        others.delete(id);
        const rest = cutLack - ownLack(id, cuts.get(id)!);
        const { base, busy, used } = without(problem, kept!, released.concat([id]), others);
        const layout = layOut(problem, hints, base, busy, used, [...moving, id], [...others.keys()]);
        candidates.push({ id, layout, lack: layout.lack + rest + unserved(-1), cut: null });
        const again = bestCut(problem, hints, base, busy, used, moving, kept!.base, id, cuts.get(id)!, [
          ...others.keys(),
        ]);
        if (again) cutCandidates.push({ ...again, lack: again.lack + rest + unserved(-1) });
        continue;
      }
      if (isKept ? !overlaps(id) : !optional.includes(id)) continue;
      const { base, busy, used } = without(problem, kept!, released.concat(isKept ? [id] : []), cuts);
      const layout = layOut(problem, hints, base, busy, used, [...moving, id], [...cuts.keys()]);
      candidates.push({ id, layout, lack: layout.lack + cutLack + unserved(id), cut: null });
    }
    const order = (x: Candidate, y: Candidate) => x.lack - y.lack || y.layout.cover - x.layout.cover || x.id - y.id;
    candidates.sort(order);
    // Cuts of the kept sessions (each tries every slot the crew can make: the costliest part of
    // the search); on a large depot only of those whose release would help most.
    for (const cand of candidates
      .filter((x) => kept!.base.chargerOf[x.id]! >= 0 && !cuts.has(x.id))
      .slice(0, problem.stays.length > 120 ? CUT_STAYS : undefined)) {
      const { base, busy, used } = without(problem, kept!, released.concat([cand.id]), cuts);
      const best = bestCut(problem, hints, base, busy, used, moving, kept!.base, cand.id, null, [...cuts.keys()]);
      if (best) cutCandidates.push({ ...best, lack: best.lack + cutLack + unserved(-1) });
    }
    cutCandidates.sort(order);
    // The best releases and the best cuts both go to the LP (a cut is the smaller change: the bus
    // keeps its charger).
    const tried = [...cutCandidates.slice(0, CUTS_TRIED), ...candidates.slice(0, limits.candidates)];
    const out: RepairState[] = [];
    for (const cand of tried) {
      const res = solve(cand.layout.assignment);
      if (res.status !== 'optimal') continue;
      const nextCuts = new Map(cuts);
      const nextReleased = released.slice();
      if (cand.cut) nextCuts.set(cand.id, cand.cut);
      else {
        nextCuts.delete(cand.id);
        if (!nextReleased.includes(cand.id)) nextReleased.push(cand.id);
      }
      out.push({
        released: nextReleased,
        cuts: nextCuts,
        layout: cand.layout,
        result: res,
        short: shortOf(res),
        order: counter++,
      });
    }
    return out;
  }
}

/** Plans kept per round of the repair's search (2 on depots above 120 stays), and cuts tried by the LP per plan. */
const BEAM = 4;
const CUTS_TRIED = 3;
/** Kept sessions tried for a cut per plan on depots above 120 stays (all below). */
const CUT_STAYS = 16;

interface RepairState {
  /** Kept stays laid out again (or stays without a session given one). */
  released: number[];
  /** Kept stays cut short on their charger, with their new window. */
  cuts: Map<number, { from: number; to: number }>;
  layout: Layout;
  result: LpResult;
  /** kWh short. */
  short: number;
  /** Order found (ties). */
  order: number;
}

const moves = (st: RepairState) => st.released.length + st.cuts.size;
const stateKey = (st: RepairState) =>
  `${st.released
    .slice()
    .sort((a, b) => a - b)
    .join(',')}|${[...st.cuts]
    .sort((a, b) => a[0] - b[0])
    .map(([id, w]) => `${id}:${w.from}-${w.to}`)
    .join(',')}`;

/**
 * The kept windows without some stays (their windows and crew moves given back), and with the
 * cuts made so far (each cut stay on its charger in its shorter window).
 */
function without(
  problem: Problem,
  kept: NonNullable<ReturnType<typeof keptWindows>>,
  ids: number[],
  cuts: Map<number, { from: number; to: number }> = new Map(),
) {
  const base = cloneAssignment(kept.base);
  const busy = kept.busy.map((r) => r.slice());
  const used = kept.used.slice();
  for (const id of [...ids, ...cuts.keys()]) {
    const c = base.chargerOf[id]!;
    if (c < 0) continue;
    const stay: Stay = problem.stays[id]!;
    const f = base.from[id]!;
    const u = base.to[id]!;
    for (let t = f; t < u; t++) busy[c]![t] = -1;
    if (!startIsFree(problem, stay, f)) used[f]!--;
    if (!endIsFree(problem, stay, u)) used[u]!--;
    base.chargerOf[id] = -1;
    base.from[id] = 0;
    base.to[id] = 0;
  }
  for (const [id, w] of cuts) {
    const c = kept.base.chargerOf[id]!;
    place(problem, { base, busy, used }, id, c, w.from, w.to);
  }
  return { base, busy, used };
}

/** Takes back what `place` did (the stay was off the charger before). */
function unplace(
  problem: Problem,
  into: { base: Assignment; busy: Int32Array[]; used: Int32Array },
  id: number,
  c: number,
  f: number,
  u: number,
) {
  const stay = problem.stays[id]!;
  const pinned = problem.pinned ? problem.pinned[id]! >= 0 : false;
  into.base.chargerOf[id] = -1;
  into.base.from[id] = 0;
  into.base.to[id] = 0;
  for (let t = f; t < u; t++) into.busy[c]![t] = -1;
  if (!pinned && !startIsFree(problem, stay, f)) into.used[f]!--;
  if (!endIsFree(problem, stay, u)) into.used[u]!--;
}

/** Puts a stay on a charger in a window and counts its crew moves. */
function place(
  problem: Problem,
  into: { base: Assignment; busy: Int32Array[]; used: Int32Array },
  id: number,
  c: number,
  f: number,
  u: number,
) {
  const stay = problem.stays[id]!;
  const pinned = problem.pinned ? problem.pinned[id]! >= 0 : false;
  into.base.chargerOf[id] = c;
  into.base.from[id] = f;
  into.base.to[id] = u;
  for (let t = f; t < u; t++) into.busy[c]![t] = id;
  if (!pinned && !startIsFree(problem, stay, f)) into.used[f]!++;
  if (!endIsFree(problem, stay, u)) into.used[u]!++;
}

interface Candidate {
  id: number;
  layout: Layout;
  lack: number;
  /** The stay's shorter window on its charger; null: released (laid out again anywhere). */
  cut: { from: number; to: number } | null;
}

/**
 * The best way to cut a kept session short on its charger for the moving stays: unplugged at an
 * earlier slot or plugged in at a later one where the crew has room, at least the minimum
 * plug-in left, the moving stays laid out in what that frees. `base`, `busy` and `used` are the
 * kept plan without the stay. Proxy as for releases, plus the energy the stay's own shorter
 * window cannot hold. Null when no cut frees time a moving stay could use.
 */
function bestCut(
  problem: Problem,
  hints: AssignmentHints,
  base: Assignment,
  busy: Int32Array[],
  used: Int32Array,
  moving: number[],
  keptBase: Assignment,
  id: number,
  current: { from: number; to: number } | null,
  widen: number[],
): Candidate | null {
  const stay = problem.stays[id]!;
  const c = keptBase.chargerOf[id]!;
  const f0 = keptBase.from[id]!;
  const u0 = keptBase.to[id]!;
  const T = problem.slotCount;
  const cap = problem.yard?.capacity ?? null;
  const pinned = problem.pinned ? problem.pinned[id]! >= 0 : false;
  const minW = minWindow(problem, stay);
  const kw = Math.min(problem.buses[stay.bus]!.maxKw, problem.chargers[c]!.maxKw);
  const need = hints.energy[id]!;
  // A moving stay must be able to use some of the time freed: present there for a minimum window.
  const useful = (a: number, b: number) =>
    moving.some((m) => {
      const s = problem.stays[m]!;
      return Math.min(b, s.departSlot) - Math.max(a, s.arriveSlot) >= Math.min(minWindow(problem, s), b - a);
    });
  let best: Candidate | null = null;
  const tryCut = (f: number, u: number) => {
    if (current && current.from === f && current.to === u) return;
    const startMove = !pinned && !startIsFree(problem, stay, f) ? 1 : 0;
    const endMove = endIsFree(problem, stay, u) ? 0 : 1;
    if (cap) {
      if (startMove && f < T && cap[f]! - used[f]! < 1) return;
      if (endMove && u < T && cap[u]! - used[u]! - (f === u ? startMove : 0) < 1) return;
    }
    const own = Math.max(0, need - 0.85 * kw * problem.slotHours * (u - f));
    if (best && own > best.lack + 1e-9) return; // the cut's own lack alone is worse
    // Placed in the caller's arrays for the layout (which copies them), then taken out again.
    const into = { base, busy, used };
    place(problem, into, id, c, f, u);
    const layout = layOut(problem, hints, base, busy, used, moving, widen);
    unplace(problem, into, id, c, f, u);
    const lack = layout.lack + own;
    if (!best || lack < best.lack - 1e-9 || (lack < best.lack + 1e-9 && layout.cover > best.layout.cover + 1e-9))
      best = { id, layout, lack, cut: { from: f, to: u } };
  };
  for (let u = f0 + minW; u < u0; u++) if (useful(u, u0)) tryCut(f0, u);
  if (!pinned) for (let f = f0 + 1; f + minW <= u0; f++) if (useful(f0, f)) tryCut(f, u0);
  return best;
}
