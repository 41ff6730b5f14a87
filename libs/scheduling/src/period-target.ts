import { DateTime } from 'luxon';
import { loadSolver, type Lp, type LpResult, type Solver } from './highs-solver.js';
import { buildChargeModel, type ChargeModel } from './lp-model.js';
import { planScenario, type Plan, type PlanOptions } from './plan.js';
import { prepareProblem, type Problem } from './problem.js';
import type { Scenario, ScenarioInput } from './scenario.js';

// The billing period's demand target (see the scheduling brief, "peaks so far"). The demand
// charge is set once per billing period by its highest interval, so the nights left in the period
// share one facility peak D_f and one peak D_k per demand period. One LP over all of them - each
// night modelled as the engine's lower-bound relaxation (any bus present may charge, the count of
// buses charging per slot limited by the chargers and cabinets, the service limit with its
// load-reduction windows, the building's load, time-of-use prices) - chooses the peaks that
// minimise the period's charging energy plus demand charges above the peaks so far. Those peaks
// are the target each night is then planned under. Ratchets and minimum demands are the bill's
// business (bill/bill.ts): they add to the bill whatever the plan does and are left out here.

export interface PeriodNight {
  /** How the night is named in reasons, e.g. "Monday Dec 14". */
  label: string;
  scenario: Scenario;
  /** Where its buses come from: the night's own runs, or the same weekday's latest entered runs. */
  basis: 'runs' | 'typical-weekday';
}

export interface DemandTarget {
  /** 'facility' or the demand period's name. */
  name: string;
  kw: number;
  peakSoFarKw: number;
  /** Demand charge per kW. */
  rate: number;
}

export interface TargetMarginal {
  name: string;
  rate: number;
  /** Energy saved over the period by allowing one kW more than the target. */
  aboveSavesPerKw: number;
  /** Energy cost added over the period by holding one kW below the target (null: at the floor). */
  belowCostsPerKw: number | null;
  /** kWh left short per kW below the target (the limit cannot be met without it). */
  belowShortKwhPerKw: number;
  sentence: string;
}

export interface TargetBinding {
  name: string;
  night: string;
  /** ISO start of the interval that sets the target. */
  at: string;
  buses: number;
  needKwh: number;
  sentence: string;
}

export interface TargetImpossible {
  night: string;
  shortKwh: number;
  cause: 'service limit' | 'chargers or time at the depot';
  sentence: string;
}

export interface PeriodTarget {
  currency: string;
  /** The facility target first (when the tariff has a facility charge), then each period's. */
  targets: DemandTarget[];
  /** The period's remaining charging energy cost and its demand charges above the peaks so far. */
  cost: { energy: number; demand: number; total: number };
  shortfallKwh: number;
  binding: TargetBinding | null;
  marginal: TargetMarginal[];
  impossible: TargetImpossible[];
  /**
   * Each night's charging in the LP's optimum, in the nights' order: grid kW by slot, for the
   * slots with a bus at the depot. The night as it would be planned under the target before the
   * chargers are shared out: a forecast of the nights nobody has planned yet on the same model.
   */
  charging: NightCharging[];
  stats: { nights: number; columns: number; rows: number; iterations: number; ms: number };
}

export interface NightCharging {
  slotMinutes: number;
  slots: { startMs: number; kw: number }[];
}

/** The shared peak columns of the period LP. */
interface SharedPeak {
  name: string;
  col: number;
  rate: number;
  peakSoFar: number;
  lower: number;
}

interface PeriodModel {
  lp: Lp;
  problems: Problem[];
  models: ChargeModel[];
  /** First column of each night's block (nights alike share one block). */
  base: number[];
  /** First row of each night's block. */
  rowBase: number[];
  /** How many nights each night's block stands for. */
  weight: number[];
  shared: SharedPeak[];
}

const round = (v: number, digits = 6) => {
  const f = 10 ** digits;
  const r = Math.round(v * f) / f;
  return Object.is(r, -0) ? 0 : r;
};

/** 1900.4 -> "1,900"; money with two decimals. */
export function groupDigits(v: number, decimals = 0): string {
  const fixed = Math.abs(v).toFixed(decimals);
  const [int, frac] = fixed.split('.');
  const grouped = int!.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return `${v < 0 && Number(fixed) !== 0 ? '-' : ''}${grouped}${frac ? `.${frac}` : ''}`;
}

