import { DateTime } from 'luxon';

// An independent plan checker for the tests, written apart from the engine: it reads the
// scenario JSON and the plan JSON as plain data (its own time parsing, its own tariff lookup)
// and lists every violated rule of the scenario format. It imports nothing from the engine.

type Json = any; // eslint-disable-line @typescript-eslint/no-explicit-any -- plain data on purpose: the checker reads JSON without the engine's types

const TOL = 1e-4;

function localMs(text: string, zone: string): number {
  const [date, time] = text.split('T');
  const [y, mo, d] = date!.split('-').map(Number);
  const [h, mi] = time!.split(':').map(Number);
  // First occurrence of an ambiguous hour: try both plausible offsets, keep the earlier that
  // reads back as the same wall-clock time.
  const guesses: number[] = [];
  for (const offsetH of [
    -14, -13, -12, -11, -10, -9, -8, -7, -6, -5, -4, -3, -2, -1, 0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12, 13, 14,
  ]) {
    const ms = Date.UTC(y!, mo! - 1, d!, h!, mi!) - offsetH * 3600_000;
    const back = DateTime.fromMillis(ms, { zone });
    if (back.year === y && back.month === mo && back.day === d && back.hour === h && back.minute === mi)
      guesses.push(ms);
  }
  if (guesses.length === 0) throw new Error(`checker: ${text} does not exist in ${zone}`);
  return Math.min(...guesses);
}

function clockMin(s: string): number {
  const [h, m] = s.split(':').map(Number);
  return h! * 60 + m!;
}

function periodIndex(periods: Json[], ms: number, zone: string): number {
  const dt = DateTime.fromMillis(ms, { zone });
  const minute = dt.hour * 60 + dt.minute;
  const day = dt.weekday;
  const yesterday = day === 1 ? 7 : day - 1;
  for (let i = 0; i < periods.length; i++) {
    for (const w of periods[i].windows) {
      const from = clockMin(w.from);
      const to = clockMin(w.to);
      if (
        to > from
          ? w.days.includes(day) && minute >= from && minute < to
          : (w.days.includes(day) && minute >= from) || (w.days.includes(yesterday) && minute < to)
      )
        return i;
    }
  }
  return -1;
}

export interface CheckOptions {
  /** Reported costs must equal the recomputation within this relative tolerance. */
  costTolerance?: number;
  /** Re-plans: buses already on a charger at the start (their plug-in, and its minimum, was earlier). */
  plugged?: Record<string, string>;
}

