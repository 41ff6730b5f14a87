import { describe, expect, it } from 'vitest';
import { runInputSchema } from './fleet';

describe('a run as entered or uploaded', () => {
  it('says what to fix for an absurd figure, not the validator\'s "Too big: expected number to be <=1000"', () => {
    const run = { busNumber: '201', pullOut: '2026-12-07T06:10', pullIn: '2026-12-07T08:40' };
    const miles = runInputSchema.safeParse({ ...run, miles: 5000 });
    expect(miles.success).toBe(false);
    expect(miles.error!.issues.map((i) => [i.path.join('.'), i.message])).toEqual([
      ['miles', 'At most 1,000 miles a run: check the figure'],
    ]);
    const kwh = runInputSchema.safeParse({ ...run, kwh: 9000 });
    expect(kwh.error!.issues.map((i) => [i.path.join('.'), i.message])).toEqual([
      ['kwh', 'At most 2,000 kWh a run: check the figure'],
    ]);
    expect(runInputSchema.safeParse({ ...run, miles: 1000 }).success).toBe(true);
  });
});
