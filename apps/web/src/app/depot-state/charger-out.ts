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

/** "from Dec 10 06:00 until Dec 12 18:00" (depot time), or null without a period. */
export function outPeriod(c: Pick<Charger, 'outFrom' | 'outUntil'>): string | null {
  const show = (local: string) => `${local.slice(0, 10)} ${local.slice(11, 16)}`;
  const parts = [c.outFrom ? `from ${show(c.outFrom)}` : '', c.outUntil ? `until ${show(c.outUntil)}` : ''].filter(
    Boolean,
  );
  return parts.length ? parts.join(' ') : null;
}
