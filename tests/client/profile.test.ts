/**
 * Profile χ² along one input of a sweep, checked against analytic cases. For a Gaussian likelihood,
 * χ²(x, y) = dᵀ C⁻¹ d with d = (x − x0, y − y0), the minimum over y at fixed x is (x − x0)² / Cxx, so
 * the one-parameter Δχ² = 1 and 4 intervals are x0 ± σx and x0 ± 2σx with σx = √Cxx, whatever the
 * correlation (Press et al., Numerical Recipes, §15.6, on projecting the Δχ² region; the Schur
 * complement of the inverse covariance gives the profile).
 */
import { describe, expect, it } from 'vitest';
import { ONE_PARAMETER_LEVELS, profileOf, quoteBest, quoteInterval } from '../../src/components/sweeps/profile';

function linspace(a: number, b: number, n: number): number[] {
  return Array.from({ length: n }, (_, i) => a + ((b - a) * i) / (n - 1));
}

/** Result rows in sweep order (first input slowest) with f's value last. */
function rows(axes: number[][], f: (...x: number[]) => number): number[][] {
  const out: number[][] = [];
  const walk = (prefix: number[]) => {
    if (prefix.length === axes.length) {
      out.push([...prefix, f(...prefix)]);
      return;
    }
    for (const v of axes[prefix.length]!) walk([...prefix, v]);
  };
  walk([]);
  return out;
}

