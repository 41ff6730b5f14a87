import { describe, expect, it } from 'vitest';
import { loadSolver, lpFromRows } from './highs-solver.js';

describe('HiGHS through the engine wrapper', () => {
  it('solves the HiGHS npm README example LP (optimum 87.5 at (17.5, 1, 16.5, 2))', async () => {
    // Source: highs-js README (example model), as quoted in the checks brief.
    const solver = await loadSolver();
    const lp = lpFromRows(
      [
        { cost: 1, lower: 0, upper: 40 },
        { cost: 2, lower: 0, upper: Infinity },
        { cost: 4, lower: 0, upper: Infinity },
        { cost: 1, lower: 2, upper: 3 },
      ],
      [
        { indices: [0, 1, 2, 3], values: [-1, 1, 1, 10], lower: -Infinity, upper: 20 },
        { indices: [0, 1, 2], values: [1, -4, 1], lower: -Infinity, upper: 30 },
        { indices: [1, 3], values: [1, -0.5], lower: 0, upper: 0 },
      ],
      { maximize: true },
    );
    const res = solver.solve(lp);
    expect(res.status).toBe('optimal');
    expect(res.objective).toBeCloseTo(87.5, 9);
    expect(Array.from(res.x)).toEqual([17.5, 1, 16.5, 2].map((v) => expect.closeTo(v, 9)));
  });

  it('solves the SciPy linprog documentation example (optimum -22 at (10, -3))', async () => {
    // Source: SciPy scipy.optimize.linprog documentation example.
    const solver = await loadSolver();
    const lp = lpFromRows(
      [
        { cost: -1, lower: -Infinity, upper: Infinity },
        { cost: 4, lower: -3, upper: Infinity },
      ],
      [
        { indices: [0, 1], values: [-3, 1], lower: -Infinity, upper: 6 },
        { indices: [0, 1], values: [1, 2], lower: -Infinity, upper: 4 },
      ],
    );
    const res = solver.solve(lp);
    expect(res.status).toBe('optimal');
    expect(res.objective).toBeCloseTo(-22, 9);
    expect(res.x[0]).toBeCloseTo(10, 9);
    expect(res.x[1]).toBeCloseTo(-3, 9);
  });

  it('reports an infeasible LP as infeasible, not as a number', async () => {
    const solver = await loadSolver();
    const lp = lpFromRows(
      [{ cost: 1, lower: 0, upper: 1 }],
      [{ indices: [0], values: [1], lower: 2, upper: Infinity }],
    );
    const res = solver.solve(lp);
    expect(res.status).toBe('infeasible');
    expect(Number.isNaN(res.objective)).toBe(true);
  });

  it('loads HiGHS once', async () => {
    expect(await loadSolver()).toBe(await loadSolver());
  });
});

describe('a live model changed in bulk', () => {
  it('replaces its last rows keeping the basis and re-solves to the optimum of the new model', async () => {
    // max x + y + z with x + y <= 4 (kept) and, in the replaced tail, y + z <= 3 then x + z <= 2.
    const solver = await loadSolver();
    const cols = [0, 1, 2].map(() => ({ cost: -1, lower: 0, upper: 10 }));
    const before = lpFromRows(cols, [
      { indices: [0, 1], values: [1, 1], lower: -Infinity, upper: 4 },
      { indices: [1, 2], values: [1, 1], lower: -Infinity, upper: 3 },
    ]);
    const after = lpFromRows(cols, [
      { indices: [0, 1], values: [1, 1], lower: -Infinity, upper: 4 },
      { indices: [0, 2], values: [1, 1], lower: -Infinity, upper: 2 },
    ]);
    const live = solver.open(before);
    live.keepBasis = true;
    try {
      expect(live.solve().objective).toBeCloseTo(-7, 9);
      expect(live.lastBasis()).not.toBeNull();
      live.replaceTailRows(1, {
        lower: Float64Array.of(-Infinity),
        upper: Float64Array.of(2),
        starts: Int32Array.of(0, 2),
        indices: Int32Array.of(0, 2),
        values: Float64Array.of(1, 1),
      });
      const res = live.solve();
      expect(res.status).toBe('optimal');
      expect(res.objective).toBeCloseTo(solver.solve(after).objective, 9);
      expect(res.objective).toBeCloseTo(-6, 9);
    } finally {
      live.dispose();
    }
  });
});