export function money(v: number, currency: string): string {
  const sign = currency === 'USD' ? '$' : currency === 'EUR' ? '€' : currency === 'GBP' ? '£' : `${currency} `;
  return `${v < 0 ? '-' : ''}${sign}${groupDigits(Math.abs(v), 2)}`;
}

function buildPeriodModel(nights: PeriodNight[]): PeriodModel {
  const problems = nights.map((n) => prepareProblem(n.scenario));
  const models = problems.map((p) => buildChargeModel(p, { mode: 'relaxed', tieBreak: false }));
  const shared: SharedPeak[] = [];
  const sharedOf = new Map<string, SharedPeak>();
  // Shared peaks first: one column per demand charge name, over all nights.
  problems.forEach((p, i) => {
    const m = models[i]!;
    const add = (name: string, col: number, rate: number, peakSoFar: number) => {
      if (col < 0) return;
      const known = sharedOf.get(name);
      const lower = m.lp.colLower[col]!;
      if (known) {
        known.rate = Math.max(known.rate, rate);
        known.peakSoFar = Math.max(known.peakSoFar, peakSoFar);
        known.lower = Math.max(known.lower, lower);
      } else {
        const s = { name, col: shared.length, rate, peakSoFar, lower };
        shared.push(s);
        sharedOf.set(name, s);
      }
    };
    add('facility', m.demandCols.facility, p.tariff.facilityDemandCharge, p.tariff.facilityPeakSoFarKw);
    p.tariff.periods.forEach((k, j) => add(k.name, m.demandCols.periods[j]!, k.demandCharge, k.peakSoFarKw));
  });
  // Nights alike (a typical weekday repeated to the period's end: the same charge model, column for
  // column) share one block whose costs count once per night. The period LP is convex and its nights
  // meet only in the shared peaks, so the average of alike nights' solutions is as good as any: the
  // merged LP has the same optimum, and is a fraction of the size (4 blocks for 17 nights on the demo).
  const blocks: { night: number; weight: number }[] = [];
  const byKey = new Map<number, number[]>();
  const blockOfNight = models.map((m, i) => {
    const key = modelKey(m);
    const alike = byKey.get(key) ?? [];
    let b = alike.find((j) => sameModel(models[blocks[j]!.night]!, m, problems[blocks[j]!.night]!, problems[i]!));
    if (b === undefined) {
      b = blocks.push({ night: i, weight: 0 }) - 1;
      byKey.set(key, [...alike, b]);
    }
    blocks[b]!.weight++;
    return b;
  });
  let numCols = shared.length;
  let numRows = 0;
  let nnz = 0;
  const blockBase: number[] = [];
  const blockRowBase: number[] = [];
  for (const b of blocks) {
    const m = models[b.night]!;
    blockBase.push(numCols);
    blockRowBase.push(numRows);
    numCols += m.lp.numCols;
    numRows += m.lp.numRows;
    nnz += m.lp.indices.length;
  }
  const colCost = new Float64Array(numCols);
  const colLower = new Float64Array(numCols);
  const colUpper = new Float64Array(numCols);
  let offset = 0;
  for (const s of shared) {
    colCost[s.col] = s.rate;
    colLower[s.col] = s.lower;
    colUpper[s.col] = Infinity;
    offset -= s.rate * s.peakSoFar;
  }
  const rowLower = new Float64Array(numRows);
  const rowUpper = new Float64Array(numRows);
  const starts = new Int32Array(numRows + 1);
  const indices = new Int32Array(nnz);
  const values = new Float64Array(nnz);
  let k0 = 0;
  blocks.forEach((b, j) => {
    const i = b.night;
    const m = models[i]!;
    const p = problems[i]!;
    const c0 = blockBase[j]!;
    const r0 = blockRowBase[j]!;
    // A night's own peak columns are replaced by the shared ones: left empty and fixed at 0.
    const map = new Int32Array(m.lp.numCols);
    for (let c = 0; c < m.lp.numCols; c++) map[c] = c0 + c;
    if (m.demandCols.facility >= 0) map[m.demandCols.facility] = sharedOf.get('facility')!.col;
    p.tariff.periods.forEach((k, q) => {
      const c = m.demandCols.periods[q]!;
      if (c >= 0) map[c] = sharedOf.get(k.name)!.col;
    });
    const demand = new Set([m.demandCols.facility, ...m.demandCols.periods].filter((c) => c >= 0));
    for (let c = 0; c < m.lp.numCols; c++) {
      if (demand.has(c)) continue;
      colCost[c0 + c] = m.lp.colCost[c]! * b.weight;
      colLower[c0 + c] = m.lp.colLower[c]!;
      colUpper[c0 + c] = m.lp.colUpper[c]!;
    }
    for (let r = 0; r < m.lp.numRows; r++) {
      rowLower[r0 + r] = m.lp.rowLower[r]!;
      rowUpper[r0 + r] = m.lp.rowUpper[r]!;
      starts[r0 + r] = k0 + m.lp.starts[r]!;
    }
    for (let k = 0; k < m.lp.indices.length; k++) {
      indices[k0 + k] = map[m.lp.indices[k]!]!;
      values[k0 + k] = m.lp.values[k]!;
    }
    k0 += m.lp.indices.length;
  });
  starts[numRows] = nnz;
  const lp: Lp = {
    numCols,
    numRows,
    colCost,
    colLower,
    colUpper,
    rowLower,
    rowUpper,
    starts,
    indices,
    values,
    offset,
  };
  return {
    lp,
    problems,
    models,
    base: blockOfNight.map((b) => blockBase[b]!),
    rowBase: blockOfNight.map((b) => blockRowBase[b]!),
    weight: blockOfNight.map((b) => blocks[b]!.weight),
    shared,
  };
}