describe('profile χ² along one sweep input', () => {
  it('the levels are Δχ² = 1 and 4 for one parameter, 68.3 % and 95.4 %', () => {
    // Numerical Recipes §15.6; cross-check: for ν = 1, P(Δ) = erf(√(Δ/2)), and erf(1/√2) = 0.6827,
    // erf(√2) = 0.9545 (Abramowitz & Stegun, Table 7.1).
    expect(ONE_PARAMETER_LEVELS.map((l) => l.delta)).toEqual([1, 4]);
    expect(ONE_PARAMETER_LEVELS.map((l) => l.label)).toEqual(['68.3 %', '95.4 %']);
  });

  it('gives x0 ± σx and x0 ± 2σx for a correlated Gaussian χ² in two inputs', () => {
    const [x0, y0, sx, sy, rho] = [0.31, -1.05, 0.02, 0.15, -0.85];
    const det = sx * sx * sy * sy * (1 - rho * rho);
    const chi2 = (x: number, y: number) => {
      const dx = x - x0;
      const dy = y - y0;
      return (sy * sy * dx * dx - 2 * rho * sx * sy * dx * dy + sx * sx * dy * dy) / det + 480;
    };
    const xs = linspace(0.2, 0.42, 221);
    const ys = linspace(-1.8, -0.3, 601);
    const p = profileOf(rows([xs, ys], chi2), 0, xs, 2)!;
    expect(p.best.x).toBeCloseTo(x0, 10);
    // The minimum over a grid in y sits at most half a y step from the true one.
    expect(p.best.value - 480).toBeLessThan(1e-3);
    const [one, two] = p.intervals;
    // Tolerance: the grid's x step (0.001) times a tenth, from linear interpolation of a parabola.
    expect(one!.lo).toBeCloseTo(x0 - sx, 3);
    expect(one!.hi).toBeCloseTo(x0 + sx, 3);
    expect(two!.lo).toBeCloseTo(x0 - 2 * sx, 3);
    expect(two!.hi).toBeCloseTo(x0 + 2 * sx, 3);
    expect([one!.loOpen, one!.hiOpen, two!.loOpen, two!.hiOpen]).toEqual([false, false, false, false]);

    // Along y the same holds with σy.
    const py = profileOf(rows([xs, ys], chi2), 1, ys, 2)!;
    expect(py.intervals[0]!.lo).toBeCloseTo(y0 - sy, 2);
    expect(py.intervals[0]!.hi).toBeCloseTo(y0 + sy, 2);
  });

  it('profiles over the two other inputs of a three-input sweep', () => {
    // χ² = (x/σ)² + (y − x)² + (z + y)²: at fixed x the rest can reach 0, so the profile is (x/σ)².
    const s = 0.5;
    const ax = linspace(-2, 2, 81);
    const ay = linspace(-3, 3, 61);
    const az = linspace(-3, 3, 61);
    const p = profileOf(rows([ax, ay, az], (x, y, z) => (x / s) ** 2 + (y - x) ** 2 + (z + y) ** 2), 0, ax, 3)!;
    expect(p.intervals[0]!.lo).toBeCloseTo(-s, 2);
    expect(p.intervals[0]!.hi).toBeCloseTo(s, 2);
    expect(p.intervals[1]!.hi).toBeCloseTo(2 * s, 2);
  });

  it('says when an interval runs into the edge of the grid', () => {
    const xs = linspace(0, 1, 51);
    // Δχ² = ((x − 0.9)/0.2)²: the 68.3 % interval [0.7, 1.1] is cut by the grid at 1.
    const p = profileOf(rows([xs], (x) => ((x - 0.9) / 0.2) ** 2), 0, xs, 1)!;
    expect(p.intervals[0]!.lo).toBeCloseTo(0.7, 3);
    expect(p.intervals[0]!.loOpen).toBe(false);
    expect(p.intervals[0]!.hi).toBe(1);
    expect(p.intervals[0]!.hiOpen).toBe(true);
  });

  it('interpolates in log10 of the input on a logarithmic axis, and skips points that did not report', () => {
    const xs = Array.from({ length: 61 }, (_, i) => 10 ** (-1 + i / 30));
    const all = rows([xs], (x) => (Math.log10(x) / 0.25) ** 2);
    // Two failed points just beyond the crossings (their rows carry null): the crossing is then found
    // between the neighbours on either side, two log steps (h = 1/15) apart.
    all[22]![1] = null as unknown as number;
    all[38]![1] = null as unknown as number;
    const p = profileOf(all, 0, xs, 1, 'log')!;
    // Linear interpolation of Δ(u) = (u/0.25)² misplaces the crossing by at most h²/8 · Δ''/Δ' = 2.2e-3.
    expect(Math.abs(Math.log10(p.intervals[0]!.lo) + 0.25)).toBeLessThan(2.3e-3);
    expect(Math.abs(Math.log10(p.intervals[0]!.hi) - 0.25)).toBeLessThan(2.3e-3);

    // On a coarse grid (a third of a decade a step) the crossing is exactly the chord's in log10 x:
    // Δ(u) = (u/0.5)² is 4/9 at u = 1/3 and 16/9 at u = 2/3, so Δ = 1 at u = 1/3 + (5/9)/(12/9)/3 = 17/36
    // (worked by hand); interpolating in x itself would give log10 x = 0.504.
    const coarse = Array.from({ length: 7 }, (_, i) => 10 ** (-1 + i / 3));
    const pc = profileOf(rows([coarse], (x) => (Math.log10(x) / 0.5) ** 2), 0, coarse, 1, 'log')!;
    expect(Math.log10(pc.intervals[0]!.hi)).toBeCloseTo(17 / 36, 10);
    expect(Math.log10(pc.intervals[0]!.lo)).toBeCloseTo(-17 / 36, 10);
    expect(Number.isNaN(p.delta[22]!)).toBe(true);
  });

  it('is null when no point reported a value', () => {
    expect(profileOf([[1, null], [2, null]], 0, [1, 2], 1)).toBeNull();
  });
});

describe('quoting a profile interval', () => {
  // Common practice: errors to two significant figures, the value and bounds to the same decimal place.
  const profile = (best: number, lo: number, hi: number, loOpen = false, hiOpen = false) => ({
    xs: [],
    delta: [],
    best: { x: best, value: 0 },
    intervals: [{ delta: 1, label: '68.3 %', lo, hi, loOpen, hiOpen }],
  });

  it('rounds to the place of the smaller error’s second figure', () => {
    const p = profile(0.330769, 0.289454, 0.362102);
    expect(quoteBest(p)).toBe('0.331');
    expect(quoteInterval(p, p.intervals[0]!)).toBe('0.289 … 0.362  (−0.041 / +0.031)');
    const w = profile(-1.12051, -1.2835, -0.97321);
    expect(quoteBest(w)).toBe('−1.12');
    expect(quoteInterval(w, w.intervals[0]!)).toBe('−1.28 … −0.97  (−0.16 / +0.15)');
  });

  it('marks a bound at the grid’s edge and gives it no error', () => {
    const p = profile(0.9, 0.7, 1, false, true);
    expect(quoteInterval(p, p.intervals[0]!)).toBe('0.70 … edge 1.00  (−0.20 / ?)');
  });
});
