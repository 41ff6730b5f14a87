import { describe, expect, it } from 'vitest';
import type { PlanResult } from '@nightyard/contracts';
import { revisionEffect } from './revision-effect';

const plan = (total: number, demand = 0) =>
  ({ cost: { energy: total - demand, demand, total }, slots: [{ loadKw: 100 }], buses: [] }) as unknown as PlanResult;

describe("a revision's effect in words", () => {
  it('gives the change from the unrounded totals, as Compare does, beside the totals in cents', () => {
    // $64.196 to $62.644: shown as $64.20 and $62.64, whose difference in cents is $1.56; the
    // change is $1.552, which Compare shows as $1.55.
    const e = revisionEffect(plan(64.196), plan(62.644), 'USD');
    expect(e.costBefore).toBe(64.2);
    expect(e.costAfter).toBe(62.64);
    expect(e.lines[0]).toBe("The night's projected cost is $1.55 lower: $62.64, was $64.20.");
  });

  it('says a change under half a cent is none', () => {
    expect(revisionEffect(plan(10.001), plan(10.004), 'USD').lines[0]).toBe(
      "The night's projected cost is unchanged: $10.00.",
    );
  });
});
