/**
 * Contour lines of a sweep's value over a grid of two inputs, in the inputs' own units. Pure (no DOM,
 * no echarts) so it can be checked against analytic cases. d3-contour does the marching squares; this
 * module turns its polygons (in grid-cell coordinates) back into open lines in data coordinates.
 */
import { contours } from 'd3-contour';

export type Scale = 'linear' | 'log';
export type Point = [number, number];

/**
 * Δχ² above the minimum that bounds the joint 68.3 % and 95.4 % confidence regions of TWO parameters
 * (Press et al., Numerical Recipes, §15.6, table of Δχ² for ν = 2 degrees of freedom).
 */
export const CONFIDENCE_LEVELS = [
  { delta: 2.3, label: '68.3 %' },
  { delta: 6.18, label: '95.4 %' },
] as const;

/**
 * A value column of a 1–3 input sweep laid out as a 2-D grid over the first two inputs, x = first
 * input, y = second. Rows come in grid order (first input slowest, last fastest); with three inputs
 * `slice` picks the index along the third. Missing points are NaN. Returns values[ix + iy·nx].
 */
export function gridOf(
  rows: ArrayLike<ArrayLike<number | null>>,
  sizes: readonly number[],
  valueColumn: number,
  slice = 0,
): Float64Array {
  const [nx = 1, ny = 1, nz = 1] = sizes;
  const out = new Float64Array(nx * ny).fill(NaN);
  for (let ix = 0; ix < nx; ix++) {
    for (let iy = 0; iy < ny; iy++) {
      const index = sizes.length >= 3 ? (ix * ny + iy) * nz + slice : ix * ny + iy;
      const v = rows[index]?.[valueColumn];
      out[ix + iy * nx] = typeof v === 'number' && Number.isFinite(v) ? v : NaN;
    }
  }
  return out;
}

/** Smallest finite value of a grid and where it sits, or null when nothing has reported yet. */
export function gridMinimum(values: ArrayLike<number>, nx: number): { value: number; ix: number; iy: number } | null {
  let best = Infinity;
  let at = -1;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    if (Number.isFinite(v) && v < best) {
      best = v;
      at = i;
    }
  }
  return at < 0 ? null : { value: best, ix: at % nx, iy: Math.floor(at / nx) };
}

/** Map a fractional sample index onto an axis, interpolating in log space on a log axis. */
export function axisAt(axis: ArrayLike<number>, u: number, scale: Scale = 'linear'): number {
  const n = axis.length;
  if (n === 1) return axis[0]!;
  const k = Math.min(n - 2, Math.max(0, Math.floor(u)));
  const t = Math.min(n - 1, Math.max(0, u)) - k;
  const a = axis[k]!;
  const b = axis[k + 1]!;
  if (scale === 'log' && a > 0 && b > 0) return Math.exp(Math.log(a) + t * (Math.log(b) - Math.log(a)));
  return a + t * (b - a);
}

/**
 * The lines where the grid's value equals `level`, as open polylines in data coordinates.
 * The region value ≤ level is traced (by contouring −value), so a minimum gets closed rings around
 * it; where the region runs into the edge of the grid, the stretch along the edge is not a contour
 * and is cut out, leaving a line that ends at the edge.
 */
export function isolines(
  values: ArrayLike<number>,
  xs: ArrayLike<number>,
  ys: ArrayLike<number>,
  level: number,
  scales: { x?: Scale; y?: Scale } = {},
): Point[][] {
  const nx = xs.length;
  const ny = ys.length;
  if (nx < 2 || ny < 2 || !Number.isFinite(level)) return [];
  const neg = Array.from(values, (v) => (Number.isFinite(v) ? -v : NaN));
  const [shape] = contours().size([nx, ny]).thresholds([-level])(neg);
  if (!shape) return [];
  // d3 pads the grid by half a cell: sample i sits at i + 0.5, so a point outside [0.5, n − 0.5]
  // lies in the padding, where the ring only closes itself along the edge of the grid.
  const eps = 1e-9;
  const inPadding = (p: number[]) => p[0]! < 0.5 - eps || p[0]! > nx - 0.5 + eps || p[1]! < 0.5 - eps || p[1]! > ny - 0.5 + eps;
  const toData = (p: number[]): Point => [axisAt(xs, p[0]! - 0.5, scales.x), axisAt(ys, p[1]! - 0.5, scales.y)];
  const lines: Point[][] = [];
  for (const polygon of shape.coordinates) {
    for (const ring of polygon) {
      const start = ring.findIndex(inPadding);
      if (start < 0) {
        lines.push(ring.map(toData));
        continue;
      }
      // Walk the ring from a padding point so every piece between padding stretches comes out whole.
      const n = ring.length - 1; // the ring repeats its first point at the end
      let cur: Point[] = [];
      for (let s = 0; s <= n; s++) {
        const p = ring[(start + s) % n]!;
        if (inPadding(p)) {
          if (cur.length > 1) lines.push(cur);
          cur = [];
        } else cur.push(toData(p));
      }
      if (cur.length > 1) lines.push(cur);
    }
  }
  return lines;
}

/** `count` evenly spaced levels strictly inside the grid's range, for a value that is not a χ². */
export function levelsFor(values: ArrayLike<number>, count = 6): number[] {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    if (!Number.isFinite(v)) continue;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  if (!(hi > lo)) return [];
  return Array.from({ length: count }, (_, i) => lo + ((hi - lo) * (i + 1)) / (count + 1));
}

/**
 * Δχ² above the minimum that a χ² map's colour ramp spans (common practice: a few times the 95 %
 * level of two parameters, 6.18, so the confidence region gets most of the ramp instead of a sliver
 * of its darkest end when the grid reaches far-off models).
 */
export const CHI2_COLOUR_SPAN = 25;

/** The colour ramp's range: all values, or for a χ² the minimum to CHI2_COLOUR_SPAN above it. */
export function colourRange(lo: number, hi: number, chi2: boolean): { min: number; max: number; clipped: boolean } {
  if (chi2 && hi - lo > CHI2_COLOUR_SPAN) return { min: lo, max: lo + CHI2_COLOUR_SPAN, clipped: true };
  return { min: lo, max: hi, clipped: false };
}
