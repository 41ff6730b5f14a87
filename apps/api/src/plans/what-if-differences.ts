import type { Scenario } from '@nightyard/scheduling';

/** A charger of the depot as it is now (in service or not). */
export interface DepotCharger {
  label: string;
  status: 'in_service' | 'out_of_service';
  statusReason: string | null;
}

const n = (v: number) => `${Math.round(v * 10) / 10}`;
const price = (v: number, currency: string) =>
  `${v.toLocaleString('en-US', { minimumFractionDigits: 2, maximumFractionDigits: 4, useGrouping: false })} ${currency}`;
const differs = (a: number, b: number) => Math.abs(a - b) > 1e-6;
const hhmm = (local: string) => local.slice(11);

/**
 * How a what-if's scenario (the study) differs from the night built from the depot as it is now:
 * one plain sentence per difference, the site first, then the rate plan, then the buses. An empty
 * list means the study still describes the depot.
 */
export function whatIfDifferences(study: Scenario, now: Scenario, depotChargers: readonly DepotCharger[]): string[] {
  const out: string[] = [];
  if (study.start !== now.start || study.end !== now.end) {
    out.push(
      `Night in the study ${hhmm(study.start)} to ${hhmm(study.end)}, from the runs now ${hhmm(now.start)} to ${hhmm(now.end)}`,
    );
  }
  if (study.slotMinutes !== now.slotMinutes)
    out.push(`Slots in the study ${study.slotMinutes} minutes, depot plans ${now.slotMinutes} minutes`);
  if (differs(study.efficiency, now.efficiency))
    out.push(
      `Charging efficiency in the study ${n(study.efficiency * 100)} %, depot plans ${n(now.efficiency * 100)} %`,
    );
  out.push(...siteDifferences(study, now, depotChargers));
  out.push(...tariffDifferences(study, now));
  out.push(...busDifferences(study, now));
  return out;
}

function siteDifferences(study: Scenario, now: Scenario, depotChargers: readonly DepotCharger[]): string[] {
  const out: string[] = [];
  if (differs(study.site.limitKw, now.site.limitKw))
    out.push(`Service limit in the study ${n(study.site.limitKw)} kW, depot now ${n(now.site.limitKw)} kW`);
  const peakOther = (s: Scenario) =>
    s.site.otherLoadByHourKw ? Math.max(...s.site.otherLoadByHourKw) : s.site.otherLoadKw;
  if (
    differs(peakOther(study), peakOther(now)) ||
    JSON.stringify(study.site.otherLoadByHourKw ?? null) !== JSON.stringify(now.site.otherLoadByHourKw ?? null)
  ) {
    out.push(
      `Other building load in the study up to ${n(peakOther(study))} kW, depot now up to ${n(peakOther(now))} kW`,
    );
  }
  const windows = (s: Scenario) =>
    (s.site.limitWindows ?? []).map((w) => `${hhmm(w.from)}-${hhmm(w.to)} at ${n(w.limitKw)} kW`).join(', ') || 'none';
  if (windows(study) !== windows(now))
    out.push(`Load-reduction windows in the study: ${windows(study)}; depot now: ${windows(now)}`);

  const nowChargers = new Map(now.chargers.map((c) => [c.id, c]));
  const studyChargers = new Map(study.chargers.map((c) => [c.id, c]));
  for (const c of study.chargers) {
    const current = nowChargers.get(c.id);
    if (current) {
      if (differs(c.maxKw, current.maxKw))
        out.push(`Charger ${c.id} in the study ${n(c.maxKw)} kW, depot now ${n(current.maxKw)} kW`);
      if ((c.cabinet ?? null) !== (current.cabinet ?? null)) {
        out.push(
          `Charger ${c.id} in the study on ${c.cabinet ? `power cabinet ${c.cabinet}` : 'no power cabinet'}, depot now ${current.cabinet ? `on power cabinet ${current.cabinet}` : 'on none'}`,
        );
      }
      continue;
    }
    const known = depotChargers.find((d) => d.label === c.id);
    out.push(
      known?.status === 'out_of_service'
        ? `Charger ${c.id} out of service now${known.statusReason ? ` (${known.statusReason})` : ''}: left out`
        : `Charger ${c.id} is in the study but not at the depot: left out`,
    );
  }
  for (const c of now.chargers)
    if (!studyChargers.has(c.id)) out.push(`Charger ${c.id} in service now but not in the study: included`);
  const nowCabinets = new Map(now.cabinets.map((c) => [c.id, c.limitKw]));
  for (const c of study.cabinets) {
    const limit = nowCabinets.get(c.id);
    if (limit !== undefined && differs(limit, c.limitKw))
      out.push(`Power cabinet ${c.id} in the study ${n(c.limitKw)} kW, depot now ${n(limit)} kW`);
  }
  return out;
}