export function checkPlan(scenario: Json, plan: Json, options: CheckOptions = {}): string[] {
  const errors: string[] = [];
  const fail = (m: string) => errors.push(m);
  const zone: string = scenario.timezone;
  const slotMin: number = scenario.slotMinutes ?? 15;
  const dtH = slotMin / 60;
  const slotMs = slotMin * 60_000;
  const eta: number = scenario.efficiency ?? 1;
  const startMs = localMs(scenario.start, zone);
  const endMs = localMs(scenario.end, zone);
  const T = Math.round((endMs - startMs) / slotMs);
  // Other load and site limit per slot: otherLoadByHourKw (by the local hour of the slot's
  // start) overrides otherLoadKw; each limit window lowers the limit in every slot it touches.
  const byHour: number[] | undefined = scenario.site.otherLoadByHourKw;
  const otherAt = (t: number): number =>
    byHour ? byHour[DateTime.fromMillis(startMs + t * slotMs, { zone }).hour]! : (scenario.site.otherLoadKw ?? 0);
  const windows = (scenario.site.limitWindows ?? []).map((w: Json) => ({
    from: localMs(w.from, zone),
    to: localMs(w.to, zone),
    kw: w.limitKw as number,
  }));
  const limitAt = (t: number): number => {
    let limit: number = scenario.site.limitKw;
    const a = startMs + t * slotMs;
    for (const w of windows) if (w.from < a + slotMs && w.to > a) limit = Math.min(limit, w.kw);
    return limit;
  };
  const periods: Json[] = scenario.tariff.periods ?? [];

  if (plan.slots.length !== T) fail(`plan has ${plan.slots.length} slots, the horizon has ${T}`);
  for (let t = 0; t < Math.min(T, plan.slots.length); t++) {
    const ms = Date.parse(plan.slots[t].start);
    if (ms !== startMs + t * slotMs)
      fail(`slot ${t} starts ${plan.slots[t].start}, expected ${new Date(startMs + t * slotMs).toISOString()}`);
    const local = DateTime.fromMillis(startMs + t * slotMs, { zone });
    if (!plan.slots[t].start.endsWith(local.toFormat('ZZ')))
      fail(`slot ${t} start ${plan.slots[t].start} lacks the local offset ${local.toFormat('ZZ')}`);
  }

  const chargerById = new Map<string, Json>(scenario.chargers.map((c: Json) => [c.id, c]));
  const busById = new Map<string, Json>(scenario.buses.map((b: Json) => [b.id, b]));
  const power = new Map<string, Float64Array>(scenario.buses.map((b: Json) => [b.id, new Float64Array(T)]));
  const chargerBusy = new Map<string, (string | null)[]>(
    scenario.chargers.map((c: Json) => [c.id, Array(T).fill(null)]),
  );
  const busOn = new Map<string, (string | null)[]>(scenario.buses.map((b: Json) => [b.id, Array(T).fill(null)]));
  const chargerKw = new Map<string, Float64Array>(scenario.chargers.map((c: Json) => [c.id, new Float64Array(T)]));

  for (const [i, s] of plan.sessions.entries()) {
    const bus = busById.get(s.bus);
    const charger = chargerById.get(s.charger);
    if (!bus || !charger) {
      fail(`session ${i}: unknown bus ${s.bus} or charger ${s.charger}`);
      continue;
    }
    const a = (Date.parse(s.start) - startMs) / slotMs;
    const b = (Date.parse(s.end) - startMs) / slotMs;
    if (!Number.isInteger(a) || !Number.isInteger(b) || a < 0 || b > T || b <= a) {
      fail(`session ${i}: ${s.start}..${s.end} is not a slot range inside the horizon`);
      continue;
    }
    if (s.kw.length !== b - a) fail(`session ${i}: ${s.kw.length} kW values for ${b - a} slots`);
    const inStay = bus.stays.some(
      (st: Json) => localMs(st.arrive, zone) <= Date.parse(s.start) && Date.parse(s.end) <= localMs(st.depart, zone),
    );
    if (!inStay) fail(`session ${i} (${s.bus}): ${s.start}..${s.end} is not inside one of the bus's stays`);
    // Extension: a charger out of service for a span has no bus on it then.
    for (const w of (charger.outOfService ?? []) as Json[]) {
      if (Date.parse(s.start) < localMs(w.to, zone) && localMs(w.from, zone) < Date.parse(s.end))
        fail(`session ${i} (${s.bus}): ${s.start}..${s.end} on ${s.charger} overlaps its outage ${w.from}..${w.to}`);
    }
    let kwh = 0;
    for (let t = a; t < b; t++) {
      const kw = s.kw[t - a] ?? 0;
      kwh += kw * dtH;
      if (kw < -TOL) fail(`session ${i}: negative power ${kw}`);
      if (kw > Math.min(bus.maxKw, charger.maxKw) + TOL)
        fail(`session ${i} slot ${t}: ${kw} kW above bus/charger maximum`);
      if (chargerBusy.get(s.charger)![t])
        fail(`charger ${s.charger} serves ${chargerBusy.get(s.charger)![t]} and ${s.bus} in slot ${t}`);
      chargerBusy.get(s.charger)![t] = s.bus;
      if (busOn.get(s.bus)![t]) fail(`bus ${s.bus} on ${busOn.get(s.bus)![t]} and ${s.charger} in slot ${t}`);
      busOn.get(s.bus)![t] = s.charger;
      power.get(s.bus)![t] += kw;
      chargerKw.get(s.charger)![t] += kw;
    }
    if (Math.abs(kwh - s.kwh) > TOL * Math.max(1, kwh)) fail(`session ${i}: kwh ${s.kwh} but the powers give ${kwh}`);
  }

  const charging = new Float64Array(T);
  for (const p of power.values()) for (let t = 0; t < T; t++) charging[t] += p[t]!;
  for (let t = 0; t < T && t < plan.slots.length; t++) {
    const load = charging[t]! + otherAt(t);
    const siteLimit = limitAt(t);
    if (Math.abs(plan.slots[t].loadKw - load) > TOL * Math.max(1, load))
      fail(`slot ${t}: loadKw ${plan.slots[t].loadKw}, sessions give ${load}`);
    if (Math.abs(plan.slots[t].limitKw - siteLimit) > 1e-9)
      fail(`slot ${t}: limitKw ${plan.slots[t].limitKw}, the scenario gives ${siteLimit}`);
    if (load > siteLimit + TOL * Math.max(1, siteLimit))
      fail(`slot ${t}: site load ${load} above the limit ${siteLimit}`);
    for (const cab of scenario.cabinets ?? []) {
      let sum = 0;
      for (const c of scenario.chargers) if (c.cabinet === cab.id) sum += chargerKw.get(c.id)![t]!;
      if (sum > cab.limitKw + TOL * Math.max(1, cab.limitKw))
        fail(`slot ${t}: cabinet ${cab.id} draws ${sum} above ${cab.limitKw}`);
    }
  }

  // Energy: simulate each battery from the powers; check ceiling, taper, departures, reserve.
  for (const bus of scenario.buses) {
    const out = plan.buses.find((b: Json) => b.id === bus.id);
    if (!out) {
      fail(`bus ${bus.id} missing from plan.buses`);
      continue;
    }
    const p = power.get(bus.id)!;
    const ceiling = Math.max(bus.ceilingKwh ?? bus.usableKwh, bus.arrivalKwh);
    const reserve = bus.reserveKwh ?? 0;
    let e = bus.arrivalKwh;
    let worstShort = 0;
    bus.stays.forEach((st: Json, k: number) => {
      const arrive = localMs(st.arrive, zone);
      const depart = localMs(st.depart, zone);
      if (k > 0 && e < reserve - TOL) worstShort = Math.max(worstShort, reserve - e);
      for (let t = 0; t < T; t++) {
        const ms = startMs + t * slotMs;
        if (ms < arrive || ms + slotMs > depart) {
          continue;
        }
        const kw = p[t]!;
        if (bus.taperFromKwh !== undefined && e > bus.taperFromKwh) {
          const cap = (bus.maxKw * (bus.usableKwh - e)) / (bus.usableKwh - bus.taperFromKwh);
          if (kw > cap + TOL * Math.max(1, cap))
            fail(`bus ${bus.id} slot ${t}: ${kw} kW above its taper acceptance ${cap}`);
        }
        e += eta * dtH * kw;
        if (kw > 0 && e > ceiling + TOL) fail(`bus ${bus.id} slot ${t}: energy ${e} above its ceiling ${ceiling}`);
      }
      const reported = out.departures[k];
      if (!reported || Math.abs(reported.kwh - e) > 1e-3)
        fail(`bus ${bus.id} departure ${k}: reported ${reported?.kwh}, powers give ${e}`);
      if (reported && Date.parse(reported.at) !== depart)
        fail(`bus ${bus.id} departure ${k}: at ${reported.at}, stay departs ${st.depart}`);
      worstShort = Math.max(worstShort, st.departMinKwh - e);
      const last = k === bus.stays.length - 1;
      if (!last) worstShort = Math.max(worstShort, (st.runKwh ?? 0) + reserve - e);
      e -= st.runKwh ?? 0;
    });
    for (let t = 0; t < T; t++) {
      if (p[t]! > 0 && busOn.get(bus.id)![t] === null) fail(`bus ${bus.id} draws power in slot ${t} without a charger`);
    }
    const short = Math.max(0, worstShort);
    if (short > 1e-3 && out.shortfallKwh < short - 1e-3)
      fail(`bus ${bus.id} is ${short} kWh short but reports ${out.shortfallKwh}`);
    if (short <= 1e-3 && out.shortfallKwh > 1e-3)
      fail(`bus ${bus.id} reports ${out.shortfallKwh} kWh short but is served`);
    if (out.shortfallKwh > 1e-3 !== (out.reason !== null))
      fail(`bus ${bus.id}: shortfall ${out.shortfallKwh} with reason ${out.reason}`);
    if (out.reason !== null && !['dwell', 'charger', 'cabinet', 'site', 'taper'].includes(out.reason))
      fail(`bus ${bus.id}: unknown reason ${out.reason}`);
  }

  checkCrew(scenario, plan, { startMs, endMs, slotMs, zone, fail, plugged: options.plugged ?? {} });

  // Costs from the slots and the tariff.
  let energy = 0;
  let peak = 0;
  const periodPeak = periods.map(() => 0);
  for (let t = 0; t < T; t++) {
    const ms = startMs + t * slotMs;
    const k = periodIndex(periods, ms, zone);
    const price = k < 0 ? scenario.tariff.offPeakPrice : periods[k].price;
    if (plan.slots[t] && Math.abs(plan.slots[t].price - price) > 1e-12)
      fail(`slot ${t}: price ${plan.slots[t].price}, tariff says ${price}`);
    energy += price * charging[t]! * dtH;
    const load = charging[t]! + otherAt(t);
    peak = Math.max(peak, load);
    if (k >= 0) periodPeak[k] = Math.max(periodPeak[k]!, load);
  }
  const soFar = scenario.tariff.peaksSoFarKw ?? {};
  let demand = (scenario.tariff.facilityDemandCharge ?? 0) * Math.max(0, peak - (soFar.facility ?? 0));
  periods.forEach((p: Json, k: number) => {
    demand += (p.demandCharge ?? 0) * Math.max(0, periodPeak[k]! - (soFar[p.name] ?? 0));
  });
  const tol = options.costTolerance ?? 1e-6;
  const close = (x: number, y: number) => Math.abs(x - y) <= tol * Math.max(1, Math.abs(y)) + 1e-5;
  if (!close(plan.cost.energy, energy)) fail(`cost.energy ${plan.cost.energy}, recomputed ${energy}`);
  if (!close(plan.cost.demand, demand)) fail(`cost.demand ${plan.cost.demand}, recomputed ${demand}`);
  if (!close(plan.cost.total, energy + demand)) fail(`cost.total ${plan.cost.total}, recomputed ${energy + demand}`);
  if (plan.cost.total < plan.lowerBound - 1e-6 * Math.max(1, plan.lowerBound))
    fail(`cost ${plan.cost.total} below the lower bound ${plan.lowerBound}`);
  if (plan.lowerBound < 0) fail('negative lower bound');
  const gap = plan.cost.total > 0 ? (plan.cost.total - plan.lowerBound) / plan.cost.total : 0;
  if (Math.abs(gap - plan.gap) > 1e-6) fail(`gap ${plan.gap}, recomputed ${gap}`);
  const anyShort = plan.buses.some((b: Json) => b.shortfallKwh > 1e-3);
  if (anyShort !== (plan.status === 'short')) fail(`status ${plan.status} but shortfall ${anyShort}`);
  for (const key of [
    'kind',
    'energy',
    'demand',
    'total',
    'peakKw',
    'exceedsSiteLimit',
    'shortfallKwh',
    'shortfallCost',
  ])
    if (!(key in plan.baseline)) fail(`baseline lacks ${key}`);
  return errors;
}

