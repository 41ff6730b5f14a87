import { DateTime } from 'luxon';
import { describe, expect, it } from 'vitest';
import { footedCents, ratePlanDefinitionSchema, toCents } from '@nightyard/contracts';
import { planScenario, type Plan } from '../plan.js';
import { prepareProblem } from '../problem.js';
import { parseScenario } from '../scenario.js';
import { generateDepot } from '../testing/generate-depot.js';
import { computeBill, type IntervalDemand } from './bill.js';

// Reconciliation properties over random plans (generated depots, fixed seeds): the figures of a
// night and of its billing period add up, whatever the depot.
//  - the buses' costs sum to the night's charging total, and shown to the cent they foot to it;
//  - the nights' charging, the building's own load and the fixed charges make the period's bill;
//  - the saving (the period billed with the baselines minus with the plans) never exceeds the
//    baseline's bill;
//  - no baseline's site load ever passes the service limit.

const ZONE = 'America/Chicago';
const SLOT_MS = 15 * 60_000;
/** The generated depots' tariff (generate-depot.ts) as a rate plan for the bill engine, plus a customer charge. */
const RATE = ratePlanDefinitionSchema.parse({
  currency: 'USD',
  seasons: [
    {
      name: 'All year',
      fromMonth: 1,
      toMonth: 12,
      offPeakPrice: 0.09,
      facilityDemandCharge: 12,
      periods: [
        {
          name: 'on-peak',
          price: 0.27,
          demandCharge: 9.5,
          windows: [{ dayTypes: ['weekday'], from: '16:00', to: '21:00' }],
        },
        {
          name: 'mid-peak',
          price: 0.14,
          demandCharge: 0,
          windows: [{ dayTypes: ['weekday'], from: '07:00', to: '16:00' }],
        },
      ],
    },
  ],
  fixedCharges: [{ name: 'Customer charge', amount: 45, per: 'month' }],
});

interface Night {
  plan: Plan;
  /** Epoch ms of the night's first slot once moved to its week (the generator's nights are all Wed 14 Jan 2026). */
  startMs: number;
  otherKw: number;
  limitKw: number;
  problem: ReturnType<typeof prepareProblem>;
}

async function nightOf(seed: number, buses: number, weeksOn: number): Promise<Night> {
  const input = generateDepot({ buses, seed, chargers: Math.max(2, Math.floor(buses / 2)) });
  const parsed = parseScenario(input);
  if (!parsed.ok) throw new Error('bad depot');
  const plan = await planScenario(parsed.scenario, { maxMoves: 20 });
  const startMs = DateTime.fromISO(input.start, { zone: ZONE }).plus({ weeks: weeksOn }).toMillis();
  return {
    plan,
    startMs,
    otherKw: input.site.otherLoadKw as number,
    limitKw: input.site.limitKw,
    problem: prepareProblem(parsed.scenario),
  };
}

/** Per-bus charging energy cost from the plan's sessions at the slots' prices (as the API's plan costs count it). */
function perBusEnergy(plan: Plan): Map<string, number> {
  const priceAt = new Map(plan.slots.map((s) => [Date.parse(s.start), s.price]));
  const out = new Map<string, number>();
  for (const s of plan.sessions) {
    const t0 = Date.parse(s.start);
    s.kw.forEach((kw, k) => out.set(s.bus, (out.get(s.bus) ?? 0) + kw * 0.25 * (priceAt.get(t0 + k * SLOT_MS) ?? 0)));
  }
  return out;
}

/** January 2026 with each night's site load (charging as given) and the building's load elsewhere. */
function period(nights: Night[], charging: (n: Night) => ArrayLike<number>, buildingKw: number) {
  const from = DateTime.fromISO('2026-01-01', { zone: ZONE }).toMillis();
  const to = DateTime.fromISO('2026-02-01', { zone: ZONE }).toMillis();
  const kw = new Map<number, number>();
  const other = new Map<number, number>();
  for (const n of nights) {
    const c = charging(n);
    n.plan.slots.forEach((_, t) => {
      kw.set(n.startMs + t * SLOT_MS, (c[t] ?? 0) + n.otherKw);
      other.set(n.startMs + t * SLOT_MS, n.otherKw);
    });
  }
  const intervals: IntervalDemand[] = [];
  const otherOnly: IntervalDemand[] = [];
  for (let t = from; t < to; t += SLOT_MS) {
    intervals.push({ startMs: t, kwh: (kw.get(t) ?? buildingKw) * 0.25 });
    otherOnly.push({ startMs: t, kwh: (other.get(t) ?? buildingKw) * 0.25 });
  }
  return { intervals, otherOnly, days: 31 };
}