const MODEL_ARRAYS = [
  'colCost',
  'colLower',
  'colUpper',
  'rowLower',
  'rowUpper',
  'starts',
  'indices',
  'values',
] as const;

/** A hash of a night's charge model, to find the alike ones (then compared value for value). */
function modelKey(m: ChargeModel): number {
  let h = 0x811c9dc5;
  const mix = (v: number) => {
    // Enough of each value's digits to tell nights apart; equality is decided by sameModel.
    h = Math.imul(h ^ (Math.round(v * 1e6) | 0), 0x01000193);
  };
  for (const name of MODEL_ARRAYS) {
    const a = m.lp[name];
    mix(a.length);
    for (let k = 0; k < a.length; k++) mix(Number.isFinite(a[k]!) ? a[k]! : 7e8);
  }
  return h >>> 0;
}

/** Two nights whose charge models are the same LP, column for column and row for row. */
function sameModel(a: ChargeModel, b: ChargeModel, p: Problem, q: Problem): boolean {
  for (const name of MODEL_ARRAYS) {
    const x = a.lp[name];
    const y = b.lp[name];
    if (x.length !== y.length) return false;
    for (let k = 0; k < x.length; k++) if (x[k] !== y[k]) return false;
  }
  const names = (r: Problem) => r.tariff.periods.map((k) => k.name);
  return (
    JSON.stringify([a.demandCols, a.demandRows, a.loadCol, a.shortCol, names(p)]) ===
    JSON.stringify([b.demandCols, b.demandRows, b.loadCol, b.shortCol, names(q)])
  );
}

/** Charging energy cost and kWh short of a solution. */
function partsOf(pm: PeriodModel, x: Float64Array): { energy: number; short: number } {
  let energy = 0;
  let short = 0;
  pm.problems.forEach((p, i) => {
    const m = pm.models[i]!;
    const b = pm.base[i]!;
    for (let t = 0; t < p.slotCount; t++) energy += p.slots[t]!.price * p.slotHours * x[b + m.loadCol[t]!]!;
    for (const c of m.shortCol) if (c >= 0) short += x[b + c]!;
  });
  return { energy, short };
}

/** Each night's charging load (the L columns of its block) where a bus is at the depot. */
function chargingOf(pm: PeriodModel, x: Float64Array): NightCharging[] {
  return pm.problems.map((p, i) => {
    const m = pm.models[i]!;
    const b = pm.base[i]!;
    const slots: NightCharging['slots'] = [];
    for (let t = 0; t < p.slotCount; t++)
      if (p.present[t]! > 0)
        slots.push({ startMs: p.slots[t]!.startMs, kw: Math.max(0, round(x[b + m.loadCol[t]!]!)) });
    return { slotMinutes: p.slotHours * 60, slots };
  });
}

