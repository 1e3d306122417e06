/**
 * Adaptive explicit Runge–Kutta integrator: the Dormand–Prince 5(4) pair (Dormand & Prince 1980,
 * J. Comput. Appl. Math. 6, 19) with local extrapolation, a PI step-size controller (Hairer, Nørsett &
 * Wanner, Solving ODEs I, §II.4) and Shampine's (1986, Math. Comp. 46, 135) quartic dense output, the
 * same coefficients scipy's RK45 uses. Events are located on the dense output by bracketing and
 * bisection refined with the secant (Illinois) rule.
 *
 * Own code rather than a package because the kernel needs dense output plus event location in plain
 * TypeScript with no dependencies, and it is ~200 lines.
 */

export type Rhs = (t: number, y: Float64Array, dydt: Float64Array) => void;

export interface OdeEvent {
  /** Root of fn(t, y) is the event. */
  fn: (t: number, y: Float64Array) => number;
  /** Stop the integration at the first root. */
  terminal: boolean;
  /** +1: only rising zero crossings, −1: only falling, 0: both. */
  direction?: -1 | 0 | 1;
}

export interface OdeOptions {
  rtol: number;
  atol: number;
  maxSteps?: number;
  firstStep?: number;
  maxStep?: number;
  events?: OdeEvent[];
}

export interface OdeEventHit {
  index: number;
  t: number;
  y: Float64Array;
}

export interface OdeSolution {
  status: 'done' | 'event' | 'maxSteps' | 'stepTooSmall';
  /** Step nodes in the integration order (decreasing when integrating backwards). */
  readonly t: number[];
  readonly events: OdeEventHit[];
  readonly nSteps: number;
  readonly nEval: number;
  /** Final time reached. */
  readonly tEnd: number;
  readonly yEnd: Float64Array;
  /** State at any t inside the integrated range (dense output). */
  at(t: number, out?: Float64Array): Float64Array;
  /** Derivative of the dense-output polynomial at t (for residual checks). */
  derivativeAt(t: number, out?: Float64Array): Float64Array;
  /** Step index containing t. */
  stepIndex(t: number): number;
  /**
   * Dense output of step `idx` at θ = (t − t_idx)/h_idx ∈ [0, 1], free of the rounding of t itself
   * (matters where steps are tiny against |t|, e.g. next to a big bang far from t = 0).
   */
  atTheta(idx: number, theta: number, out?: Float64Array): Float64Array;
  /** Signed size of step idx as taken (the last step may be cut short by a terminal event). */
  stepSize(idx: number): number;
}

const C2 = 1 / 5, C3 = 3 / 10, C4 = 4 / 5, C5 = 8 / 9;
const A21 = 1 / 5;
const A31 = 3 / 40, A32 = 9 / 40;
const A41 = 44 / 45, A42 = -56 / 15, A43 = 32 / 9;
const A51 = 19372 / 6561, A52 = -25360 / 2187, A53 = 64448 / 6561, A54 = -212 / 729;
const A61 = 9017 / 3168, A62 = -355 / 33, A63 = 46732 / 5247, A64 = 49 / 176, A65 = -5103 / 18656;
const B1 = 35 / 384, B3 = 500 / 1113, B4 = 125 / 192, B5 = -2187 / 6784, B6 = 11 / 84;
const E1 = -71 / 57600, E3 = 71 / 16695, E4 = -71 / 1920, E5 = 17253 / 339200, E6 = -22 / 525, E7 = 1 / 40;
// Shampine's dense-output matrix P (rows: stages 1..7, columns: powers 1..4 of θ).
const P: readonly (readonly number[])[] = [
  [1, -8048581381 / 2820520608, 8663915743 / 2820520608, -12715105075 / 11282082432],
  [0, 0, 0, 0],
  [0, 131558114200 / 32700410799, -68118460800 / 10900136933, 87487479700 / 32700410799],
  [0, -1754552775 / 470086768, 14199869525 / 1410260304, -10690763975 / 1880347072],
  [0, 127303824393 / 49829197408, -318862633887 / 49829197408, 701980252875 / 199316789632],
  [0, -282668133 / 205662961, 2019193451 / 616988883, -1453857185 / 822651844],
  [0, 40617522 / 29380423, -110615467 / 29380423, 69997945 / 29380423],
];

/**
 * Integrate y' = f(t, y) from t0 to tEnd (either direction). Dimensionless; tolerances are per step:
 * |err_i| ≤ atol + rtol·max(|y_i|, |y_new,i|).
 */