const planCharging = (n: Night) => n.plan.slots.map((s, t) => s.loadKw - n.problem.slots[t]!.otherKw);
const baselineCharging = (n: Night) => n.plan.baselines[n.plan.baseline.kind].chargingKw;

describe.each([
  { seed: 101, buses: 6 },
  { seed: 202, buses: 10 },
  { seed: 303, buses: 14 },
])('reconciliation, depots of seed $seed ($buses buses)', ({ seed, buses }) => {
  // Three Wednesday nights of January 2026 (14, 21, 28): the same weekday, so the same prices.
  const nights = Promise.all([0, 1, 2].map((k) => nightOf(seed + k, buses + k, k)));

  it("per bus: the buses' charging costs sum to the night's, and their shown cents foot to its shown total", async () => {
    for (const n of await nights) {
      const perBus = [...perBusEnergy(n.plan).values()];
      const sum = perBus.reduce((a, b) => a + b, 0);
      expect(sum).toBeCloseTo(n.plan.cost.energy, 4);
      const shown = footedCents(perBus, toCents(sum));
      expect(Math.round(shown.reduce((a, b) => a + b, 0) * 100)).toBe(Math.round(toCents(sum) * 100));
      shown.forEach((s, i) => expect(Math.abs(s - perBus[i]!)).toBeLessThanOrEqual(0.01 + 1e-9));
    }
  }, 120_000);

  it("the period: nights' charging + the building's load + demand + fixed = the period's bill, and its lines foot", async () => {
    const ns = await nights;
    const { intervals, otherOnly, days } = period(ns, planCharging, ns[0]!.otherKw);
    const bill = computeBill(RATE, intervals, { zone: ZONE, intervalMinutes: 15, days });
    const buildingEnergy = computeBill(RATE, otherOnly, {
      zone: ZONE,
      intervalMinutes: 15,
      days,
      withoutFixed: true,
    }).energyTotal;
    const chargingEnergy = ns.reduce((a, n) => a + [...perBusEnergy(n.plan).values()].reduce((x, y) => x + y, 0), 0);
    expect(bill.energyTotal).toBeCloseTo(chargingEnergy + buildingEnergy, 6);
    expect(bill.fixedTotal).toBe(45);
    // Demand once a period: the highest interval of all (facility) and of the on-peak windows.
    const peak = Math.max(...intervals.map((i) => i.kwh * 4));
    expect(bill.demand.find((d) => d.name === 'Facility demand')!.quantity).toBeCloseTo(peak, 9);
    expect(bill.total).toBeCloseTo(chargingEnergy + buildingEnergy + bill.demandTotal + 45, 6);
    // Shown: sections foot to the total, lines to their sections.
    const sections = footedCents([bill.energyTotal, bill.demandTotal, bill.fixedTotal], toCents(bill.total));
    expect(Math.round(sections.reduce((a, b) => a + b, 0) * 100)).toBe(Math.round(toCents(bill.total) * 100));
    const energyLines = footedCents(
      bill.energy.map((l) => l.amount),
      sections[0],
    );
    expect(Math.round(energyLines.reduce((a, b) => a + b, 0) * 100)).toBe(Math.round(sections[0]! * 100));
  }, 120_000);

  it("the saving never exceeds the baseline's bill, and no baseline passes the service limit", async () => {
    const ns = await nights;
    const building = ns[0]!.otherKw;
    const onPlans = computeBill(RATE, period(ns, planCharging, building).intervals, {
      zone: ZONE,
      intervalMinutes: 15,
      days: 31,
    });
    const onBaselines = computeBill(RATE, period(ns, baselineCharging, building).intervals, {
      zone: ZONE,
      intervalMinutes: 15,
      days: 31,
    });
    const saving = onBaselines.total - onPlans.total;
    expect(saving).toBeLessThanOrEqual(onBaselines.total);
    // Nor can it exceed what charging costs under the baseline: the building and the fixed charges are in both bills.
    expect(onPlans.total).toBeGreaterThan(0);
    for (const n of ns) {
      for (const kind of ['arrival', 'timer'] as const) {
        const b = n.plan.baselines[kind];
        expect(b.peakKw).toBeLessThanOrEqual(n.limitKw + 1e-6);
        b.chargingKw.forEach((kw, t) =>
          expect(kw + n.problem.slots[t]!.otherKw).toBeLessThanOrEqual(n.problem.slots[t]!.limitKw + 1e-6),
        );
      }
    }
  }, 120_000);
});
