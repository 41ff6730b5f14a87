import type { IntervalDemand } from './bill.js';

/** One meter reading: start (epoch ms), length (minutes) and energy drawn in it (kWh). */
export interface MeterReading {
  startMs: number;
  minutes: number;
  kwh: number;
}

const QUARTER_MS = 15 * 60_000;

/**
 * Meter readings as quarter-hour energy, the interval the demand charge is billed on: shorter
 * readings are added up into their quarter hour, longer ones spread evenly over theirs (a 30- or
 * 60-minute meter cannot tell how the load varied inside). A quarter hour whose readings are not
 * all there is left out, so a missing 5-minute reading never passes for a low quarter. Readings
 * are expected on the clock's marks (the import checks it); one that is not counts in the
 * quarters it overlaps, by the minutes it covers in each. Sorted by start.
 */
export function quarterHours(readings: readonly MeterReading[]): IntervalDemand[] {
  const kwh = new Map<number, number>();
  const covered = new Map<number, number>();
  for (const r of readings) {
    const startMs = r.startMs;
    const endMs = startMs + r.minutes * 60_000;
    for (let q = Math.floor(startMs / QUARTER_MS) * QUARTER_MS; q < endMs; q += QUARTER_MS) {
      const overlap = Math.min(endMs, q + QUARTER_MS) - Math.max(startMs, q);
      if (overlap <= 0) continue;
      kwh.set(q, (kwh.get(q) ?? 0) + (r.kwh * overlap) / (endMs - startMs));
      covered.set(q, (covered.get(q) ?? 0) + overlap);
    }
  }
  const out: IntervalDemand[] = [];
  // A millisecond's slack for readings whose lengths are not whole minutes in floating point.
  for (const [startMs, ms] of covered) if (ms >= QUARTER_MS - 1) out.push({ startMs, kwh: kwh.get(startMs)! });
  return out.sort((a, b) => a.startMs - b.startMs);
}
