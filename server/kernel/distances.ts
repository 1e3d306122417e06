/**
 * Line-of-sight and time integrals of a Background, in x = ln a:
 *   t(x)  = (1/H0) ∫_{past}^{x} dx'/E        (cosmic time; age, lookback)
 *   η(x)  = (1/H0) ∫_{past}^{x} dx'/(a E)    (conformal time; particle horizon c·η)
 *   χ(x)  = (c/H0) ∫_{x}^{0} dx'/(a E)       (line-of-sight comoving distance)
 * (Hogg 1999, astro-ph/9905116, eqs. 15, 28, 30, written in ln a.) Units inside this module are
 * 1/H0 and c/H0; index.ts converts to Gyr and Mpc.
 *
 * Two ways to evaluate, chosen per call: for a few redshifts, Gauss–Legendre panels between the
 * sorted redshifts (no set-up cost); for many, a uniform grid in ln a holding the integrands and
 * their slopes at the nodes, cumulative integrals by Gauss–Legendre per cell, read back by quintic
 * Hermite interpolation; the inverses (redshift at a distance or time) are quintic Hermite
 * interpolation of x as a function of the integral on the same cells.
 */
import type { ModelBackground } from './components';
import { hermite5 } from './components';
import { gaussLegendre } from './quadrature';
import { SETTINGS } from './settings';

/** A redshift the model never reaches (past a bounce, beyond a turnaround, or z ≤ −1). */
export class UnreachableRedshiftError extends Error {
  readonly z: number;
  constructor(z: number, message: string) {
    super(message);
    this.name = 'UnreachableRedshiftError';
    this.z = z;
  }
}

export type PastKind = 'bang' | 'bounce' | 'eternal';

/** Where E² first vanishes looking back (bounce) or ahead (turnaround), in ln a; null if never (within the scan). */
interface Boundary { x: number }

const LOG_TOL = -Math.log(SETTINGS.directTolerance);
// Local copies of the settings used in inner loops (imported bindings are getters once transpiled).
const DEEP_FROM = SETTINGS.deepPastFrom, DEEP_PANEL = SETTINGS.deepPanel, PANEL_MAX = SETTINGS.directPanelMax;
const MAX_ORDER = SETTINGS.directMaxOrder;
const GL: ReturnType<typeof gaussLegendre>[] = [];
for (let n = 1; n <= 24; n++) GL[n] = gaussLegendre(n);

/** Gauss–Legendre order for a panel of width w (Bernstein-ellipse bound with singularity distance ρ). */
function orderFor(w: number, radius2: number): number {
  const r = radius2 / Math.abs(w);
  const rho = r + Math.sqrt(1 + r * r);
  const n = Math.ceil(LOG_TOL / (2 * Math.log(rho)));
  return n < 2 ? 2 : n > MAX_ORDER ? MAX_ORDER : n;
}

/** The integrals of one model; created lazily by the model, holds its caches. */
export class Integrals {
  readonly bg: ModelBackground;
  // Scans for E² = 0: checked ranges and what was found.
  private pastScanned = 0;
  private pastBoundary: Boundary | null = null;
  private futureScanned = 0;
  private futureBoundary: Boundary | null = null;
  private pastTotals: { t: number; eta: number; x0: number } | null = null;
  private grid: Grid | null = null;

  /**
   * With every density positive for all a (analytic laws, Ω_i ≥ 0) and Ω_k ≥ 0, E² > 0 everywhere:
   * no bounce or turnaround can exist, so no scan is needed.
   */
  private readonly alwaysExpanding: boolean;

  /**
   * Twice the assumed distance of the integrands' nearest complex singularity from the real ln-a axis:
   * `analyticRadius`, or less when the model's spread of w puts a zero of E² nearer (π/(3Δw), with a margin).
   */
  private readonly radius2: number;

