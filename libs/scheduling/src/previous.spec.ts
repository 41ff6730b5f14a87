import { describe, expect, it } from 'vitest';
import { notKeptWhy } from './previous.js';

describe('why a plan was not kept, in words', () => {
  it('names a shortfall in kWh and a cost in money, never weighing one against the other', () => {
    const subject = 'the plan being carried out';
    expect(notKeptWhy(subject, { extraCost: 41.68, extraShortKwh: 0, allowed: 5 }, 'USD')).toBe(
      "the plan being carried out could not be kept within the depot's cost tolerance (keeping it: $41.68 more, where $5.00 is allowed)",
    );
    // Before: "(keeping it: 24.7 kWh more short, where $5.00 is allowed)".
    expect(notKeptWhy(subject, { extraCost: 0, extraShortKwh: 24.7, allowed: 5 }, 'USD')).toBe(
      'the plan being carried out could not be kept: keeping it would leave buses 24.7 kWh short that a new plan delivers',
    );
    expect(notKeptWhy(subject, { extraCost: 53.59, extraShortKwh: 160.7, allowed: 5 }, 'USD')).toBe(
      'the plan being carried out could not be kept: keeping it would leave buses 160.7 kWh short that a new plan delivers, and cost $53.59 more, where $5.00 is allowed',
    );
    expect(notKeptWhy('the published plan', null, 'USD')).toBe(
      "the published plan could not be kept within the depot's cost tolerance",
    );
  });
});
