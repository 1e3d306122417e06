/**
 * Profile χ² of a sweep along one input: for every value of that input, the lowest χ² over all the
 * other inputs, less the overall minimum. Where it crosses Δχ² = 1 and 4 bounds the 68.3 % and
 * 95.4 % confidence interval of that one parameter — the projection of the Δχ² region onto its axis
 * (Press et al., Numerical Recipes, §15.6). Crossings are found by linear interpolation between grid
 * values (in log10 of the input on a log axis), walking out from the best grid point, so an interval
 * is the one around the best point even when the profile has other dips.
 */
import type { Scale } from './contours';

/** Δχ² for one parameter (Numerical Recipes §15.6; for ν = 1 the CDF is erf(√(Δ/2))). */
export const ONE_PARAMETER_LEVELS = [
  { delta: 1, label: '68.3 %' },
  { delta: 4, label: '95.4 %' },
] as const;

export interface ProfileInterval {
  delta: number;
  label: string;
  lo: number;
  hi: number;
  /** the profile stays below the level up to the grid's end on that side: the bound is the edge */
  loOpen: boolean;
  hiOpen: boolean;
}

export interface Profile {
  /** the input's grid values, ascending */
  xs: number[];
  /** Δχ² at each of them; NaN where no point there reported a finite value */
  delta: number[];
  best: { x: number; value: number };
  intervals: ProfileInterval[];
}

/**
 * The profile of column `valueCol` along input `inputIndex`, from result rows (inputs first, then
 * values). `axis`: the input's grid values. null when no row has a finite value.
 */
export function profileOf(rows: readonly (readonly (number | null)[])[], inputIndex: number, axis: readonly number[], valueCol: number, scale: Scale = 'linear'): Profile | null {
  const xs = [...new Set(axis)].sort((a, b) => a - b);
  const slot = new Map(xs.map((x, i) => [x, i]));
  const lowest = new Array<number>(xs.length).fill(Number.NaN);
  for (const row of rows) {
    const x = row[inputIndex];
    const v = row[valueCol];
    if (x === null || x === undefined || v === null || v === undefined || !Number.isFinite(v)) continue;
    const i = slot.get(x);
    if (i === undefined) continue;
    if (!(v >= lowest[i]!)) lowest[i] = v;
  }
  let i0 = -1;
  for (let i = 0; i < xs.length; i++) if (Number.isFinite(lowest[i]) && (i0 < 0 || lowest[i]! < lowest[i0]!)) i0 = i;
  if (i0 < 0) return null;
  const min = lowest[i0]!;
  const delta = lowest.map((v) => v - min);
  const t = (x: number) => (scale === 'log' ? Math.log10(x) : x);
  const back = (u: number) => (scale === 'log' ? 10 ** u : u);

  /** Walk from the best point in direction `step` to the first value above `level`; interpolate there. */
  const bound = (level: number, step: -1 | 1): { x: number; open: boolean } => {
    let prev = i0;
    for (let j = i0 + step; j >= 0 && j < xs.length; j += step) {
      const d = delta[j]!;
      if (!Number.isFinite(d)) continue;
      if (d > level) {
        const dp = delta[prev]!;
        const f = (level - dp) / (d - dp);
        return { x: back(t(xs[prev]!) + f * (t(xs[j]!) - t(xs[prev]!))), open: false };
      }
      prev = j;
    }
    return { x: xs[prev]!, open: true };
  };

  const intervals = ONE_PARAMETER_LEVELS.map(({ delta: level, label }) => {
    const lo = bound(level, -1);
    const hi = bound(level, 1);
    return { delta: level, label, lo: lo.x, hi: hi.x, loOpen: lo.open, hiOpen: hi.open };
  });
  return { xs, delta, best: { x: xs[i0]!, value: min }, intervals };
}

/**
 * Decimals that give the smaller finite error of a profile two significant figures (common practice
 * for quoting a measurement: the value is rounded to the same place as its error).
 */
export function quoteDecimals(p: Profile): number {
  const errors = p.intervals.flatMap((i) => [i.loOpen ? Number.NaN : p.best.x - i.lo, i.hiOpen ? Number.NaN : i.hi - p.best.x]);
  const e = Math.min(...errors.filter((x) => x > 0 && Number.isFinite(x)));
  return Number.isFinite(e) ? Math.min(12, Math.max(0, 1 - Math.floor(Math.log10(e)))) : 4;
}

const fixed = (x: number, d: number) => x.toFixed(d).replace('-', '−');

/** The best grid value, rounded as its errors are. */
export function quoteBest(p: Profile): string {
  return fixed(p.best.x, quoteDecimals(p));
}

/** "0.289 … 0.362  (−0.041 / +0.031)"; a bound held by the grid's edge says so and has no error. */
export function quoteInterval(p: Profile, i: ProfileInterval): string {
  const d = quoteDecimals(p);
  const lo = i.loOpen ? `edge ${fixed(i.lo, d)}` : fixed(i.lo, d);
  const hi = i.hiOpen ? `edge ${fixed(i.hi, d)}` : fixed(i.hi, d);
  const minus = i.loOpen ? '?' : `−${(p.best.x - i.lo).toFixed(d)}`;
  const plus = i.hiOpen ? '?' : `+${(i.hi - p.best.x).toFixed(d)}`;
  return `${lo} … ${hi}  (${minus} / ${plus})`;
}