  constructor(bg: ModelBackground) {
    this.bg = bg;
    this.alwaysExpanding = bg.alwaysExpanding;
    const fromW = bg.wSpread > 0 ? (0.8 * Math.PI) / (3 * bg.wSpread) : Infinity;
    const rho = Math.min(SETTINGS.analyticRadius, fromW);
    this.radius2 = 2 * rho;
    // Panels no wider than the order cap can serve at this radius (Bernstein bound at 12 and 16 nodes),
    // and a grid step halved as often as the radius shrinks below the default.
    const shrink = rho / SETTINGS.analyticRadius;
    this.panelMax = Math.min(PANEL_MAX, 1.2 * rho);
    this.chebPanel = Math.min(CHEB_PANEL, 0.6 * rho);
    this.gridStep = SETTINGS.gridStep / Math.pow(2, Math.max(0, Math.ceil(-Math.log2(shrink))));
  }
  /** Widest Gauss–Legendre panel, ln a. */
  private readonly panelMax: number;
  /** Widest Chebyshev panel, ln a. */
  private readonly chebPanel: number;
  /** Interpolation grid step, ln a. */
  readonly gridStep: number;

  /** E² at x (checked positive by callers that need E). */
  private e2x(x: number): number {
    return this.bg.E2(Math.exp(x));
  }

  // ------------------------------------------------------------------------------------------
  // Where the model's past and future end (E² = 0)
  // ------------------------------------------------------------------------------------------

  /** Scan E² backwards to ln a = xTo (step 1/4) and bisect a sign change: the bounce, if any. */
  scanPast(xTo: number): Boundary | null {
    if (this.alwaysExpanding || this.pastBoundary || xTo >= this.pastScanned) return this.pastBoundary;
    const step = 0.25;
    let x = this.pastScanned;
    const lo = Math.max(xTo, SETTINGS.pastLnA - 1);
    while (x > lo) {
      const xn = x - step;
      if (!(this.e2x(xn) > 0)) {
        this.pastBoundary = { x: this.bisect(xn, x) };
        return this.pastBoundary;
      }
      x = xn;
    }
    this.pastScanned = x;
    return null;
  }

  /** Scan E² ahead to ln a = xTo: a turnaround, if any. */
  scanFuture(xTo: number): Boundary | null {
    if (this.alwaysExpanding || this.futureBoundary || xTo <= this.futureScanned) return this.futureBoundary;
    const step = 0.25;
    let x = this.futureScanned;
    const hi = Math.min(xTo, 12);
    while (x < hi) {
      const xn = x + step;
      if (!(this.e2x(xn) > 0)) {
        this.futureBoundary = { x: this.bisect(xn, x) };
        return this.futureBoundary;
      }
      x = xn;
    }
    this.futureScanned = x;
    return null;
  }

  /** Bisection for E² = 0 between xBad (E² ≤ 0) and xGood (E² > 0). */
  private bisect(xBad: number, xGood: number): number {
    let b = xBad, g = xGood;
    for (let i = 0; i < 200 && Math.abs(g - b) > SETTINGS.rootTolerance * (1 + Math.abs(g)); i++) {
      const m = 0.5 * (b + g);
      if (this.e2x(m) > 0) g = m; else b = m;
    }
    return g;
  }

  /** The model's past: 'bounce' (E² = 0 at ln a = x), 'bang' (E → ∞ as a → 0) or 'eternal' (age diverges). */
  past(): { kind: PastKind; x: number } {
    const b = this.scanPast(-Infinity);
    if (b) return { kind: 'bounce', x: b.x };
    const xs = SETTINGS.pastLnA;
    const a = Math.exp(xs);
    const q = -this.bg.accel(a) / this.bg.E2(a);
    return { kind: q > 1e-3 - 1 ? 'bang' : 'eternal', x: -Infinity };
  }

  /** Throws if ln a = x (redshift z) is not on the model's expanding branch through today. */
  checkReachable(xMin: number, xMax: number, zOf: (x: number) => number): void {
    if (xMin < 0) {
      const b = this.scanPast(xMin - 2);
      if (b && xMin < b.x) {
        throw new UnreachableRedshiftError(zOf(xMin),
          `redshift z = ${fmt(zOf(xMin))} is never reached: the model's past ends at a bounce at z = ${fmt(Math.expm1(-b.x))} (E² = 0)`);
      }
    }
    if (xMax > 0) {
      const f = this.scanFuture(xMax + 2);
      if (f && xMax > f.x) {
        throw new UnreachableRedshiftError(zOf(xMax),
          `redshift z = ${fmt(zOf(xMax))} is never reached while the model expands: it turns around at z = ${fmt(Math.expm1(-f.x))}`);
      }
    }
  }

  // ------------------------------------------------------------------------------------------
  // Direct integration
  // ------------------------------------------------------------------------------------------

  private acc1 = 0;
  private acc2 = 0;

