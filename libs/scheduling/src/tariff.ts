import type { Scenario } from './scenario.js';

/** The tariff as the cost code needs it: per-slot facts come from the slots. */
export interface Tariff {
  currency: string;
  facilityDemandCharge: number;
  facilityPeakSoFarKw: number;
  periods: { name: string; price: number; demandCharge: number; peakSoFarKw: number }[];
}

/** What costLoad needs of a slot (a subset of Slot, so a bill engine can pass its own). */
export interface CostSlot {
  price: number;
  period: number;
  otherKw: number;
}

export interface Cost {
  energy: number;
  demand: number;
  total: number;
  /** Highest site demand (charging + other load) in the horizon. */
  peakKw: number;
  /** Demand charge parts: facility and each period with its peak. */
  demandParts: { name: string; peakKw: number; peakSoFarKw: number; rate: number; cost: number }[];
}

export function tariffOf(scenario: Scenario): Tariff {
  const t = scenario.tariff;
  return {
    currency: t.currency,
    facilityDemandCharge: t.facilityDemandCharge,
    facilityPeakSoFarKw: t.peaksSoFarKw['facility'] ?? 0,
    periods: t.periods.map((p) => ({
      name: p.name,
      price: p.price,
      demandCharge: p.demandCharge,
      peakSoFarKw: t.peaksSoFarKw[p.name] ?? 0,
    })),
  };
}

/**
 * Costs a charging load series (kW per slot, grid side) under the tariff. Energy is the charging
 * energy only (the other load costs the same under every plan); demand is charged on the site's
 * demand (charging + other load), only on the part above the billing period's peak so far.
 */
export function costLoad(
  slots: readonly CostSlot[],
  chargingKw: ArrayLike<number>,
  tariff: Tariff,
  slotHours: number,
): Cost {
  let energy = 0;
  let peak = 0;
  const periodPeak = tariff.periods.map(() => 0);
  for (let t = 0; t < slots.length; t++) {
    const s = slots[t]!;
    const charging = chargingKw[t] ?? 0;
    energy += s.price * charging * slotHours;
    const load = charging + s.otherKw;
    if (load > peak) peak = load;
    if (s.period >= 0 && load > periodPeak[s.period]!) periodPeak[s.period] = load;
  }
  const demandParts: Cost['demandParts'] = [];
  const facilityCost = tariff.facilityDemandCharge * Math.max(0, peak - tariff.facilityPeakSoFarKw);
  demandParts.push({
    name: 'facility',
    peakKw: peak,
    peakSoFarKw: tariff.facilityPeakSoFarKw,
    rate: tariff.facilityDemandCharge,
    cost: facilityCost,
  });
  let demand = facilityCost;
  tariff.periods.forEach((p, k) => {
    const cost = p.demandCharge * Math.max(0, periodPeak[k]! - p.peakSoFarKw);
    demand += cost;
    demandParts.push({ name: p.name, peakKw: periodPeak[k]!, peakSoFarKw: p.peakSoFarKw, rate: p.demandCharge, cost });
  });
  return { energy, demand, total: energy + demand, peakKw: peak, demandParts };
}