const clock = (ms: number, zone: string) => DateTime.fromMillis(ms, { zone }).toFormat('HH:mm');

/** The interval that sets a shared peak: the demand row carrying the largest dual. */
function bindingOf(
  pm: PeriodModel,
  nights: PeriodNight[],
  result: LpResult,
  s: SharedPeak,
  currency: string,
): TargetBinding | null {
  const kw = result.x[s.col]!;
  if (kw <= s.lower + 1e-6) return null;
  let best = { dual: 0, night: -1, t: -1 };
  pm.models.forEach((m, i) => {
    const p = pm.problems[i]!;
    const k = s.name === 'facility' ? -1 : p.tariff.periods.findIndex((q) => q.name === s.name);
    const rowsOf = k < 0 ? (s.name === 'facility' ? m.demandRows.facility : null) : m.demandRows.periods[k]!;
    if (!rowsOf) return;
    for (let t = 0; t < p.slotCount; t++) {
      const r = rowsOf[t]!;
      if (r < 0) continue;
      // A block of alike nights carries their duals together: each night's share is its part.
      const d = Math.abs(result.rowDual[pm.rowBase[i]! + r]!) / pm.weight[i]!;
      // Ties go to the earliest night and interval, so the reason does not depend on the solver.
      if (d > best.dual + 1e-9) best = { dual: d, night: i, t };
    }
  });
  if (best.night < 0) return null;
  const p = pm.problems[best.night]!;
  const slot = p.slots[best.t]!;
  let buses = 0;
  let need = 0;
  let from = Infinity;
  let to = -Infinity;
  // What the buses at the depot then still need by their last pull-out: at a midday layover that
  // is the night's energy too (charging there is ahead of the night), where the layover's own
  // pull-out alone often needs nothing ("5 buses need 0 kWh ... still needs 58 kW").
  let later = false;
  for (const bus of p.buses) {
    const k = bus.stays.findIndex((st) => st.arriveSlot <= best.t && best.t < st.departSlot);
    if (k < 0) continue;
    buses++;
    const ahead = bus.stays.slice(k);
    need += Math.max(0, ...ahead.map((st) => st.requiredKwh - (bus.arrivalKwh - st.runsBeforeKwh)));
    later ||= ahead.length > 1;
    from = Math.min(from, bus.stays[k]!.arriveMs);
    to = Math.max(to, ahead.at(-1)!.departMs);
  }
  const zone = p.zone;
  const what = s.name === 'facility' ? 'the facility demand' : `the ${s.name} demand`;
  const limitNote =
    Math.abs(kw - slot.limitKw) < 1e-6 ? ` and the service limit (${groupDigits(slot.limitKw)} kW) is reached` : '';
  const sentence =
    `${nights[best.night]!.label}, ${clock(slot.startMs, zone)}: ${buses} bus${buses === 1 ? '' : 'es'} need ` +
    `${groupDigits(need)} kWh ${later ? 'from' : 'between'} pull-in (${clock(from, zone)}) ${later ? 'to their last' : 'and'} pull-out (${clock(to, zone)}); ` +
    `spreading it over the cheap intervals still needs ${groupDigits(kw)} kW for ${what}${limitNote}.`;
  void currency;
  return { name: s.name, night: nights[best.night]!.label, at: slot.start, buses, needKwh: round(need, 1), sentence };
}

/**
 * The billing period's demand target over the nights left in it (each prepared as a scenario,
 * whose peaks so far are the period's). Solved with HiGHS; the marginal value of each target by
 * re-solving with the peak held one kW above and one kW below.
 */