  /** Adds ∫_{x0}^{x1} (1/E, 1/(aE)) dx to acc1, acc2 with panels sized for the accuracy target. */
  private segment(x0: number, x1: number): void {
    if (x0 === x1) return;
    const b = this.pastBoundary;
    if (b && Math.min(x0, x1) < b.x + 2) {
      // Near a bounce 1/E ~ (x − x_b)^(−1/2): integrate in u = √(x − x_b), where the integrand is smooth.
      this.segmentU(Math.sqrt(Math.max(0, x0 - b.x)), Math.sqrt(Math.max(0, x1 - b.x)), b.x);
      return;
    }
    const deep = x0 < -DEEP_FROM && x1 < -DEEP_FROM;
    const wMax = deep ? DEEP_PANEL : this.panelMax;
    const np = Math.ceil(Math.abs(x1 - x0) / wMax);
    const w = (x1 - x0) / np;
    const rule = GL[orderFor(w, this.radius2)];
    const rx = rule.x, rw = rule.w, m = rx.length;
    const h = 0.5 * w;
    const bg = this.bg;
    let s1 = 0, s2 = 0;
    for (let p = 0; p < np; p++) {
      const c = x0 + (p + 0.5) * w;
      for (let i = 0; i < m; i++) {
        const a = Math.exp(c + h * rx[i]);
        const e2 = bg.E2(a);
        if (!(e2 > 0)) throw new Error(`E² ≤ 0 at a = ${a} inside an integral (the model does not expand there)`);
        const g = rw[i] / Math.sqrt(e2);
        s1 += g; s2 += g / a;
      }
    }
    this.acc1 += h * s1;
    this.acc2 += h * s2;
  }

  private segmentU(u0: number, u1: number, xb: number): void {
    if (u0 === u1) return;
    const np = Math.ceil(Math.abs(u1 - u0) / 0.25);
    const w = (u1 - u0) / np;
    const rule = GL[orderFor(w, this.radius2)];
    const h = 0.5 * w;
    let s1 = 0, s2 = 0;
    for (let p = 0; p < np; p++) {
      const c = u0 + (p + 0.5) * w;
      for (let i = 0; i < rule.x.length; i++) {
        const u = c + h * rule.x[i];
        const a = Math.exp(xb + u * u);
        const e2 = this.bg.E2(a);
        // dx = 2u du; at u → 0 both numerator and √E² vanish like u.
        const g = e2 > 0 ? (rule.w[i] * 2 * u) / Math.sqrt(e2) : 0;
        s1 += g; s2 += g / a;
      }
    }
    this.acc1 += h * s1;
    this.acc2 += h * s2;
  }

  /** Whether the age and the conformal time diverge (an eternal past), from the power law below the floor. */
  infinitePast(): { t: boolean; eta: boolean } {
    if (this.past().kind === 'bounce') return { t: false, eta: false };
    const a = Math.exp(SETTINGS.pastLnA), q = -this.bg.accel(a) / this.bg.E2(a);
    return { t: !(1 + q > 1e-3), eta: !(q > 1e-3) };
  }

  /** ∫_{−∞ or bounce}^{0} of (1/E, 1/(aE)) dx: age and conformal time today in 1/H0. */
  totalsToday(): { t: number; eta: number } {
    if (!this.pastTotals) {
      const past = this.past();
      let x0: number;
      this.acc1 = 0; this.acc2 = 0;
      if (past.kind === 'bounce') {
        x0 = past.x;
      } else {
        x0 = SETTINGS.pastLnA;
        // Tail below x0 from the local power law: 1/E ∝ e^{(1+q)x}, 1/(aE) ∝ e^{q x}.
        const a = Math.exp(x0), e2 = this.bg.E2(a);
        const q = -this.bg.accel(a) / e2;
        const g1 = 1 / Math.sqrt(e2);
        this.acc1 = 1 + q > 1e-3 ? g1 / (1 + q) : Infinity;
        this.acc2 = q > 1e-3 ? g1 / a / q : Infinity;
      }
      const t0 = this.acc1, e0 = this.acc2;
      this.acc1 = 0; this.acc2 = 0;
      this.segment(x0, 0);
      this.pastTotals = { t: t0 + this.acc1, eta: e0 + this.acc2, x0 };
    }
    return this.pastTotals;
  }

