import type { Charger } from '@nightyard/contracts';
import { depotParts } from '@nightyard/contracts/depot-time';

/**
 * Is the charger out of service at this instant? One out for a period (depot time, either end
 * open) counts as in service outside it; one out without a period is out until put back.
 */
export function outAt(c: Pick<Charger, 'status' | 'outFrom' | 'outUntil'>, at: Date, timeZone: string): boolean {
  if (c.status !== 'out_of_service') return false;
  const p = depotParts(at, timeZone);
  const local = `${p.date}T${p.time}`;
  return (!c.outFrom || c.outFrom <= local) && (!c.outUntil || local < c.outUntil);
}
