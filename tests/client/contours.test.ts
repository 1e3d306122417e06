import { describe, expect, it } from 'vitest';
import { CHI2_COLOUR_SPAN, CONFIDENCE_LEVELS, axisAt, colourRange, gridMinimum, gridOf, isolines, levelsFor } from '../../src/components/sweeps/contours';

/** A square grid of n samples per axis over [-h, h]. */
function axis(n: number, h: number): number[] {
  return Array.from({ length: n }, (_, i) => -h + (2 * h * i) / (n - 1));
}

/** Rows in sweep grid order (first input slowest) for f(x, y). */
function sweepRows(xs: number[], ys: number[], f: (x: number, y: number) => number): number[][] {
  const rows: number[][] = [];
  for (const x of xs) for (const y of ys) rows.push([x, y, f(x, y)]);
  return rows;
}

describe('sweep contours (d3-contour on the grid)', () => {
  it('Δχ² levels are those of Numerical Recipes §15.6 for two parameters', () => {
    // Source: Press et al., Numerical Recipes, §15.6 (Δχ² = 2.30 / 6.18 for ν = 2). Cross-check,
    // analytic: for ν = 2 the χ² distribution's CDF is 1 − exp(−Δ/2), so Δ = −2 ln(1 − P).
    expect(CONFIDENCE_LEVELS.map((l) => l.delta)).toEqual([2.3, 6.18]);
    expect(1 - Math.exp(-2.3 / 2)).toBeCloseTo(0.683, 3);
    expect(1 - Math.exp(-6.18 / 2)).toBeCloseTo(0.954, 3);
  });

  it('the Δχ² = 2.30 and 6.18 contours of χ² = x² + y² are circles of radius √2.30 and √6.18', () => {
    // Analytic case: the paraboloid χ²(x, y) = x² + y² has χ²_min = 0 at the origin, so its
    // Δχ² = Δ level set is the circle x² + y² = Δ.
    const xs = axis(81, 3);
    const ys = axis(81, 3);
    const rows = sweepRows(xs, ys, (x, y) => x * x + y * y);
    const grid = gridOf(rows, [xs.length, ys.length], 2);
    const min = gridMinimum(grid, xs.length)!;
    expect(min.value).toBe(0);
    expect([xs[min.ix], ys[min.iy]]).toEqual([0, 0]);
    for (const { delta } of CONFIDENCE_LEVELS) {
      const lines = isolines(grid, xs, ys, min.value + delta);
      expect(lines).toHaveLength(1);
      const ring = lines[0]!;
      expect(ring.length).toBeGreaterThan(40);
      // Linear interpolation across cells of 0.075: the radius error is below 1e-3 here.
      for (const [x, y] of ring) expect(Math.hypot(x, y)).toBeCloseTo(Math.sqrt(delta), 2);
      // The ring goes all the way round: points in every quadrant.
      const quadrants = new Set(ring.map(([x, y]) => `${Math.sign(x)}${Math.sign(y)}`));
      expect(quadrants.size).toBeGreaterThanOrEqual(4);
    }
  });

  it('an off-centre, elongated χ² gives the analytic ellipse', () => {
    // Analytic case: χ² = ((x − 0.3)/0.1)² + ((y + 1)/0.25)² has the Δ level set
    // ((x − 0.3)/0.1)² + ((y + 1)/0.25)² = Δ, an ellipse of semi-axes 0.1√Δ and 0.25√Δ.
    const xs = Array.from({ length: 61 }, (_, i) => 0 + (0.6 * i) / 60);
    const ys = Array.from({ length: 61 }, (_, i) => -1.8 + (1.6 * i) / 60);
    const f = (x: number, y: number) => ((x - 0.3) / 0.1) ** 2 + ((y + 1) / 0.25) ** 2;
    const grid = gridOf(sweepRows(xs, ys, f), [61, 61], 2);
    const [line] = isolines(grid, xs, ys, 2.3);
    expect(line).toBeDefined();
    for (const [x, y] of line!) expect(f(x, y)).toBeCloseTo(2.3, 1);
  });

  it('a contour cut by the edge of the grid ends there instead of running along the edge', () => {
    // The circle of radius √6.18 ≈ 2.49 around the origin, on a grid that stops at x = 1.5.
    const xs = axis(61, 3).filter((x) => x <= 1.5 + 1e-9);
    const ys = axis(61, 3);
    const grid = gridOf(sweepRows(xs, ys, (x, y) => x * x + y * y), [xs.length, ys.length], 2);
    const lines = isolines(grid, xs, ys, 6.18);
    expect(lines.length).toBeGreaterThanOrEqual(1);
    for (const line of lines) for (const [x, y] of line) expect(Math.hypot(x, y)).toBeCloseTo(Math.sqrt(6.18), 1);
    const first = lines[0]!;
    expect(first[0]![0]).toBeCloseTo(1.5, 6);
    expect(first[first.length - 1]![0]).toBeCloseTo(1.5, 6);
  });

  it('three inputs: a slice along the third picks the right rows', () => {
    // Grid order (first slowest, last fastest) as the server builds it: index = (ix·ny + iy)·nz + iz.
    const rows: number[][] = [];
    for (let ix = 0; ix < 3; ix++) for (let iy = 0; iy < 4; iy++) for (let iz = 0; iz < 2; iz++) rows.push([ix, iy, iz, 100 * ix + 10 * iy + iz]);
    const g = gridOf(rows, [3, 4, 2], 3, 1);
    expect(g[2 + 3 * 3]).toBe(231);
    expect(g[0]).toBe(1);
  });

  it('log axes interpolate in log space; missing points are NaN; levels stay inside the range', () => {
    expect(axisAt([1, 100], 0.5, 'log')).toBeCloseTo(10, 12);
    expect(axisAt([1, 100], 0.5, 'linear')).toBeCloseTo(50.5, 12);
    const g = gridOf([[0, 0, 1], [0, 1, null]], [1, 2], 2);
    expect(Number.isNaN(g[1])).toBe(true);
    expect(levelsFor([0, 7], 6)).toEqual([1, 2, 3, 4, 5, 6]);
  });
});

describe('sweep map colour range', () => {
  it('spans all values, except for a χ² reaching far from its minimum, where it spans Δχ² ≤ 25', () => {
    // The span is a few times the two-parameter 95.4 % level (6.18, Numerical Recipes §15.6): common practice.
    expect(CHI2_COLOUR_SPAN).toBeGreaterThan(3 * CONFIDENCE_LEVELS[1]!.delta);
    expect(colourRange(10, 500, false)).toEqual({ min: 10, max: 500, clipped: false });
    expect(colourRange(492.975, 2226.41, true)).toEqual({ min: 492.975, max: 492.975 + CHI2_COLOUR_SPAN, clipped: true });
    expect(colourRange(100, 110, true)).toEqual({ min: 100, max: 110, clipped: false });
  });
});