  /**
   * Chebyshev panels for many points on one side of x = 0: on each panel of width ≤ `chebPanel` the
   * integrands are sampled at `chebOrder` Chebyshev nodes, their series integrated term by term
   * (Numerical Recipes §5.9, chebft/chint/chebev) and the antiderivative read at every point of the
   * panel; cost per panel is fixed, whatever the number of points in it.
   * idx[j0..j1] (inclusive, in walking order away from 0) are the points; dir = −1 (past) or +1 (future).
   */
  private chebSide(xs: Float64Array, idx: Uint32Array, j0: number, j1: number, dir: number,
    out1: Float64Array | null, out2: Float64Array | null, xStart = 0, C1start = 0, C2start = 0): void {
    const xEnd = xs[idx[j1]];
    const span = Math.abs(xEnd - xStart);
    const np = Math.max(1, Math.ceil(span / this.chebPanel));
    const w = span / np, half = 0.5 * w, N = CHEB_N;
    // Shared scratch (module level): JavaScript is single-threaded and chebSide does not re-enter.
    const f1 = SCRATCH[0], f2 = SCRATCH[1], c1 = SCRATCH[2], c2 = SCRATCH[3], i1 = SCRATCH[4], i2 = SCRATCH[5];
    const bg = this.bg;
    let C1 = C1start, C2 = C2start; // integral from the start to the panel's near end
    let j = j0;
    for (let p = 0; p < np && j <= j1; p++) {
      const near = xStart + dir * p * w, far = p === np - 1 ? xEnd : xStart + dir * (p + 1) * w;
      const lo = Math.min(near, far), hi = Math.max(near, far), mid = 0.5 * (lo + hi);
      for (let k = 0; k < N; k++) {
        const a = Math.exp(mid + half * CHEB_T[k]);
        const e2 = bg.E2(a);
        if (!(e2 > 0)) throw new Error(`E² ≤ 0 at a = ${a} inside an integral (the model does not expand there)`);
        const g = 1 / Math.sqrt(e2);
        f1[k] = g; f2[k] = g / a;
      }
      chebCoefficients(f1, c1); chebCoefficients(f2, c2);
      chebIntegral(c1, i1, half); chebIntegral(c2, i2, half);
      // A(t) = ∫_lo^x; the whole panel is A(1).
      const A1 = chebEval(i1, 1), A2 = chebEval(i2, 1);
      for (; j <= j1; j++) {
        const k = idx[j], x = xs[k];
        if (dir < 0 ? x < lo : x > hi) break;
        const t = (x - mid) / half;
        if (dir < 0) {
          // C(x) = C(near = hi) − ∫_x^hi g
          if (out1) out1[k] = C1 - (A1 - chebEval(i1, t));
          if (out2) out2[k] = C2 - (A2 - chebEval(i2, t));
        } else {
          if (out1) out1[k] = C1 + chebEval(i1, t);
          if (out2) out2[k] = C2 + chebEval(i2, t);
        }
      }
      C1 += dir * A1; C2 += dir * A2;
    }
  }


  /**
   * For each x: out1 = ∫_0^x dx/E, out2 = ∫_0^x dx/(aE) (signed: negative for the past), by direct
   * panels walking outward from x = 0 through the sorted points; where the points are dense, by
   * Chebyshev panels instead.
   */
  directFromToday(xs: Float64Array, out1: Float64Array | null, out2: Float64Array | null): void {
    const n = xs.length;
    const idx = sortedIndex(xs);
    // Past side: descending from 0; future side: ascending from 0.
    let firstFuture = 0;
    while (firstFuture < n && xs[idx[firstFuture]] < 0) firstFuture++;
    const nPast = firstFuture, nFuture = n - firstFuture;
    const smooth = !this.pastBoundary && !this.futureBoundary;
    // Dense enough that a panel of Chebyshev nodes serves more points than Gauss–Legendre between them would.
    const dense = (m: number, span: number) => smooth && m >= CHEB_MIN_POINTS && m * 3 >= (Math.ceil(span / this.chebPanel) * CHEB_N);
    const pastDone = nPast > 0 && dense(nPast, -xs[idx[0]]);
    const futureDone = nFuture > 0 && dense(nFuture, xs[idx[n - 1]]);
    if (pastDone) this.chebSide(xs, reverseRange(idx, 0, nPast), 0, nPast - 1, -1, out1, out2);
    if (futureDone) this.chebSide(xs, idx.subarray(firstFuture), 0, nFuture - 1, 1, out1, out2);
    if (pastDone && futureDone) return;
    this.acc1 = 0; this.acc2 = 0;
    let prev = 0;
    for (let j = pastDone ? -1 : firstFuture - 1; j >= 0; j--) {
      const k = idx[j], x = xs[k];
      this.segment(prev, x); prev = x;
      if (out1) out1[k] = this.acc1;
      if (out2) out2[k] = this.acc2;
    }
    this.acc1 = 0; this.acc2 = 0; prev = 0;
    for (let j = futureDone ? n : firstFuture; j < n; j++) {
      const k = idx[j], x = xs[k];
      this.segment(prev, x); prev = x;
      if (out1) out1[k] = this.acc1;
      if (out2) out2[k] = this.acc2;
    }
  }

