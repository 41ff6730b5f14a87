/**
 * One rounding rule for every figure of money: compute in full precision, round only to show.
 *
 * 1. A figure that stands on its own (a bill's total, a night's cost, a night's energy under its
 *    baseline) is its unrounded value rounded once (`toCents`), so it reads the same on every page
 *    (Tonight, Plans, Costs); a total is the sum of the unrounded values, rounded once.
 * 2. A table of the parts of such a figure (a bill's lines under its total, the buses under the
 *    night's cost) shows the parts with the rounding remainder allocated (`footedCents`, largest
 *    remainder method): each part within a cent of its own value, and the parts add up exactly to
 *    the figure shown everywhere else. Rounding each part alone could leave the column a cent or
 *    two off its total, a difference nobody could explain (splitting an invoice's total over its
 *    lines this way is common practice in accounting).
 * 3. A table of figures that stand on their own (the nights of a period, each also on Tonight and
 *    Plans) shows each as it is shown everywhere and totals what it shows (`shownSum`): the column
 *    adds up, and its total is within half a cent a line of the unrounded sum. A night's figure
 *    changing by a cent between pages would be the worse surprise.
 */
export function toCents(value: number): number {
  // Through the cents as an integer, with a tolerance for binary fractions (1.005 -> 1.01).
  return Math.round(value * 100 + Math.sign(value) * 1e-7) / 100;
}

/**
 * The lines' values in cents so they add up to their rounded sum (or to `total` when given,
 * itself rounded to the cent). Values may be negative; an empty list gives an empty list.
 */
export function footedCents(values: readonly number[], total?: number): number[] {
  if (!values.length) return [];
  const target = Math.round(toCents(total ?? values.reduce((a, b) => a + b, 0)) * 100);
  const scaled = values.map((v) => v * 100);
  const floors = scaled.map((v) => Math.floor(v + 1e-7));
  let left = target - floors.reduce((a, b) => a + b, 0);
  // Hand the remaining cents to the largest fractions first (ties: the earlier line).
  const order = scaled.map((v, i) => ({ i, frac: v - floors[i]! })).sort((a, b) => b.frac - a.frac || a.i - b.i);
  const cents = [...floors];
  for (let k = 0; left !== 0 && k < order.length * 2; k++) {
    const { i } = order[k % order.length]!;
    const step = left > 0 ? 1 : -1;
    cents[i] = cents[i]! + step;
    left -= step;
  }
  return cents.map((c) => c / 100);
}

/**
 * A night's energy and demand in cents as shown beside its total: they foot to it (`footedCents`).
 * The energy is the figure a night's saving is taken from, on every page and in the e-mail.
 */
export function footedEnergyDemand(cost: { energy: number; demand: number; total: number }): {
  energy: number;
  demand: number;
} {
  const [energy, demand] = footedCents([cost.energy, cost.demand], toCents(cost.total));
  return { energy: energy!, demand: demand! };
}

/** The sum of the figures as shown (each rounded by `toCents`), exact to the cent. */
export function shownSum(values: readonly (number | null)[]): number {
  return values.reduce<number>((a, v) => a + Math.round(toCents(v ?? 0) * 100), 0) / 100;
}
