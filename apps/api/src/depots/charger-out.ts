/** What tells whether a charger is out: its status and the period it is out (either end open). */
export interface ChargerOutFields {
  status: 'in_service' | 'out_of_service';
  outFrom: Date | null;
  outUntil: Date | null;
}

/**
 * Is the charger out of service at some moment of [from, to)? An out-of-service charger without a
 * period is out throughout; with one, only inside it, and counts as in service outside it.
 */
export function outDuring(c: ChargerOutFields, from: Date, to: Date): boolean {
  if (c.status !== 'out_of_service') return false;
  const a = c.outFrom?.getTime() ?? -Infinity;
  const b = c.outUntil?.getTime() ?? Infinity;
  return a < to.getTime() && b > from.getTime();
}