  /** For each x: out1 = ∫_{past}^x dx/E (time since the bang/bounce), out2 = conformal time, 1/H0. */
  directFromPast(xs: Float64Array, out1: Float64Array | null, out2: Float64Array | null): void {
    const n = xs.length;
    const idx = sortedIndex(xs);
    // Start at the deep past with the tail already included: recompute up to the lowest point.
    const past = this.past();
    const x0 = past.kind === 'bounce' ? past.x : SETTINGS.pastLnA;
    let tail1 = 0, tail2 = 0;
    if (past.kind !== 'bounce') {
      const a = Math.exp(x0), e2 = this.bg.E2(a);
      const q = -this.bg.accel(a) / e2;
      const g1 = 1 / Math.sqrt(e2);
      tail1 = 1 + q > 1e-3 ? g1 / (1 + q) : Infinity;
      tail2 = q > 1e-3 ? g1 / a / q : Infinity;
    }
    this.acc1 = tail1; this.acc2 = tail2;
    let prev = x0;
    // Dense points above the integration floor: Gauss–Legendre up to the first, Chebyshev panels across them.
    let jFirst = 0;
    while (jFirst < n && xs[idx[jFirst]] < x0) jFirst++;
    const m = n - jFirst;
    if (m >= CHEB_MIN_POINTS && !this.pastBoundary && !this.futureBoundary && Number.isFinite(tail1) && Number.isFinite(tail2)) {
      const xa = xs[idx[jFirst]], xb = xs[idx[n - 1]];
      if (m * 3 >= Math.ceil((xb - xa) / this.chebPanel) * CHEB_N) {
        this.segment(prev, xa);
        this.chebSide(xs, idx.subarray(jFirst), 0, m - 1, 1, out1, out2, xa, this.acc1, this.acc2);
        for (let j = 0; j < jFirst; j++) this.tailAt(xs, idx[j], out1, out2);
        return;
      }
    }
    for (let j = 0; j < n; j++) {
      const k = idx[j], x = xs[k];
      if (x < x0) {
        this.tailAt(xs, k, out1, out2);
        continue;
      }
      this.segment(prev, x); prev = x;
      if (out1) out1[k] = this.acc1;
      if (out2) out2[k] = this.acc2;
    }
  }

  /** Deeper than the integration floor: the power-law tail alone (1/E ∝ e^{(1+q)x}). */
  private tailAt(xs: Float64Array, k: number, out1: Float64Array | null, out2: Float64Array | null): void {
    const x = xs[k], a = Math.exp(x), e2 = this.bg.E2(a), q = -this.bg.accel(a) / e2, g1 = 1 / Math.sqrt(e2);
    if (out1) out1[k] = 1 + q > 1e-3 ? g1 / (1 + q) : Infinity;
    if (out2) out2[k] = q > 1e-3 ? g1 / a / q : Infinity;
  }

  // ------------------------------------------------------------------------------------------
  // Grid
  // ------------------------------------------------------------------------------------------

  /** The interpolation grid, built or extended to cover [xLo, xHi]. */
  gridCovering(xLo: number, xHi: number): Grid {
    const h = this.gridStep, m = SETTINGS.gridMargin;
    const kLo = Math.floor((xLo - m) / h), kHi = Math.ceil((xHi + m) / h);
    const g = this.grid;
    if (g && g.kLo <= Math.floor(xLo / h) && g.kHi >= Math.ceil(xHi / h) + 1) return g;
    const lo = g ? Math.min(g.kLo, kLo) : Math.min(kLo, 0);
    const hi = g ? Math.max(g.kHi, kHi) : Math.max(kHi, 0);
    this.grid = new Grid(this, lo, hi, g);
    return this.grid;
  }

