/**
 * One rounding rule for every figure of money: compute in full precision, round only to show.
 *
 * A total is the sum of the unrounded figures, rounded once. Rounding each line on its own can
 * leave the printed lines a cent or two away from the printed total; an analyst adding up the
 * column would then find a difference nobody can explain. So the lines of a table are shown
 * with the rounding remainder allocated (largest remainder method): each shown line is its own
 * value rounded down or up to the cent, never more than one cent from it, and the shown lines
 * add up exactly to the shown total. The same rule as splitting an invoice's total over its
 * lines (common practice in accounting).
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
