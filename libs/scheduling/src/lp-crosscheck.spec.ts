import GLPK from 'glpk.js/node';
import solverJs, { type SolveResult } from 'javascript-lp-solver';
import { DateTime } from 'luxon';
import { describe, expect, it } from 'vitest';
import { planScenario } from './plan.js';
import { parseScenario, type ScenarioInput } from './scenario.js';
import { checkPlan } from './testing/plan-checker.js';
import type { RawJson } from './testing/raw-json.js';

// Small depots (2-6 buses, a charger each, all chargers in one cabinet so any assignment meets
// the same limits): the charging LP is written out here from the scenario, independently of
// the engine (energy levels per slot, taper on every slot), and solved by glpk.js or
// javascript-lp-solver. The engine's cost must equal that optimum within 1e-6 relative.

type Term = [string, number];
interface Row {
  name: string;
  terms: Term[];
  op: '<=' | '>=' | '=';
  rhs: number;
}
interface WrittenLp {
  objective: Term[];
  offset: number;
  rows: Row[];
  vars: Set<string>;
}

function rand(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = Math.imul(a ^ (a >>> 15), a | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function smallDepot(
  seed: number,
  buses: number,
  opts: { start: string; end: string; twoStays?: boolean },
): ScenarioInput {
  const r = rand(seed);
  const day = opts.start.slice(0, 10);
  const next = opts.end.slice(0, 10);
  const t = (d: string, m: number) =>
    `${d}T${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`;
  const list: ScenarioInput['buses'] = [];
  for (let i = 0; i < buses; i++) {
    const usable = 150 + Math.round(r() * 100);
    const maxKw = [60, 80, 100][i % 3]!;
    const arrival = Math.round(usable * (0.25 + 0.2 * r()));
    const taper = i % 2 === 0 ? Math.round(usable * 0.8) : undefined;
    const ceiling = Math.round(usable * 0.92);
    const departMin = Math.round(usable * (0.7 + 0.15 * r()));
    const arrive = 17 * 60 + 15 * Math.floor(r() * 8);
    const depart = 5 * 60 + 15 * Math.floor(r() * 8);
    const stays: ScenarioInput['buses'][number]['stays'] = [];
    if (opts.twoStays && i === 0) {
      stays.push({ arrive: t(day, 12 * 60 + 10), depart: t(day, 14 * 60 + 5), departMinKwh: arrival + 20, runKwh: 40 });
    }
    stays.push({ arrive: t(day, arrive), depart: t(next, depart), departMinKwh: departMin });
    list.push({
      id: `B${i + 1}`,
      usableKwh: usable,
      maxKw,
      arrivalKwh: arrival,
      ceilingKwh: ceiling,
      reserveKwh: 20,
      ...(taper ? { taperFromKwh: taper } : {}),
      stays,
    });
  }
  return {
    version: 1,
    timezone: 'America/Chicago',
    start: opts.start,
    end: opts.end,
    slotMinutes: 15,
    efficiency: 0.9,
    site: { limitKw: 40 + 55 * buses, otherLoadKw: 25 },
    cabinets: [{ id: 'P', limitKw: 60 * buses }],
    chargers: Array.from({ length: buses }, (_, i) => ({ id: `C${i + 1}`, maxKw: 120, cabinet: 'P' })),
    tariff: {
      currency: 'USD',
      offPeakPrice: 0.08,
      periods: [
        {
          name: 'on-peak',
          price: 0.3,
          demandCharge: 8,
          windows: [{ days: [1, 2, 3, 4, 5], from: '16:00', to: '21:00' }],
        },
        {
          name: 'night',
          price: 0.05,
          demandCharge: 0,
          windows: [{ days: [1, 2, 3, 4, 5], from: '23:00', to: '04:00' }],
        },
      ],
      facilityDemandCharge: 11,
      peaksSoFarKw: { facility: 60, 'on-peak': 30 },
    },
    buses: list,
  };
}

/** The LP of the scheduling brief, written directly from the scenario JSON. */
function writeLp(s: RawJson): WrittenLp {
  const zone = s.timezone;
  const ms = (x: string) => DateTime.fromISO(x, { zone }).toMillis();
  const start = ms(s.start);
  const T = (ms(s.end) - start) / 900_000;
  const dt = 0.25;
  const rows: Row[] = [];
  const vars = new Set<string>();
  const objective: Term[] = [];
  let offset = 0;
  const v = (name: string) => (vars.add(name), name);
  const slotStart = (t: number) => start + t * 900_000;
  const wk = (t: number) => DateTime.fromMillis(slotStart(t), { zone });
  const period = (t: number) => {
    const d = wk(t);
    const m = d.hour * 60 + d.minute;
    const wd = d.weekday <= 5;
    const yd = (d.weekday === 1 ? 7 : d.weekday - 1) <= 5;
    if (wd && m >= 960 && m < 1260) return 0;
    if ((wd && m >= 1380) || (yd && m < 240)) return 1;
    return -1;
  };
  const load: Term[][] = Array.from({ length: T }, () => []);
  for (const b of s.buses) {
    const q = b.usableKwh;
    let prevE: string | null = null;
    let prevP: string | null = null;
    let pending = 0; // run energy to take off at the next arrival
    b.stays.forEach((st: RawJson, k: number) => {
      const a = ms(st.arrive);
      const d = ms(st.depart);
      const usable: number[] = [];
      for (let t = 0; t < T; t++) if (slotStart(t) >= a && slotStart(t) + 900_000 <= d) usable.push(t);
      for (const t of usable) {
        const e = v(`e_${b.id}_${t}`);
        const p = v(`p_${b.id}_${t}`);
        if (prevE === null) rows.push({ name: `init_${b.id}`, terms: [[e, 1]], op: '=', rhs: b.arrivalKwh });
        else
          rows.push({
            name: `bal_${b.id}_${t}`,
            terms: [
              [e, 1],
              [prevE, -1],
              [prevP!, -s.efficiency * dt],
            ],
            op: '=',
            rhs: -pending,
          });
        pending = 0;
        rows.push({ name: `res_${b.id}_${t}`, terms: [[e, 1]], op: '>=', rhs: b.reserveKwh ?? 0 });
        rows.push({ name: `pmax_${b.id}_${t}`, terms: [[p, 1]], op: '<=', rhs: Math.min(b.maxKw, 120) });
        if (b.taperFromKwh !== undefined) {
          const m = b.maxKw / (q - b.taperFromKwh);
          rows.push({
            name: `taper_${b.id}_${t}`,
            terms: [
              [p, 1],
              [e, m],
            ],
            op: '<=',
            rhs: m * q,
          });
        }
        rows.push({
          name: `ceil_${b.id}_${t}`,
          terms: [
            [e, 1],
            [p, s.efficiency * dt],
          ],
          op: '<=',
          rhs: b.ceilingKwh,
        });
        load[t]!.push([p, 1]);
        prevE = e;
        prevP = p;
      }
      const last = k === b.stays.length - 1;
      const need = last ? st.departMinKwh : Math.max(st.departMinKwh, (st.runKwh ?? 0) + (b.reserveKwh ?? 0));
      rows.push({
        name: `dep_${b.id}_${k}`,
        terms: [
          [prevE!, 1],
          [prevP!, s.efficiency * dt],
        ],
        op: '>=',
        rhs: need,
      });
      pending = st.runKwh ?? 0;
    });
  }
  // Format extensions, read here on their own: other load by local hour, limit windows.
  const otherAt = (t: number): number =>
    s.site.otherLoadByHourKw ? s.site.otherLoadByHourKw[wk(t).hour] : s.site.otherLoadKw;
  const limitAt = (t: number): number =>
    (s.site.limitWindows ?? []).reduce(
      (lim: number, w: RawJson) =>
        ms(w.from) < slotStart(t) + 900_000 && ms(w.to) > slotStart(t) ? Math.min(lim, w.limitKw) : lim,
      s.site.limitKw,
    );
  const df = v('D_facility');
  const dk = v('D_onpeak');
  rows.push({ name: 'df0', terms: [[df, 1]], op: '>=', rhs: s.tariff.peaksSoFarKw.facility });
  rows.push({ name: 'dk0', terms: [[dk, 1]], op: '>=', rhs: s.tariff.peaksSoFarKw['on-peak'] });
  objective.push([df, s.tariff.facilityDemandCharge], [dk, s.tariff.periods[0].demandCharge]);
  offset -=
    s.tariff.facilityDemandCharge * s.tariff.peaksSoFarKw.facility +
    s.tariff.periods[0].demandCharge * s.tariff.peaksSoFarKw['on-peak'];
  for (let t = 0; t < T; t++) {
    const k = period(t);
    const price = k < 0 ? s.tariff.offPeakPrice : s.tariff.periods[k].price;
    for (const [p] of load[t]!) objective.push([p, price * dt]);
    const other = otherAt(t);
    // The other load alone sets a floor under both peaks, charging or not.
    rows.push({ name: `facOther_${t}`, terms: [[df, 1]], op: '>=', rhs: other });
    if (k === 0) rows.push({ name: `onpOther_${t}`, terms: [[dk, 1]], op: '>=', rhs: other });
    if (load[t]!.length === 0) continue;
    rows.push({ name: `site_${t}`, terms: load[t]!, op: '<=', rhs: limitAt(t) - other });
    rows.push({ name: `cab_${t}`, terms: load[t]!, op: '<=', rhs: s.cabinets[0].limitKw });
    rows.push({ name: `fac_${t}`, terms: [...load[t]!, [df, -1]], op: '<=', rhs: -other });
    if (k === 0) rows.push({ name: `onp_${t}`, terms: [...load[t]!, [dk, -1]], op: '<=', rhs: -other });
  }
  return { objective, offset, rows, vars };
}

async function solveWithGlpk(lp: WrittenLp): Promise<number> {
  const glpk = await GLPK();
  const type = (op: Row['op']) => (op === '<=' ? glpk.GLP_UP : op === '>=' ? glpk.GLP_LO : glpk.GLP_FX);
  const res = glpk.solve(
    {
      name: 'depot',
      objective: { direction: glpk.GLP_MIN, name: 'cost', vars: lp.objective.map(([name, coef]) => ({ name, coef })) },
      subjectTo: lp.rows.map((r) => ({
        name: r.name,
        vars: r.terms.map(([name, coef]) => ({ name, coef })),
        bnds: { type: type(r.op), lb: r.rhs, ub: r.rhs },
      })),
    },
    { msglev: glpk.GLP_MSG_OFF, presol: false },
  );
  // Pitfall: with presolve glpk.js returns status 1 (undefined) and z = 0 on an infeasible LP.
  expect(res.result.status).toBe(glpk.GLP_OPT);
  return res.result.z + lp.offset;
}

function solveWithJsLp(lp: WrittenLp): number {
  const constraints: Record<string, { max?: number; min?: number; equal?: number }> = {};
  const variables: Record<string, Record<string, number>> = {};
  for (const name of lp.vars) variables[name] = { cost: 0 };
  for (const [name, coef] of lp.objective) variables[name]!['cost'] = (variables[name]!['cost'] ?? 0) + coef;
  for (const r of lp.rows) {
    constraints[r.name] = r.op === '<=' ? { max: r.rhs } : r.op === '>=' ? { min: r.rhs } : { equal: r.rhs };
    for (const [name, coef] of r.terms) variables[name]![r.name] = (variables[name]![r.name] ?? 0) + coef;
  }
  const res = solverJs.Solve({ optimize: 'cost', opType: 'min', constraints, variables }) as SolveResult;
  // Pitfall: an infeasible model comes back as feasible: false with result 0.
  expect(res.feasible).toBe(true);
  expect(res.bounded).not.toBe(false);
  return res.result + lp.offset;
}

async function enginePlan(input: ScenarioInput) {
  const parsed = parseScenario(input);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
  const plan = await planScenario(parsed.scenario, { timeBudgetMs: 2000, maxMoves: 200 });
  expect(checkPlan(input, plan)).toEqual([]);
  return plan;
}

describe('engine optimum against independent solvers', () => {
  const glpkCases: [number, number, boolean][] = [
    [11, 2, false],
    [12, 4, true],
    [13, 6, false],
    [14, 5, true],
  ];
  it.each(glpkCases)('glpk.js: seed %i, %i buses (two stays: %s)', async (seed, buses, twoStays) => {
    const input = smallDepot(seed, buses, { start: '2026-01-13T12:00', end: '2026-01-14T09:00', twoStays });
    const plan = await enginePlan(input);
    const optimum = await solveWithGlpk(writeLp(input));
    expect(plan.status).toBe('optimal');
    expect(Math.abs(plan.cost.total - optimum) / optimum).toBeLessThan(1e-6);
  });

  it('glpk.js: other load by hour and a load-reduction window (format extensions)', async () => {
    const input = smallDepot(15, 4, { start: '2026-01-13T12:00', end: '2026-01-14T09:00' });
    // Busy evening in the workshop, quiet night; the utility asks for 45 kW from 01:00 to 03:10.
    input.site.otherLoadByHourKw = [
      20, 20, 20, 20, 20, 30, 40, 40, 40, 40, 40, 40, 40, 40, 40, 40, 90, 110, 120, 100, 60, 40, 30, 20,
    ];
    input.site.limitWindows = [{ from: '2026-01-14T01:00', to: '2026-01-14T03:10', limitKw: 45 }];
    const plan = await enginePlan(input);
    const optimum = await solveWithGlpk(writeLp(input));
    expect(plan.status).toBe('optimal');
    expect(Math.abs(plan.cost.total - optimum) / optimum).toBeLessThan(1e-6);
    // 03:00-03:15 is touched by the window, so it holds there too.
    expect(plan.slots.find((x) => x.start.startsWith('2026-01-14T03:00'))!.limitKw).toBe(45);
    expect(plan.slots.find((x) => x.start.startsWith('2026-01-14T03:15'))!.limitKw).toBe(input.site.limitKw);
    // Both extensions bind: without them the optimum is lower.
    const plain = await enginePlan({
      ...input,
      site: { limitKw: input.site.limitKw, otherLoadKw: input.site.otherLoadKw },
    });
    expect(plain.cost.total).toBeLessThan(plan.cost.total - 1);
    const noWindow = await enginePlan({ ...input, site: { ...input.site, limitWindows: undefined } });
    expect(noWindow.cost.total).toBeLessThan(plan.cost.total - 1e-3);
  });

  const jsCases: [number, number][] = [
    [21, 2],
    [22, 3],
  ];
  it.each(jsCases)('javascript-lp-solver: seed %i, %i buses', async (seed, buses) => {
    const input = smallDepot(seed, buses, { start: '2026-01-13T17:00', end: '2026-01-14T08:00' });
    const plan = await enginePlan(input);
    const optimum = solveWithJsLp(writeLp(input));
    expect(plan.status).toBe('optimal');
    expect(Math.abs(plan.cost.total - optimum) / optimum).toBeLessThan(1e-6);
  });
});