export function solvePeriodTarget(
  nights: PeriodNight[],
  solver: Solver,
  options: { marginal?: boolean } = {},
): PeriodTarget {
  if (nights.length === 0) throw new Error('a period target needs at least one night');
  const currency = nights[0]!.scenario.tariff.currency;
  const pm = buildPeriodModel(nights);
  const live = solver.open(pm.lp);
  try {
    const result = live.solve();
    if (result.status !== 'optimal')
      throw new Error(`period LP ended ${result.status}; the model should always be solvable`);
    let iterations = result.iterations;
    let ms = result.ms;
    const { energy, short } = partsOf(pm, result.x);
    let demand = 0;
    const targets: DemandTarget[] = pm.shared.map((s) => {
      const kw = Math.max(s.lower, result.x[s.col]!);
      demand += s.rate * Math.max(0, kw - s.peakSoFar);
      // Rounded up: a target is a cap, and a cap a hair too low would leave a bus a hair short.
      return { name: s.name, kw: Math.ceil(round(kw, 6) * 1000) / 1000, peakSoFarKw: s.peakSoFar, rate: s.rate };
    });
    // Marginal values: the same LP with one peak held 1 kW above, then 1 kW below, the target.
    const marginal: TargetMarginal[] = [];
    for (const s of options.marginal === false ? [] : pm.shared) {
      const kw = Math.max(s.lower, result.x[s.col]!);
      const at = (v: number) => {
        live.setColBounds([s.col], [v], [v]);
        const r = live.solve();
        iterations += r.iterations;
        ms += r.ms;
        return r.status === 'optimal' ? partsOf(pm, r.x) : null;
      };
      const above = at(kw + 1);
      const below = kw - 1 >= s.lower - 1e-9 ? at(kw - 1) : null;
      live.setColBounds([s.col], [s.lower], [Infinity]);
      const saves = above ? Math.max(0, energy - above.energy) : 0;
      const costs = below ? Math.max(0, below.energy - energy) : null;
      const shortPerKw = below ? Math.max(0, below.short - short) : 0;
      const what = s.name === 'facility' ? 'Each kW' : `Each ${s.name} kW`;
      let sentence = `${what} above the target saves ${money(saves, currency)} of energy this period and costs ${money(s.rate, currency)} of demand charge`;
      if (below === null)
        sentence += '; the target is already at the peak so far or the building load, it cannot go lower.';
      else if (shortPerKw > 1e-3) sentence += `; each kW below leaves ${groupDigits(shortPerKw, 1)} kWh undelivered.`;
      else
        sentence += `; each kW below costs ${money(costs!, currency)} of energy and saves ${money(s.rate, currency)}.`;
      marginal.push({
        name: s.name,
        rate: s.rate,
        aboveSavesPerKw: round(saves, 4),
        belowCostsPerKw: costs === null ? null : round(costs, 4),
        belowShortKwhPerKw: round(shortPerKw, 4),
        sentence,
      });
    }
    // The binding interval of the target with the highest charge on it.
    const order = [...pm.shared].sort((a, b) => b.rate - a.rate || a.col - b.col);
    let binding: TargetBinding | null = null;
    for (const s of order) {
      binding = bindingOf(pm, nights, result, s, currency);
      if (binding) break;
    }
    // Nights that no target can serve: short even at the service limit.
    const impossible: TargetImpossible[] = [];
    pm.problems.forEach((p, i) => {
      const m = pm.models[i]!;
      let s = 0;
      for (const c of m.shortCol) if (c >= 0) s += result.x[pm.base[i]! + c]!;
      if (s <= 1e-3) return;
      const lifted = buildChargeModel(p, { mode: 'relaxed', tieBreak: false, siteUnlimited: true });
      const r = solver.solve(lifted.lp);
      let liftedShort = 0;
      if (r.status === 'optimal') for (const c of lifted.shortCol) if (c >= 0) liftedShort += r.x[c]!;
      const limit = Math.min(...p.slots.map((x) => x.limitKw));
      const bySite = liftedShort < s - 1e-3;
      const label = nights[i]!.label;
      impossible.push({
        night: label,
        shortKwh: round(s, 1),
        cause: bySite ? 'service limit' : 'chargers or time at the depot',
        sentence: bySite
          ? `${label}: the runs need ${groupDigits(s - liftedShort, 1)} kWh more than the service limit (${groupDigits(limit)} kW at its lowest) lets the chargers deliver before pull-out. No target can serve it; raise the limit or move runs.`
          : `${label}: the buses are short ${groupDigits(s, 1)} kWh even with all the power they can take (too few chargers or too little time at the depot); no target changes that.`,
      });
    });
    return {
      currency,
      targets,
      cost: { energy: round(energy, 4), demand: round(demand, 4), total: round(energy + demand, 4) },
      shortfallKwh: round(short, 3),
      binding,
      marginal,
      impossible,
      charging: chargingOf(pm, result.x),
      stats: { nights: nights.length, columns: pm.lp.numCols, rows: pm.lp.numRows, iterations, ms: round(ms, 1) },
    };
  } finally {
    live.dispose();
  }
}