function tariffDifferences(study: Scenario, now: Scenario): string[] {
  const a = study.tariff;
  const b = now.tariff;
  const out: string[] = [];
  if (a.currency !== b.currency)
    out.push(`Rate plan changed: currency in the study ${a.currency}, depot now ${b.currency}`);
  if (differs(a.offPeakPrice, b.offPeakPrice)) {
    out.push(
      `Rate plan changed: off-peak energy in the study ${price(a.offPeakPrice, a.currency)}/kWh, depot now ${price(b.offPeakPrice, b.currency)}/kWh`,
    );
  }
  if (differs(a.facilityDemandCharge, b.facilityDemandCharge)) {
    out.push(
      `Rate plan changed: facility demand charge in the study ${price(a.facilityDemandCharge, a.currency)}/kW, depot now ${price(b.facilityDemandCharge, b.currency)}/kW`,
    );
  }
  const nowPeriods = new Map(b.periods.map((p) => [p.name, p]));
  for (const p of a.periods) {
    const q = nowPeriods.get(p.name);
    if (!q) {
      out.push(`Rate plan changed: period ${p.name} is in the study but not in the depot's rate plan now`);
      continue;
    }
    if (differs(p.price, q.price))
      out.push(
        `Rate plan changed: ${p.name} energy in the study ${price(p.price, a.currency)}/kWh, depot now ${price(q.price, b.currency)}/kWh`,
      );
    if (differs(p.demandCharge, q.demandCharge)) {
      out.push(
        `Rate plan changed: ${p.name} demand charge in the study ${price(p.demandCharge, a.currency)}/kW, depot now ${price(q.demandCharge, b.currency)}/kW`,
      );
    }
    if (JSON.stringify(p.windows) !== JSON.stringify(q.windows))
      out.push(`Rate plan changed: the hours of ${p.name} differ from the study`);
  }
  const studyPeriods = new Set(a.periods.map((p) => p.name));
  for (const q of b.periods)
    if (!studyPeriods.has(q.name)) out.push(`Rate plan changed: period ${q.name} applies now but is not in the study`);
  const peaks = (s: Scenario) =>
    Object.entries(s.tariff.peaksSoFarKw)
      .sort(([x], [y]) => x.localeCompare(y))
      .map(([k, v]) => `${k} ${n(v)} kW`)
      .join(', ') || 'none';
  if (peaks(study) !== peaks(now))
    out.push(`Billing period's peaks so far in the study: ${peaks(study)}; now: ${peaks(now)}`);
  return out;
}

function busDifferences(study: Scenario, now: Scenario): string[] {
  const out: string[] = [];
  const nowBuses = new Map(now.buses.map((b) => [b.id, b]));
  const studyBuses = new Set(study.buses.map((b) => b.id));
  for (const b of study.buses) {
    const c = nowBuses.get(b.id);
    if (!c) {
      out.push(`Bus ${b.id} is in the study but has no run to plan for now (or is not active): left out`);
      continue;
    }
    if (differs(b.usableKwh, c.usableKwh))
      out.push(`Bus ${b.id} usable battery in the study ${n(b.usableKwh)} kWh, fleet now ${n(c.usableKwh)} kWh`);
    if (differs(b.maxKw, c.maxKw))
      out.push(`Bus ${b.id} charge acceptance in the study ${n(b.maxKw)} kW, fleet now ${n(c.maxKw)} kW`);
    if (differs(b.arrivalKwh, c.arrivalKwh))
      out.push(
        `Bus ${b.id} arrives in the study with ${n(b.arrivalKwh)} kWh, the day's data now says ${n(c.arrivalKwh)} kWh`,
      );
    if (differs(b.reserveKwh, c.reserveKwh))
      out.push(`Bus ${b.id} reserve in the study ${n(b.reserveKwh)} kWh, fleet now ${n(c.reserveKwh)} kWh`);
    if (differs(b.ceilingKwh ?? b.usableKwh, c.ceilingKwh ?? c.usableKwh)) {
      out.push(
        `Bus ${b.id} ceiling in the study ${n(b.ceilingKwh ?? b.usableKwh)} kWh, fleet now ${n(c.ceilingKwh ?? c.usableKwh)} kWh`,
      );
    }
    const stays = (x: Scenario['buses'][number]) =>
      x.stays.map((s) => `${hhmm(s.arrive)}-${hhmm(s.depart)}`).join(', ');
    if (stays(b) !== stays(c))
      out.push(`Bus ${b.id} at the depot in the study ${stays(b)}, from the runs now ${stays(c)}`);
    const need = (x: Scenario['buses'][number]) => x.stays.at(-1)!.departMinKwh;
    if (differs(need(b), need(c)))
      out.push(`Bus ${b.id} must leave in the study with ${n(need(b))} kWh, from the runs now ${n(need(c))} kWh`);
  }
  for (const c of now.buses)
    if (!studyBuses.has(c.id)) out.push(`Bus ${c.id} has runs now but is not in the study: included`);
  return out;
}