export function solveOde(f: Rhs, t0: number, y0: ArrayLike<number>, tEnd: number, opts: OdeOptions): OdeSolution {
  const n = y0.length;
  const dir = tEnd >= t0 ? 1 : -1;
  const { rtol, atol } = opts;
  const maxSteps = opts.maxSteps ?? 200000;
  const maxStep = opts.maxStep ?? Infinity;
  const events = opts.events ?? [];

  const ts: number[] = [t0];
  // Per step: y at step start (n) + Q coefficients (n × 4), packed.
  const ys: Float64Array[] = [];
  const qs: Float64Array[] = [];
  const hs: number[] = [];

  let t = t0;
  let y = Float64Array.from(y0);
  const k1 = new Float64Array(n), k2 = new Float64Array(n), k3 = new Float64Array(n), k4 = new Float64Array(n);
  const k5 = new Float64Array(n), k6 = new Float64Array(n), k7 = new Float64Array(n);
  const tmp = new Float64Array(n), ynew = new Float64Array(n);
  let nEval = 0;
  f(t, y, k1); nEval++;

  // Initial step (Hairer's heuristic, simplified).
  let h: number;
  if (opts.firstStep) h = Math.abs(opts.firstStep);
  else {
    let d0 = 0, d1 = 0;
    for (let i = 0; i < n; i++) {
      const sc = atol + rtol * Math.abs(y[i]);
      d0 += (y[i] / sc) ** 2; d1 += (k1[i] / sc) ** 2;
    }
    d0 = Math.sqrt(d0 / n); d1 = Math.sqrt(d1 / n);
    h = d0 < 1e-5 || d1 < 1e-5 ? 1e-6 : 0.01 * d0 / d1;
    h = Math.min(h, Math.abs(tEnd - t0));
  }
  h = Math.min(h, maxStep);

  const evPrev = events.map((e) => e.fn(t, y));
  const hits: OdeEventHit[] = [];
  let status: OdeSolution['status'] = 'done';
  let errOld = 1e-4;
  let nSteps = 0;

  const denseEval = (idx: number, tt: number, out: Float64Array, theta?: number): Float64Array => {
    const y0s = ys[idx], q = qs[idx], hh = hs[idx];
    const th = theta ?? (tt - ts[idx]) / hh;
    const th2 = th * th, th3 = th2 * th, th4 = th3 * th;
    for (let i = 0; i < n; i++) {
      const o = 4 * i;
      out[i] = y0s[i] + hh * (q[o] * th + q[o + 1] * th2 + q[o + 2] * th3 + q[o + 3] * th4);
    }
    return out;
  };
  const denseDeriv = (idx: number, tt: number, out: Float64Array): Float64Array => {
    const q = qs[idx], hh = hs[idx];
    const th = (tt - ts[idx]) / hh;
    const th2 = th * th, th3 = th2 * th;
    for (let i = 0; i < n; i++) {
      const o = 4 * i;
      out[i] = q[o] + 2 * q[o + 1] * th + 3 * q[o + 2] * th2 + 4 * q[o + 3] * th3;
    }
    return out;
  };

  outer: while (dir * (tEnd - t) > 0) {
    if (nSteps >= maxSteps) { status = 'maxSteps'; break; }
    if (dir * (t + dir * h - tEnd) > 0) h = Math.abs(tEnd - t);
    let accepted = false;
    while (!accepted) {
      if (h < 1e-14 * Math.max(1, Math.abs(t))) { status = 'stepTooSmall'; break outer; }
      const hd = dir * h;
      for (let i = 0; i < n; i++) tmp[i] = y[i] + hd * A21 * k1[i];
      f(t + C2 * hd, tmp, k2);
      for (let i = 0; i < n; i++) tmp[i] = y[i] + hd * (A31 * k1[i] + A32 * k2[i]);
      f(t + C3 * hd, tmp, k3);
      for (let i = 0; i < n; i++) tmp[i] = y[i] + hd * (A41 * k1[i] + A42 * k2[i] + A43 * k3[i]);
      f(t + C4 * hd, tmp, k4);
      for (let i = 0; i < n; i++) tmp[i] = y[i] + hd * (A51 * k1[i] + A52 * k2[i] + A53 * k3[i] + A54 * k4[i]);
      f(t + C5 * hd, tmp, k5);
      for (let i = 0; i < n; i++) tmp[i] = y[i] + hd * (A61 * k1[i] + A62 * k2[i] + A63 * k3[i] + A64 * k4[i] + A65 * k5[i]);
      f(t + hd, tmp, k6);
      for (let i = 0; i < n; i++) ynew[i] = y[i] + hd * (B1 * k1[i] + B3 * k3[i] + B4 * k4[i] + B5 * k5[i] + B6 * k6[i]);
      f(t + hd, ynew, k7);
      nEval += 6;
      let err = 0;
      let finite = true;
      for (let i = 0; i < n; i++) {
        const e = hd * (E1 * k1[i] + E3 * k3[i] + E4 * k4[i] + E5 * k5[i] + E6 * k6[i] + E7 * k7[i]);
        const sc = atol + rtol * Math.max(Math.abs(y[i]), Math.abs(ynew[i]));
        const r = e / sc;
        if (!Number.isFinite(r)) finite = false;
        err += r * r;
      }
      err = Math.sqrt(err / n);
      if (!finite) { h *= 0.25; continue; }
      if (err <= 1) {
        accepted = true;
        // PI controller (β = 0.04), factors bounded to [0.2, 10].
        const fac = err === 0 ? 10 : Math.min(10, Math.max(0.2, 0.9 * err ** -0.17 * errOld ** 0.04));
        errOld = Math.max(err, 1e-4);
        // Dense output coefficients for this step.
        const q = new Float64Array(4 * n);
        const ks = [k1, k2, k3, k4, k5, k6, k7];
        for (let i = 0; i < n; i++) {
          for (let p = 0; p < 4; p++) {
            let s = 0;
            for (let st = 0; st < 7; st++) s += ks[st][i] * P[st][p];
            q[4 * i + p] = s;
          }
        }
        ys.push(Float64Array.from(y)); qs.push(q); hs.push(hd);
        const tNew = t + hd;
        ts.push(tNew);
        nSteps++;
        const idx = ys.length - 1;
        // Events on this step.
        let stopAt = -1;
        let stopT = Infinity;
        for (let e = 0; e < events.length; e++) {
          const ev = events[e];
          const gNew = ev.fn(tNew, ynew);
          const gOld = evPrev[e];
          evPrev[e] = gNew;
          const rising = gOld < 0 && gNew >= 0, falling = gOld > 0 && gNew <= 0;
          const want = ev.direction === 1 ? rising : ev.direction === -1 ? falling : rising || falling;
          if (!want) continue;
          const tr = locateRoot((tt) => ev.fn(tt, denseEval(idx, tt, tmp)), t, tNew, gOld, gNew);
          const yr = Float64Array.from(denseEval(idx, tr, tmp));
          if (ev.terminal) {
            if (dir * (tr - t) < dir * (stopT - t) || stopT === Infinity) { stopT = tr; stopAt = e; }
          } else hits.push({ index: e, t: tr, y: yr });
        }
        if (stopAt >= 0) {
          const yr = Float64Array.from(denseEval(idx, stopT, tmp));
          hits.push({ index: stopAt, t: stopT, y: yr });
          // Truncate the last step at the event (keeps dense output valid inside it).
          ts[ts.length - 1] = stopT;
          t = stopT; y = yr;
          status = 'event';
          break outer;
        }
        t = tNew;
        y.set(ynew);
        k1.set(k7);
        h = Math.min(h * fac, maxStep);
      } else {
        h *= Math.max(0.2, 0.9 * err ** -0.2);
      }
    }
  }

  const first = ts[0];
  const last = ts[ts.length - 1];
  const stepIndex = (tt: number): number => {
    const m = ys.length;
    if (m === 0) return -1;
    // Binary search on the monotone node list.
    let lo = 0, hi = m - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (dir * (tt - ts[mid]) >= 0) lo = mid; else hi = mid - 1;
    }
    return lo;
  };
  const check = (tt: number) => {
    if (dir * (tt - first) < -1e-12 * Math.max(1, Math.abs(first)) || dir * (tt - last) > 1e-12 * Math.max(1, Math.abs(last))) {
      throw new RangeError(`t = ${tt} is outside the integrated range [${Math.min(first, last)}, ${Math.max(first, last)}]`);
    }
  };
  return {
    status, t: ts, events: hits, nSteps, nEval, tEnd: t, yEnd: y,
    at(tt: number, out = new Float64Array(n)) {
      check(tt);
      if (ys.length === 0) { out.set(y); return out; }
      return denseEval(stepIndex(tt), tt, out);
    },
    derivativeAt(tt: number, out = new Float64Array(n)) {
      check(tt);
      if (ys.length === 0) { f(tt, y, out); return out; }
      return denseDeriv(stepIndex(tt), tt, out);
    },
    stepIndex,
    atTheta(idx: number, theta: number, out = new Float64Array(n)) {
      if (!(idx >= 0 && idx < ys.length)) throw new RangeError(`step ${idx} does not exist (0..${ys.length - 1})`);
      return denseEval(idx, ts[idx] + theta * hs[idx], out, theta);
    },
    stepSize(idx: number) { return hs[idx]; },
  };
}