/**
 * The yard crew (scenario extension `yard`): minimum plug-in, who makes each move, crew moves
 * only inside crew windows and at most movesPerSlot in one slot, and the reported count.
 */
function checkCrew(
  scenario: Json,
  plan: Json,
  h: {
    startMs: number;
    endMs: number;
    slotMs: number;
    zone: string;
    fail: (m: string) => void;
    plugged: Record<string, string>;
  },
): void {
  const { startMs, endMs, slotMs, zone, fail, plugged } = h;
  const yard = scenario.yard;
  const drivers: boolean = yard ? (yard.driversPlugIn ?? true) : true;
  const minMs = (yard?.minPlugInMinutes ?? 0) * 60_000;
  const crew = (yard?.crew as Json[] | undefined)?.map((w) => ({
    from: localMs(w.from, zone),
    to: localMs(w.to, zone),
    moves: w.movesPerSlot as number,
  }));
  const movesAt = new Map<number, number>();
  let count = 0;
  const crewMove = (ms: number, what: string) => {
    if (ms >= endMs) return; // after the horizon: not part of the plan
    count++;
    movesAt.set(ms, (movesAt.get(ms) ?? 0) + 1);
    if (crew) {
      const room = Math.max(0, ...crew.filter((w) => w.from <= ms && ms + slotMs <= w.to).map((w) => w.moves));
      if (room === 0) fail(`${what}: crew move at ${new Date(ms).toISOString()} outside every crew window`);
    }
  };
  for (const [i, s] of (plan.sessions as Json[]).entries()) {
    const a = Date.parse(s.start);
    const b = Date.parse(s.end);
    const bus = scenario.buses.find((x: Json) => x.id === s.bus);
    if (!bus) continue;
    const stay = bus.stays.find((st: Json) => localMs(st.arrive, zone) <= a && b <= localMs(st.depart, zone));
    if (!stay) continue;
    // The whole slots of the stay inside the horizon.
    const first = Math.max(startMs, startMs + Math.ceil((localMs(stay.arrive, zone) - startMs) / slotMs) * slotMs);
    const last = Math.min(endMs, startMs + Math.floor((localMs(stay.depart, zone) - startMs) / slotMs) * slotMs);
    const what = `session ${i} (${s.bus} on ${s.charger})`;
    const continued = a === startMs && plugged[s.bus] === s.charger;
    if (yard && b - a < minMs && !(a === first && b === last) && !continued)
      fail(
        `${what}: ${(b - a) / 60_000} min plugged in, below the minimum ${yard.minPlugInMinutes} min and not the whole stay`,
      );
    if (s.startMove !== 'driver' && s.startMove !== 'crew') fail(`${what}: startMove ${s.startMove}`);
    if (s.endMove !== 'driver' && s.endMove !== 'crew') fail(`${what}: endMove ${s.endMove}`);
    if (s.startMove === 'driver' && !(drivers && a === first) && !continued)
      fail(`${what}: plug-in at ${s.start} marked driver, but it is not at pull-in`);
    if (s.endMove === 'driver' && !((drivers && b === last) || b >= endMs))
      fail(`${what}: unplug at ${s.end} marked driver, but it is not at pull-out`);
    if (s.startMove !== 'driver') crewMove(a, `${what} plug-in`);
    if (s.endMove !== 'driver') crewMove(b, `${what} unplug`);
  }
  if (crew) {
    for (const [ms, n] of movesAt) {
      const room = Math.max(0, ...crew.filter((w) => w.from <= ms && ms + slotMs <= w.to).map((w) => w.moves));
      if (n > room) fail(`${n} crew moves in the slot at ${new Date(ms).toISOString()}, the crew can make ${room}`);
    }
  }
  if (plan.crewMoves !== count) fail(`crewMoves ${plan.crewMoves}, the sessions give ${count}`);
}