  hasGrid(xLo: number, xHi: number): boolean {
    const g = this.grid, h = this.gridStep;
    return !!g && g.kLo <= Math.floor(xLo / h) && g.kHi >= Math.ceil(xHi / h) + 1;
  }

  /**
   * Whether a bounce or turnaround is near enough to [xLo, xHi] (or to the grid's margins) to spoil
   * the grid's smoothness (1/E diverges there); such calls integrate directly.
   */
  nearBoundary(xLo: number, xHi: number): boolean {
    const m = SETTINGS.gridMargin + 3;
    const b = this.scanPast(xLo - m), f = xHi + m > 0 ? this.scanFuture(xHi + m) : this.futureBoundary;
    return (!!b && xLo - m < b.x) || (!!f && xHi + m > f.x);
  }

  /** Past-side totals at the grid's lowest node (time and conformal time since the bang/bounce). */
  pastAt(x: number): [number, number] {
    const xs = new Float64Array([x]);
    const o1 = new Float64Array(1), o2 = new Float64Array(1);
    this.directFromPast(xs, o1, o2);
    return [o1[0], o2[0]];
  }
}

/** Node data of the ln a grid: integrands, slopes, cumulative integrals from today and from the past. */
export class Grid {
  readonly kLo: number;
  readonly kHi: number;
  readonly h: number;
  /** 1/E and 1/(aE) at the nodes, and their x-derivatives. */
  readonly g1: Float64Array; readonly g2: Float64Array; readonly d1: Float64Array; readonly d2: Float64Array;
  /** ∫_0^{x_k} of g1 and g2 (signed). */
  readonly c1: Float64Array; readonly c2: Float64Array;
  /** ∫_{past}^{x_k} of g1 and g2 (filled lazily). */
  private p1: Float64Array | null = null; private p2: Float64Array | null = null;
  private readonly owner: Integrals;

  constructor(owner: Integrals, kLo: number, kHi: number, old: Grid | null) {
    this.owner = owner;
    this.h = owner.gridStep;
    this.kLo = kLo; this.kHi = kHi;
    const n = kHi - kLo + 1;
    this.g1 = new Float64Array(n); this.g2 = new Float64Array(n); this.d1 = new Float64Array(n); this.d2 = new Float64Array(n);
    this.c1 = new Float64Array(n); this.c2 = new Float64Array(n);
    const bg = owner.bg, h = this.h;
    const node = (k: number) => {
      const i = k - kLo;
      if (old && k >= old.kLo && k <= old.kHi) {
        const j = k - old.kLo;
        this.g1[i] = old.g1[j]; this.g2[i] = old.g2[j]; this.d1[i] = old.d1[j]; this.d2[i] = old.d2[j];
        return;
      }
      const a = Math.exp(k * h), e2 = bg.E2(a);
      if (!(e2 > 0)) throw new Error(`E² ≤ 0 at a = ${a} on the integration grid (the model does not expand there)`);
      const g = 1 / Math.sqrt(e2), r = bg.accel(a) / e2; // r = (ä/a)/H², dlnE/dx = r − 1
      this.g1[i] = g; this.g2[i] = g / a;
      this.d1[i] = -g * (r - 1); this.d2[i] = -(g / a) * r;
    };
    for (let k = kLo; k <= kHi; k++) node(k);
    const rule = gaussLegendre(SETTINGS.gridOrder);
    const cell = (k: number): [number, number] => {
      // ∫ over [x_k, x_{k+1}]
      if (old && k >= old.kLo && k + 1 <= old.kHi) {
        const j = k - old.kLo;
        return [old.c1[j + 1] - old.c1[j], old.c2[j + 1] - old.c2[j]];
      }
      const c = (k + 0.5) * h, hh = 0.5 * h;
      let s1 = 0, s2 = 0;
      for (let i = 0; i < rule.x.length; i++) {
        const a = Math.exp(c + hh * rule.x[i]);
        const e2 = bg.E2(a);
        if (!(e2 > 0)) throw new Error(`E² ≤ 0 at a = ${a} on the integration grid`);
        const g = rule.w[i] / Math.sqrt(e2);
        s1 += g; s2 += g / a;
      }
      return [hh * s1, hh * s2];
    };
    const i0 = -kLo; // node of x = 0
    for (let k = 0; k < kHi; k++) {
      const [a1, a2] = cell(k);
      this.c1[i0 + k + 1] = this.c1[i0 + k] + a1; this.c2[i0 + k + 1] = this.c2[i0 + k] + a2;
    }
    for (let k = -1; k >= kLo; k--) {
      const [a1, a2] = cell(k);
      this.c1[i0 + k] = this.c1[i0 + k + 1] - a1; this.c2[i0 + k] = this.c2[i0 + k + 1] - a2;
    }
  }

