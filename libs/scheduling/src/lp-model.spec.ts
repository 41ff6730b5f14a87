import { describe, expect, it } from 'vitest';
import { buildChargeModel, cabinetRowsFor } from './lp-model.js';
import { prepareProblem, emptyPlugMap } from './problem.js';
import { parseScenario } from './scenario.js';
import { generateDepot } from './testing/generate-depot.js';

describe('cabinet rows for another plug map', () => {
  it('are the rows a model built for that map has, in the same places', () => {
    const parsed = parseScenario(generateDepot({ buses: 12, chargers: 6, seed: 3 }));
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.problems));
    const problem = prepareProblem(parsed.scenario);
    expect(problem.cabinets.some((c) => c.binding)).toBe(true);
    // Two plug maps: every bus on charger (index) mod C, then on the next charger.
    const C = problem.chargers.length;
    const mapOf = (shift: number) => {
      const plug = emptyPlugMap(problem);
      for (const bus of problem.buses) for (const t of bus.slots) plug[bus.index]![t] = (bus.index + shift) % C;
      return plug;
    };
    const first = buildChargeModel(problem, { mode: 'assigned', plug: mapOf(0) });
    const second = buildChargeModel(problem, { mode: 'assigned', plug: mapOf(1) });
    const rows = cabinetRowsFor(problem, first, mapOf(1));
    expect(rows).not.toBeNull();
    const { lp } = second;
    expect(second.lp.numRows).toBe(first.lp.numRows);
    const count = lp.numRows - rows!.from;
    expect(rows!.upper.length).toBe(count);
    for (let i = 0; i < count; i++) {
      const r = rows!.from + i;
      const want = Array.from(lp.indices.subarray(lp.starts[r]!, lp.starts[r + 1]!));
      const got = Array.from(rows!.indices.subarray(rows!.starts[i]!, rows!.starts[i + 1]!));
      expect(got).toEqual(want);
      expect(rows!.upper[i]).toBe(lp.rowUpper[r]);
      expect(rows!.lower[i]).toBe(lp.rowLower[r]);
    }
  });
});
