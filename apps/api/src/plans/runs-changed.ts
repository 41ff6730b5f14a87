import type { Scenario } from '@nightyard/scheduling';

/** Within this, an energy is the same (the scenarios keep kWh to the hundredth). */
const SAME_KWH = 0.05;

type Buses = Pick<Scenario, 'buses'>;

/**
 * The buses whose night is not the one a plan was made for, in bus order: runs added or removed,
 * a pull-in or pull-out moved, the energy its runs need or its arrival energy changed (a colder
 * forecast, a state of charge entered). Buses reported absent tonight (`absent`) are left out of
 * the plan on purpose, not changed.
 */
export function runsChanged(planned: Buses, now: Buses, absent: readonly string[] = []): string[] {
  const before = new Map(planned.buses.map((b) => [b.id, b]));
  const after = new Map(now.buses.map((b) => [b.id, b]));
  const changed: string[] = [];
  for (const id of new Set([...before.keys(), ...after.keys()])) {
    const a = before.get(id);
    const b = after.get(id);
    if (!a || !b) {
      if (!absent.includes(id)) changed.push(id);
      continue;
    }
    const same =
      Math.abs(a.arrivalKwh - b.arrivalKwh) <= SAME_KWH &&
      a.stays.length === b.stays.length &&
      a.stays.every((s, i) => {
        const t = b.stays[i]!;
        return s.arrive === t.arrive && s.depart === t.depart && Math.abs(s.departMinKwh - t.departMinKwh) <= SAME_KWH;
      });
    if (!same) changed.push(id);
  }
  return changed.sort((x, y) => x.localeCompare(y, 'en', { numeric: true }));
}
