import { describe, expect, it } from 'vitest';
import { footedCents, shownSum, toCents } from './money';

describe('one rounding rule', () => {
  it('rounds half away from zero, also for binary fractions', () => {
    expect(toCents(1.005)).toBe(1.01);
    expect(toCents(-1.005)).toBe(-1.01);
    expect(toCents(1944.0149)).toBe(1944.01);
  });

  it('shows lines that add up to the rounded total, each within a cent of its value', () => {
    const values = [0.333, 0.333, 0.334, 10.005, 7.4449];
    const shown = footedCents(values);
    const total = toCents(values.reduce((a, b) => a + b, 0));
    expect(Math.round(shown.reduce((a, b) => a + b, 0) * 100)).toBe(Math.round(total * 100));
    shown.forEach((s, i) => expect(Math.abs(s - values[i]!)).toBeLessThan(0.01 + 1e-9));
  });

  it('three thirds of a dollar show as 0.34 + 0.33 + 0.33', () => {
    expect(footedCents([1 / 3, 1 / 3, 1 / 3], 1)).toEqual([0.34, 0.33, 0.33]);
  });

  it('foots random columns to the cent, negatives included (fixed seed)', () => {
    let seed = 7;
    const rnd = () => (seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31;
    for (let n = 0; n < 200; n++) {
      const values = Array.from({ length: 1 + Math.floor(rnd() * 30) }, () => (rnd() - 0.2) * 1000);
      const shown = footedCents(values);
      const sum = values.reduce((a, b) => a + b, 0);
      expect(Math.round(shown.reduce((a, b) => a + b, 0) * 100)).toBe(Math.round(toCents(sum) * 100));
      shown.forEach((s, i) => expect(Math.abs(s - values[i]!)).toBeLessThan(0.01 + 1e-9));
    }
  });

  it('totals figures as shown: 95.468 + 136.783 shows 95.47 + 136.78 = 232.25', () => {
    expect(shownSum([95.468304, 136.783392, null])).toBe(232.25);
    expect(shownSum([0.005, 0.005, 0.005])).toBe(0.03);
  });
});