export async function periodTarget(nights: PeriodNight[]): Promise<PeriodTarget> {
  return solvePeriodTarget(nights, await loadSolver());
}

/** The night's scenario with its peaks so far raised to the target (demand up to it is paid anyway). */
export function underTarget(scenario: Scenario, targets: readonly DemandTarget[]): Scenario {
  const peaks = { ...scenario.tariff.peaksSoFarKw };
  for (const t of targets) peaks[t.name] = Math.max(peaks[t.name] ?? 0, t.kw);
  return { ...scenario, tariff: { ...scenario.tariff, peaksSoFarKw: peaks } };
}

export interface TargetTrade {
  /** How far above each target the plan goes (only those it exceeds). */
  above: { name: string; kw: number; rate: number }[];
  /** Demand charge the excess adds to the billing period. */
  cost: number;
  /** Buses that would be short if the plan held the target, and by how much. */
  keepsServed: { bus: string; kwh: number }[];
  /** Energy the night saves by going above (against the plan that holds the target). */
  energySaved: number;
  sentence: string;
}

export interface PlanUnderTarget {
  plan: Plan;
  /** The plan's peaks against the targets (with each target's demand charge per kW). */
  peaks: { name: string; kw: number; targetKw: number; rate: number }[];
  /** Null when the plan stays within every target. */
  trade: TargetTrade | null;
}

const LOCAL = "yyyy-MM-dd'T'HH:mm";

/**
 * A night's peaks against the targets, from its site load per slot (slots matched to the
 * scenario's by start time, so a re-plan's whole night can be passed): each target's peak, and
 * the targets it goes above.
 */
export function targetOutcome(
  scenario: Scenario,
  slots: readonly { start: string; loadKw: number }[],
  targets: readonly DemandTarget[],
): { peaks: PlanUnderTarget['peaks']; above: TargetTrade['above'] } {
  const problem = prepareProblem(scenario);
  const periodAt = new Map(problem.slots.map((s) => [s.startMs, s.period]));
  const peakOf = new Map<string, number>([['facility', 0]]);
  for (const s of slots) {
    peakOf.set('facility', Math.max(peakOf.get('facility')!, s.loadKw));
    const k = periodAt.get(Date.parse(s.start)) ?? -1;
    if (k >= 0) {
      const name = problem.tariff.periods[k]!.name;
      peakOf.set(name, Math.max(peakOf.get(name) ?? 0, s.loadKw));
    }
  }
  const above: TargetTrade['above'] = [];
  const peaks = targets.map((t) => {
    const kw = peakOf.get(t.name) ?? 0;
    if (kw > t.kw + 0.05) above.push({ name: t.name, kw: round(kw - t.kw, 2), rate: t.rate });
    return { name: t.name, kw: round(kw, 2), targetKw: t.kw, rate: t.rate };
  });
  return { peaks, above };
}

/**
 * The trade in words: "Raising the target by 20 kW costs $150.00 this month (20 kW x $7.50/kW)
 * and keeps bus 207 from being 12 kWh short." (or "and saves $X of energy tonight"; neither
 * known: the cost alone).
 */
export function tradeSentence(
  above: TargetTrade['above'],
  keepsServed: TargetTrade['keepsServed'],
  energySaved: number | null,
  currency: string,
): string {
  const cost = above.reduce((a, x) => a + x.kw * x.rate, 0);
  const parts = above.map(
    (x) => `${groupDigits(x.kw, 1)} kW x ${money(x.rate, currency)}/kW${x.name === 'facility' ? '' : ` ${x.name}`}`,
  );
  const kw = Math.max(...above.map((x) => x.kw));
  const head = `Raising the target by ${groupDigits(kw, 1)} kW costs ${money(cost, currency)} this month (${parts.join(' + ')})`;
  if (keepsServed.length) {
    const list = keepsServed.map((b) => `bus ${b.bus} from being ${groupDigits(b.kwh, 1)} kWh short`);
    return `${head} and keeps ${list.length > 1 ? `${list.slice(0, -1).join(', ')} and ${list.at(-1)}` : list[0]}.`;
  }
  if (energySaved !== null) return `${head} and saves ${money(Math.max(0, energySaved), currency)} of energy tonight.`;
  return `${head}.`;
}