  /** Time and conformal time since the bang/bounce at the nodes (1/H0). */
  pastArrays(): [Float64Array, Float64Array] {
    if (!this.p1 || !this.p2) {
      const n = this.c1.length;
      const [t0, e0] = this.owner.pastAt(this.kLo * this.h);
      const p1 = new Float64Array(n), p2 = new Float64Array(n);
      // Cumulating upward from the lowest node keeps full relative precision at early times.
      p1[0] = t0; p2[0] = e0;
      for (let i = 1; i < n; i++) {
        p1[i] = p1[i - 1] + (this.c1[i] - this.c1[i - 1]);
        p2[i] = p2[i - 1] + (this.c2[i] - this.c2[i - 1]);
      }
      this.p1 = p1; this.p2 = p2;
    }
    return [this.p1, this.p2];
  }

  /** Quintic Hermite read-back of a cumulative array (c, slope g, slope' d) at each x. */
  interp(xs: Float64Array, c: Float64Array, g: Float64Array, d: Float64Array, out: Float64Array): void {
    const h = this.h, ih = 1 / h, kLo = this.kLo, h2 = h * h;
    const nMax = c.length - 2;
    for (let j = 0; j < xs.length; j++) {
      const u = xs[j] * ih;
      let i = Math.floor(u) - kLo;
      if (i < 0) i = 0; else if (i > nMax) i = nMax;
      const s = u - (i + kLo);
      // Quintic Hermite basis (value only), as hermite5 in components.ts.
      const s2 = s * s, s3 = s2 * s, s4 = s3 * s, s5 = s4 * s;
      const G0 = 10 * s3 - 15 * s4 + 6 * s5;
      const H1 = s - 6 * s3 + 8 * s4 - 3 * s5, H2 = 0.5 * (s2 - 3 * s3 + 3 * s4 - s5);
      const G1 = -4 * s3 + 7 * s4 - 3 * s5, G2 = 0.5 * (s3 - 2 * s4 + s5);
      out[j] = c[i] + G0 * (c[i + 1] - c[i]) + h * (H1 * g[i] + G1 * g[i + 1]) + h2 * (H2 * d[i] + G2 * d[i + 1]);
    }
  }
}

// --- Chebyshev series on [−1, 1] (Numerical Recipes 3rd ed. §5.8–5.9) --------------------------
const CHEB_N = SETTINGS.chebOrder, CHEB_PANEL = SETTINGS.chebPanel, CHEB_MIN_POINTS = SETTINGS.chebMinPoints;
/** Nodes t_k = cos(π(k + ½)/N) and the cosine table cos(π j (k + ½)/N). */
const CHEB_T = new Float64Array(CHEB_N);
const CHEB_COS = new Float64Array(CHEB_N * CHEB_N);
for (let k = 0; k < CHEB_N; k++) {
  CHEB_T[k] = Math.cos((Math.PI * (k + 0.5)) / CHEB_N);
  for (let j = 0; j < CHEB_N; j++) CHEB_COS[j * CHEB_N + k] = Math.cos((Math.PI * j * (k + 0.5)) / CHEB_N);
}
const SCRATCH = Array.from({ length: 6 }, () => new Float64Array(CHEB_N));
/** c_j = (2/N) Σ_k f(t_k) cos(π j (k + ½)/N) (chebft); the series is Σ c_j T_j − c_0/2. */
function chebCoefficients(f: Float64Array, c: Float64Array): void {
  const N = CHEB_N, fac = 2 / N;
  for (let j = 0; j < N; j++) {
    let s = 0;
    const row = j * N;
    for (let k = 0; k < N; k++) s += f[k] * CHEB_COS[row + k];
    c[j] = fac * s;
  }
}
/** Coefficients of the antiderivative that vanishes at t = −1, for a panel of half-width `half` (chint). */
function chebIntegral(c: Float64Array, out: Float64Array, half: number): void {
  const N = CHEB_N, con = 0.5 * half;
  let sum = 0, fac = 1;
  for (let j = 1; j < N - 1; j++) {
    out[j] = (con * (c[j - 1] - c[j + 1])) / j;
    sum += fac * out[j];
    fac = -fac;
  }
  out[N - 1] = (con * c[N - 2]) / (N - 1);
  sum += fac * out[N - 1];
  out[0] = 2 * sum;
}
/** Σ c_j T_j(t) − c_0/2 by Clenshaw's recurrence (chebev). */
function chebEval(c: Float64Array, t: number): number {
  let d = 0, dd = 0;
  const t2 = 2 * t;
  for (let j = CHEB_N - 1; j >= 1; j--) {
    const sv = d;
    d = t2 * d - dd + c[j];
    dd = sv;
  }
  return t * d - dd + 0.5 * c[0];
}

