import { describe, expect, it } from 'vitest';
import { runsChanged } from './runs-changed';

const bus = (id: string, departMinKwh = 60, arrivalKwh = 40, depart = '2026-12-11T06:30') => ({
  id,
  arrivalKwh,
  stays: [{ arrive: '2026-12-10T16:30', depart, departMinKwh }],
});
const of = (...buses: ReturnType<typeof bus>[]) => ({ buses }) as never;

describe('runsChanged', () => {
  it('names buses whose needs, arrival, times or runs changed; an absent bus left out on purpose is not one', () => {
    const planned = of(bus('201'), bus('202'), bus('203'), bus('204'), bus('210'));
    const now = of(
      bus('201', 60.04), // rounding: the same
      bus('202', 75), // a colder morning: more energy
      bus('203', 60, 25), // a state of charge entered below the estimate
      bus('204', 60, 40, '2026-12-11T06:10'), // an earlier pull-out
      bus('205'), // runs added
      bus('212'), // reported absent tonight: the revision left it out
    );
    expect(runsChanged(planned, now, ['212'])).toEqual(['202', '203', '204', '205', '210']);
  });
});