/** The scenario with the site limit held at the targets (a limit window per period interval). */
export function heldAtTarget(scenario: Scenario, targets: readonly DemandTarget[]): Scenario {
  const problem = prepareProblem(scenario);
  const facility = targets.find((t) => t.name === 'facility');
  const windows = [...(scenario.site.limitWindows ?? [])];
  for (const t of targets) {
    if (t.name === 'facility') continue;
    const k = problem.tariff.periods.findIndex((p) => p.name === t.name);
    if (k < 0) continue;
    let open: { from: number; to: number } | null = null;
    const flush = () => {
      if (!open) return;
      windows.push({
        from: DateTime.fromMillis(open.from, { zone: problem.zone }).toFormat(LOCAL),
        to: DateTime.fromMillis(open.to, { zone: problem.zone }).toFormat(LOCAL),
        limitKw: Math.max(1e-3, t.kw),
      });
      open = null;
    };
    for (const s of problem.slots) {
      if (s.period === k) {
        if (open && open.to === s.startMs) open.to = s.endMs;
        else {
          flush();
          open = { from: s.startMs, to: s.endMs };
        }
      }
    }
    flush();
  }
  return {
    ...scenario,
    site: {
      ...scenario.site,
      limitKw: facility ? Math.max(1e-3, Math.min(scenario.site.limitKw, facility.kw)) : scenario.site.limitKw,
      ...(windows.length ? { limitWindows: windows } : {}),
    },
  };
}

/**
 * Plans a night under the period's target: the target is its peaks-so-far floor, so demand up to
 * it costs nothing more tonight. A plan that goes above it is compared with the plan held at the
 * target, and the trade is put in words: what the excess costs this month and which buses it
 * keeps from being short (or what energy it saves).
 */
export async function planUnderTarget(
  scenario: Scenario,
  targets: readonly DemandTarget[],
  options: PlanOptions = {},
): Promise<PlanUnderTarget> {
  const floor = underTarget(scenario, targets);
  const plan = await planScenario(floor, options);
  const { peaks, above } = targetOutcome(floor, plan.slots, targets);
  if (above.length === 0) return { plan, peaks, trade: null };
  const held = await planScenario(heldAtTarget(floor, targets), options);
  const keepsServed: TargetTrade['keepsServed'] = [];
  held.buses.forEach((b, i) => {
    const more = b.shortfallKwh - (plan.buses[i]?.shortfallKwh ?? 0);
    if (more > 0.05) keepsServed.push({ bus: b.id, kwh: round(more, 1) });
  });
  const cost = above.reduce((a, x) => a + x.kw * x.rate, 0);
  const energySaved = held.cost.energy - plan.cost.energy;
  return {
    plan,
    peaks,
    trade: {
      above,
      cost: round(cost, 2),
      keepsServed,
      energySaved: round(energySaved, 2),
      sentence: tradeSentence(above, keepsServed, energySaved, scenario.tariff.currency),
    },
  };
}

/**
 * The scenario moved by whole days (every local time: horizon, stays, limit and crew windows),
 * e.g. the latest entered night of a weekday standing in for a later night of that weekday.
 */
export function shiftScenario<S extends ScenarioInput | Scenario>(scenario: S, days: number): S {
  const zone = scenario.timezone;
  const move = (local: string) => DateTime.fromISO(local, { zone }).plus({ days }).toFormat(LOCAL);
  const out = {
    ...scenario,
    start: move(scenario.start),
    end: move(scenario.end),
    site: {
      ...scenario.site,
      ...(scenario.site.limitWindows
        ? { limitWindows: scenario.site.limitWindows.map((w) => ({ ...w, from: move(w.from), to: move(w.to) })) }
        : {}),
    },
    buses: scenario.buses.map((b) => ({
      ...b,
      stays: b.stays.map((s) => ({ ...s, arrive: move(s.arrive), depart: move(s.depart) })),
    })),
    ...(scenario.yard
      ? {
          yard: {
            ...scenario.yard,
            ...(scenario.yard.crew
              ? { crew: scenario.yard.crew.map((w) => ({ ...w, from: move(w.from), to: move(w.to) })) }
              : {}),
          },
        }
      : {}),
  };
  return out as S;
}
