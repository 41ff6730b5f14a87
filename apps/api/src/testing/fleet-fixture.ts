import type { Db } from '../db/client';
import { buses } from '../db/schema';

/** Four invented buses for a test depot. */
export async function addBuses(db: Db, organisationId: string, depotId: string, numbers = ['11', '12', '13', '14']) {
  return db
    .insert(buses)
    .values(
      numbers.map((number, i) => ({
        organisationId,
        depotId,
        number,
        usableKwh: i % 2 ? 155 : 196,
        maxChargeKw: 60,
        connector: 'SAE J1772 CCS1',
        kwhPerMile: 1.2,
        ceilingPct: 90,
        reservePct: 15,
        taperStartPct: 85,
      })),
    )
    .returning();
}

/** A school day for each bus: morning run, midday layover, afternoon run (local times). */
export function dayRuns(date: string, numbers: string[], soc: (i: number) => number | null = () => null) {
  return numbers.flatMap((n, i) => [
    {
      busNumber: n,
      pullOut: `${date}T06:${String(10 + i * 5).padStart(2, '0')}`,
      pullIn: `${date}T08:40`,
      miles: 30 + i,
    },
    {
      busNumber: n,
      pullOut: `${date}T14:${String(10 + i * 5).padStart(2, '0')}`,
      pullIn: `${date}T16:${String(20 + i * 5).padStart(2, '0')}`,
      miles: 28 + i,
      arrivalSocPct: soc(i),
    },
  ]);
}
