import { DateTime } from 'luxon';
import type { PlanResult } from '@nightyard/contracts';
import type { Scenario } from '@nightyard/scheduling';

/** A version as Compare reads its inputs: what it was planned from and what it says it planned under. */
export interface VersionInputs {
  version: number;
  scenario: Scenario;
  result: PlanResult;
  /** Whether the version plans the midday layover too (its buses' stays and arrivals follow from it). */
  includesMidday: boolean;
}

const kw = (v: number) => `${Math.round(v * 10) / 10} kW`;
const differs = (a: number, b: number) => Math.abs(a - b) > 1e-6;
/** Up to five bus numbers, then how many more. */
const some = (ids: readonly string[]) =>
  ids.length <= 5 ? ids.join(', ') : `${ids.slice(0, 5).join(', ')} and ${ids.length - 5} more`;

/**
 * How two versions of a night differ in what they were planned from, one sentence each: what a
 * cost difference owes to the inputs rather than to the plan (a bill with higher peaks so far, a
 * lower service limit, a charger out). Empty when both were planned from the same inputs.
 */
export function versionInputChanges(a: VersionInputs, b: VersionInputs): string[] {
  const va = `version ${a.version}`;
  const vb = `version ${b.version}`;
  const pair = (x: string, y: string) => `${x} in ${va}, ${y} in ${vb}`;
  const out: string[] = [];
  const sa = a.scenario;
  const sb = b.scenario;

  if (differs(sa.site.limitKw, sb.site.limitKw))
    out.push(`Service limit ${pair(kw(sa.site.limitKw), kw(sb.site.limitKw))}`);
  const names = [...new Set([...Object.keys(sa.tariff.peaksSoFarKw), ...Object.keys(sb.tariff.peaksSoFarKw)])].sort();
  for (const name of names) {
    const x = sa.tariff.peaksSoFarKw[name] ?? 0;
    const y = sb.tariff.peaksSoFarKw[name] ?? 0;
    if (differs(x, y)) out.push(`The billing period's ${name} peak so far ${pair(kw(x), kw(y))}`);
  }
  const targets = (r: PlanResult) => new Map((r.target?.peaks ?? []).map((p) => [p.name, p.targetKw]));
  const ta = targets(a.result);
  const tb = targets(b.result);
  for (const name of [...new Set([...ta.keys(), ...tb.keys()])].sort()) {
    const x = ta.get(name);
    const y = tb.get(name);
    if (x === undefined || y === undefined || differs(x, y))
      out.push(`Demand target (${name}) ${pair(x === undefined ? 'none' : kw(x), y === undefined ? 'none' : kw(y))}`);
  }
  // Prices and charges, not the periods' hours: those are cut to each version's horizon.
  const rates = (s: Scenario) =>
    JSON.stringify([
      s.tariff.currency,
      s.tariff.offPeakPrice,
      s.tariff.facilityDemandCharge,
      s.tariff.periods.map((p) => [p.name, p.price, p.demandCharge]),
    ]);
  if (rates(sa) !== rates(sb)) out.push(`The rate plan's prices differ between ${va} and ${vb}`);

  const zone = sb.timezone;
  const outOf = (r: PlanResult) =>
    new Map<string, string>(
      (r.outOfService ?? []).map((o) => [o.charger, DateTime.fromISO(o.from, { zone }).toFormat('HH:mm')]),
    );
  const oa = outOf(a.result);
  const ob = outOf(b.result);
  const chargers = [...new Set([...sa.chargers, ...sb.chargers].map((c) => c.id))].sort();
  for (const id of chargers) {
    const inA = sa.chargers.some((c) => c.id === id);
    const inB = sb.chargers.some((c) => c.id === id);
    if (!inA || !inB) out.push(`Charger ${id} is planned on in ${inA ? va : vb} only`);
    else if (oa.get(id) !== ob.get(id))
      out.push(
        `Charger ${id} ${pair(oa.has(id) ? `out of service from ${oa.get(id)}` : 'in service', ob.has(id) ? `out of service from ${ob.get(id)}` : 'in service')}`,
      );
  }

  const busesA = new Map(sa.buses.map((x) => [x.id, x]));
  const busesB = new Map(sb.buses.map((x) => [x.id, x]));
  const onlyA = [...busesA.keys()].filter((id) => !busesB.has(id));
  const onlyB = [...busesB.keys()].filter((id) => !busesA.has(id));
  if (onlyA.length) out.push(`${onlyA.length === 1 ? 'Bus' : 'Buses'} ${some(onlyA)} planned in ${va} only`);
  if (onlyB.length) out.push(`${onlyB.length === 1 ? 'Bus' : 'Buses'} ${some(onlyB)} planned in ${vb} only`);
  if (a.includesMidday !== b.includesMidday) {
    const [leaves, plans] = a.includesMidday ? [vb, va] : [va, vb];
    out.push(`${leaves[0]!.toUpperCase()}${leaves.slice(1)} leaves out the midday layover; ${plans} plans it`);
    return out;
  }
  const both = [...busesA.keys()].filter((id) => busesB.has(id));
  const stays = (x: Scenario['buses'][number]) =>
    x.stays.map((s) => `${s.arrive}-${s.depart}-${s.departMinKwh}`).join();
  const runs = both.filter((id) => stays(busesA.get(id)!) !== stays(busesB.get(id)!));
  if (runs.length) out.push(`Runs or pull-out needs differ for ${runs.length === 1 ? 'bus' : 'buses'} ${some(runs)}`);
  const arrivals = both.filter((id) => differs(busesA.get(id)!.arrivalKwh, busesB.get(id)!.arrivalKwh));
  if (arrivals.length)
    out.push(
      `Arrival energy differs for ${arrivals.length === 1 ? 'bus' : 'buses'} ${some(arrivals)} (readings, runs or the fleet)`,
    );
  return out;
}
