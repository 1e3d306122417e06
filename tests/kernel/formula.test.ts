import { describe, it, expect } from 'vitest';
import { compileFormula, tabulated, FormulaError } from '../../server/kernel/formula';

describe('user formulas (mathjs, restricted)', () => {
  it('compiles w(a) in a and z', () => {
    const w = compileFormula('-0.9 + 0.3 * (1 - a)', 'w(a)');
    expect(w(0.5)).toBeCloseTo(-0.75, 15);
    const step = compileFormula('0.5 < a <= 1 ? 2 : 0', 'step');
    expect(step(0.7)).toBe(2);
    expect(step(0.2)).toBe(0);
    const g = compileFormula('(1+z)^3 * exp(-z)', 'density');
    expect(g(0.5)).toBeCloseTo(8 * Math.exp(-1), 14);
  });
  it('refuses anything but arithmetic in a and z, naming the formula', () => {
    const bad: [string, RegExp][] = [
      ['import({}, {})', /function 'import' is not allowed/],
      ['x = 3', /assignment/],
      ['f(x) = x', /functionassignment/],
      ['b + 1', /unknown symbol 'b'/],
      ['[1,2][1]', /not allowed/],
      ['"abc"', /only numbers/],
      ['evaluate("1")', /function 'evaluate' is not allowed/],
      ['', /empty/],
      ['1 +', /cannot parse/],
    ];
    for (const [src, re] of bad) {
      expect(() => compileFormula(src, 'w(a)')).toThrow(FormulaError);
      expect(() => compileFormula(src, 'w(a)')).toThrow(re);
      expect(() => compileFormula(src, 'w(a)')).toThrow(/^w\(a\): /);
    }
  });
  it('a non-real or infinite value is an error naming a', () => {
    const f = compileFormula('sqrt(a - 0.5)', 'fluid[0] density');
    expect(f(1)).toBeCloseTo(Math.SQRT1_2, 15);
    expect(() => f(0.2)).toThrow(/fluid\[0\] density: .* at a = 0.2/);
    expect(() => compileFormula('1/(a-1)', 'w(a)')).toThrow(/Infinity at a = 1/);
  });
});

describe('tabulated functions (monotone cubic, Fritsch & Carlson 1980)', () => {
  it('passes through the nodes, is exact for straight lines, never overshoots monotone data', () => {
    const xs = [0, 1, 2, 3, 4, 5], ys = [0, 0, 1, 1, 1, 10];
    const f = tabulated(xs, ys, 'table');
    xs.forEach((x, i) => expect(f(x)).toBeCloseTo(ys[i], 15));
    for (let x = 0; x <= 5; x += 0.01) {
      const v = f(x);
      const i = Math.min(4, Math.floor(x));
      expect(v).toBeGreaterThanOrEqual(Math.min(ys[i], ys[i + 1]) - 1e-12);
      expect(v).toBeLessThanOrEqual(Math.max(ys[i], ys[i + 1]) + 1e-12);
    }
    const line = tabulated([0, 1, 3, 4], [1, 3, 7, 9], 'line');
    expect(line(2.5)).toBeCloseTo(6, 14);
    // Smooth data: cubic accuracy (error ~h³; common practice check).
    const xx = Array.from({ length: 101 }, (_, i) => i / 100), s = tabulated(xx, xx.map(Math.exp), 'exp');
    expect(Math.abs(s(0.555) - Math.exp(0.555))).toBeLessThan(1e-6);
  });
  it('rejects bad tables and out-of-range x, naming the table', () => {
    expect(() => tabulated([0, 1], [1], 'T')).toThrow(/T: the table has 2 x values but 1 y values/);
    expect(() => tabulated([0, 0], [1, 2], 'T')).toThrow(/row 2/);
    expect(() => tabulated([0, 1], [1, NaN], 'T')).toThrow(/row 2 is not a finite number/);
    expect(() => tabulated([0, 1], [1, 2], 'T')(2)).toThrow(/outside the table's range/);
    expect(tabulated([0, 1], [1, 2], 'T', 'clamp')(2)).toBe(2);
  });
});
