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
// 3. While that plan costs more than the tolerance above the cheapest plan found, one kept
//    session more is released at a time: the candidates are laid out again together with the open
//    stays (a cheap proxy: energy the windows cannot hold, then the relaxation's charging they
//    miss), the most promising few are solved by the LP and the best is taken if it saves at
//    least a tenth of the tolerance's amount. Counted budgets only (releases, LP solves), so the
//    same inputs give the same plan.
// The engine takes the repaired plan when it is within the tolerance; otherwise the cheapest plan
// (a plan kept dearer than the depot allows is not kept).

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
  // Widen each placed window into the idle time beside it where the crew can move its ends there.
  for (const id of placed) {
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
  const tolerance = (v: number) => Math.max(problem.tolerance.share * Math.abs(v), problem.tolerance.amount);
  // Changed besides the open stays: kept sessions released, or stays without a session given one.
  const released: number[] = [];
  let current = layOut(problem, hints, kept.base, kept.busy, kept.used, open);
  let result = solve(current.assignment);
  if (result.status !== 'optimal') return null;
  while (released.length < limits.releases && performance.now() < limits.deadline) {
    const moving = [...open, ...released];
    const overlaps = (x: number) => {
      const s = problem.stays[x]!;
      return moving.some((m) => {
        const o = problem.stays[m]!;
        return s.arriveSlot < o.departSlot && o.arriveSlot < s.departSlot;
      });
    };
    // Candidates: kept sessions of stays at the depot while a moving stay is (the only ones whose
    // place can help it), and stays without a session that the relaxation charges. Each is laid
    // out again with the moving stays; the best proxies (energy the windows cannot hold, counting
    // the needs of stays left without a session, then the relaxation's charging covered) go to the LP.
    const candidates: { id: number; layout: Layout; lack: number }[] = [];
    const unserved = (extra: number) =>
      optional.reduce((a, id) => a + (released.includes(id) || id === extra ? 0 : hints.energy[id]!), 0);
    for (const stay of problem.stays) {
      const id = stay.id;
      if (released.includes(id)) continue;
      const isKept = kept.base.chargerOf[id]! >= 0;
      if (isKept ? !overlaps(id) : !optional.includes(id)) continue;
      const { base, busy, used } = without(problem, kept, released.concat(isKept ? [id] : []));
      const layout = layOut(problem, hints, base, busy, used, [...moving, id]);
      candidates.push({ id, layout, lack: layout.lack + unserved(id) });
    }
    candidates.sort((x, y) => x.lack - y.lack || y.layout.cover - x.layout.cover || x.id - y.id);
    let best: { id: number; layout: Layout; result: LpResult } | null = null;
    for (const cand of candidates.slice(0, limits.candidates)) {
      const res = solve(cand.layout.assignment);
      if (res.status === 'optimal' && (!best || res.objective < best.result.objective - 1e-9))
        best = { ...cand, result: res };
    }
    // One more bus changed only for a saving: while the plan is dearer than the tolerance above
    // the cheapest plan found, a tenth of the tolerance's amount; within it, more than the
    // tolerance (else the plan with fewer changes is within the tolerance of the better one).
    const gain = best ? result.objective - best.result.objective : 0;
    if (!best || gain < (result.objective > limits.limit ? limits.minGain : tolerance(best.result.objective))) break;
    released.push(best.id);
    current = best.layout;
    result = best.result;
  }
  live.update(current.assignment, all);
  result = live.solve();
  lpSolves++;
  iterations += result.iterations;
  return { assignment: current.assignment, result, open, released, lpSolves, iterations };
}

/** The kept windows without some stays (their windows and crew moves given back). */
function without(problem: Problem, kept: NonNullable<ReturnType<typeof keptWindows>>, ids: number[]) {
  const base = cloneAssignment(kept.base);
  const busy = kept.busy.map((r) => r.slice());
  const used = kept.used.slice();
  for (const id of ids) {
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
  return { base, busy, used };
}