/** Root of g on [t1, t2] given g(t1)=g1, g(t2)=g2 of opposite sign (Illinois false position). */
export function locateRoot(g: (t: number) => number, t1: number, t2: number, g1: number, g2: number, tol = 1e-15): number {
  if (g1 === 0) return t1;
  if (g2 === 0) return t2;
  let a = t1, b = t2, fa = g1, fb = g2, side = 0;
  for (let it = 0; it < 200; it++) {
    const c = (a * fb - b * fa) / (fb - fa);
    const fc = g(c);
    if (fc === 0 || Math.abs(b - a) <= tol * Math.max(1, Math.abs(c))) return c;
    if (fc * fb > 0) {
      b = c; fb = fc;
      if (side === -1) fa /= 2;
      side = -1;
    } else {
      a = c; fa = fc;
      if (side === 1) fb /= 2;
      side = 1;
    }
  }
  return (a + b) / 2;
}

/**
 * Root of a continuous function on [lo, hi] by Brent's method (Brent 1973, Algorithms for
 * Minimization without Derivatives, ch. 4). Requires f(lo), f(hi) of opposite sign.
 */
export function brent(fn: (x: number) => number, lo: number, hi: number, tol = 1e-14, maxIter = 200): number {
  let a = lo, b = hi, fa = fn(a), fb = fn(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  if (fa * fb > 0) throw new RangeError(`brent: no sign change on [${lo}, ${hi}]`);
  let c = a, fc = fa, d = b - a, e = d;
  for (let i = 0; i < maxIter; i++) {
    if (fb * fc > 0) { c = a; fc = fa; d = b - a; e = d; }
    if (Math.abs(fc) < Math.abs(fb)) { a = b; b = c; c = a; fa = fb; fb = fc; fc = fa; }
    const tol1 = 2 * Number.EPSILON * Math.abs(b) + 0.5 * tol;
    const xm = 0.5 * (c - b);
    if (Math.abs(xm) <= tol1 || fb === 0) return b;
    if (Math.abs(e) >= tol1 && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number, q: number;
      if (a === c) { p = 2 * xm * s; q = 1 - s; }
      else {
        const qq = fa / fc, r = fb / fc;
        p = s * (2 * xm * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q; else p = -p;
      if (2 * p < Math.min(3 * xm * q - Math.abs(tol1 * q), Math.abs(e * q))) { e = d; d = p / q; }
      else { d = xm; e = d; }
    } else { d = xm; e = d; }
    a = b; fa = fb;
    b += Math.abs(d) > tol1 ? d : xm > 0 ? tol1 : -tol1;
    fb = fn(b);
  }
  return b;
}

/** Gauss–Legendre nodes and weights on [−1, 1] (Newton on P_n; Golub–Welsch accuracy). */
export function gaussLegendre(m: number): { x: Float64Array; w: Float64Array } {
  const x = new Float64Array(m), w = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    let z = Math.cos(Math.PI * (i + 0.75) / (m + 0.5));
    let dp = 0;
    for (let it = 0; it < 100; it++) {
      let p0 = 1, p1 = z;
      for (let k = 2; k <= m; k++) { const p2 = ((2 * k - 1) * z * p1 - (k - 1) * p0) / k; p0 = p1; p1 = p2; }
      const pm = m === 1 ? 1 : p0;
      const pn = m === 1 ? z : p1;
      dp = m * (z * pn - pm) / (z * z - 1);
      const dz = pn / dp;
      z -= dz;
      if (Math.abs(dz) < 1e-16) break;
    }
    x[i] = z; w[i] = 2 / ((1 - z * z) * dp * dp);
  }
  return { x, w };
}

const glCache = new Map<number, { x: Float64Array; w: Float64Array }>();
/** ∫_lo^hi fn by composite m-point Gauss–Legendre on `pieces` equal sub-intervals. */
export function integrateGL(fn: (x: number) => number, lo: number, hi: number, pieces = 8, m = 16): number {
  let rule = glCache.get(m);
  if (!rule) { rule = gaussLegendre(m); glCache.set(m, rule); }
  const step = (hi - lo) / pieces;
  let s = 0;
  for (let p = 0; p < pieces; p++) {
    const mid = lo + (p + 0.5) * step, half = step / 2;
    for (let i = 0; i < m; i++) s += rule.w[i] * fn(mid + half * rule.x[i]);
  }
  return s * step / 2;
}