/** idx[from..to) reversed into a new array. */
function reverseRange(idx: Uint32Array, from: number, to: number): Uint32Array {
  const out = new Uint32Array(to - from);
  for (let i = 0; i < out.length; i++) out[i] = idx[to - 1 - i];
  return out;
}

/** Indices of xs in ascending order of value. */
export function sortedIndex(xs: Float64Array): Uint32Array {
  const n = xs.length;
  const idx = new Uint32Array(n);
  for (let i = 0; i < n; i++) idx[i] = i;
  let asc = true, desc = true;
  for (let i = 1; i < n && (asc || desc); i++) {
    if (xs[i] < xs[i - 1]) asc = false;
    if (xs[i] > xs[i - 1]) desc = false;
  }
  if (asc) return idx;
  // Ascending redshifts are descending ln a: the common case, no sort needed.
  if (desc) { for (let i = 0; i < n; i++) idx[i] = n - 1 - i; return idx; }
  idx.sort((a, b) => xs[a] - xs[b]);
  return idx;
}

/**
 * Inverse read-back: for each target value v, the x with F(x) = v where F is the cumulative array c
 * (slope g, slope' d at the nodes) and F is strictly monotonic over [i0, i1]. Quintic Hermite of x as
 * a function of F on the bracketing cell, with dx/dF = 1/F′ and d²x/dF² = −F″/F′³ (inverse function rule).
 */
export function invertCells(c: ArrayLike<number>, g: ArrayLike<number>, d: ArrayLike<number>, xOfNode: (i: number) => number,
  h: number, i0: number, i1: number, targets: Float64Array, out: Float64Array, onMiss: (v: number) => never): void {
  const increasing = c[i1] > c[i0];
  const tmp = new Float64Array(2);
  let last = i0;
  for (let j = 0; j < targets.length; j++) {
    const v = targets[j];
    let lo = i0, hi = i1;
    const inRange = increasing ? v >= c[lo] && v <= c[hi] : v <= c[lo] && v >= c[hi];
    if (!inRange) onMiss(v);
    // Sorted targets land in the previous cell or the next: try those before bisecting.
    for (let k = last - 1; k <= last + 1; k++) {
      if (k >= i0 && k < i1 && (increasing ? c[k] <= v && v <= c[k + 1] : c[k] >= v && v >= c[k + 1])) { lo = k; hi = k + 1; break; }
    }
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if ((c[mid] <= v) === increasing) lo = mid; else hi = mid;
    }
    last = lo;
    const F0 = c[lo], F1 = c[hi];
    const dF = F1 - F0;
    if (dF === 0) { out[j] = xOfNode(lo); continue; }
    const s = (v - F0) / dF;
    const p0 = 1 / g[lo], p1 = 1 / g[hi];
    const q0 = -d[lo] * p0 * p0 * p0, q1 = -d[hi] * p1 * p1 * p1;
    hermite5(s, dF, xOfNode(lo), p0, q0, xOfNode(hi), p1, q1, tmp);
    let x = tmp[0];
    // One Newton step on the forward interpolant of the same cell removes the inverse interpolation's
    // own error (a polish, not a root search: the bracket and the start come from the table).
    const xl = xOfNode(lo);
    hermite5((x - xl) / h, h, F0, g[lo], d[lo], F1, g[hi], d[hi], tmp);
    if (tmp[1] !== 0 && Number.isFinite(tmp[0])) x -= (tmp[0] - v) / tmp[1];
    out[j] = x;
  }
}

function fmt(v: number): string {
  return Number.isFinite(v) ? Number(v.toPrecision(6)).toString() : String(v);
}
