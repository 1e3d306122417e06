/**
 * Raychaudhuri checks along the solved history. For the comoving congruence of a FLRW model the
 * expansion is Θ = 3H, shear and vorticity vanish, and the Raychaudhuri equation (Raychaudhuri 1955,
 * Phys. Rev. 98, 1123; Ellis 2009 reprint notes, Gen. Rel. Grav. 41, 581) reads
 *   dΘ/dt + Θ²/3 = −4πG(ρ + 3p/c²) + Λ.
 * In the kernel's units (t in 1/H0, densities in ρ_crit,0 = 3H0²/(8πG)), 4πGρ = (3/2)H0² ρ/ρ_crit,0
 * and Λ is the w = −1 component, so the right-hand side is 3·accel(a) (accel = (ä/a)/H0²).
 */
import type { Background } from './background';
import { hubbleTimeGyr } from './constants';
import { SETTINGS } from './settings';
import { brent, gaussLegendre } from './ode';
import { solveHistory, pastLimit, type History } from './history';
import { energyConditions } from './energy-conditions';

export interface RaychaudhuriReport {
  /**
   * Largest residual of the equation in integrated form over one integration step,
   * |ΔΘ − ∫(RHS − Θ²/3) dt| / max(|Θ|, ∫(|RHS| + Θ²/3) dt), with Θ(t) from the dense output and the
   * integral by 8-point Gauss–Legendre (dimensionless): the defect as a relative error in Θ, the
   * quantity the ODE tolerance controls.
   */
  maxRelative: number;
  /** Where that happens, Gyr since the origin. */
  tGyrAtMax: number;
  /**
   * Largest pointwise residual |dΘ/dt + Θ²/3 − RHS| / (|dΘ/dt| + Θ²/3 + |RHS|) at step midpoints, dΘ/dt
   * from the derivative of the quartic dense output (one order less accurate than the solution).
   */
  pointwiseMaxRelative: number;
  /** Largest |H² − H0² E²(a)| / (H² + H0² Σ|ρ_i| + H0²|Ω_k|/a²): the Friedmann constraint kept by the solution. */
  friedmannMaxRelative: number;
  /** Number of steps checked (past and future). */
  nChecked: number;
}

const GL8 = gaussLegendre(8);

/**
 * Residual of the Raychaudhuri equation along the solved a(t) (see RaychaudhuriReport for the two
 * forms): Θ = 3H from the dense output of the integration, the right-hand side 3·accel(a) from the
 * components at the interpolated a. Dimensionless. A history solved for another model fails it.
 */
export function raychaudhuriResidual(bg: Background, hist: History = solveHistory(bg)): RaychaudhuriReport {
  const tH = hubbleTimeGyr(bg.H0);
  let maxRel = 0, tAt = NaN, maxPt = 0, maxF = 0, n = 0;
  const y = new Float64Array(2), dy = new Float64Array(2);
  for (const sol of [hist.raw.past, hist.raw.future]) {
    const ts = sol.t;
    for (let i = 0; i + 1 < ts.length; i++) {
      const t1 = ts[i], t2 = ts[i + 1];
      if (t1 === t2) continue;
      const mid = 0.5 * (t1 + t2);
      // Integrated form over the step, in the step's own θ so that tiny steps far from t = 0 keep
      // their precision; the last step may be cut by an event at θ_end < 1.
      const hStep = sol.stepSize(i);
      const thEnd = Math.min(1, (t2 - t1) / hStep);
      let integral = 0, scale = 0;
      for (let k = 0; k < 8; k++) {
        sol.atTheta(i, thEnd * 0.5 * (1 + GL8.x[k]), y);
        const a = Math.exp(y[0]);
        const th = 3 * y[1];
        const rhs = 3 * bg.accel(a);
        integral += GL8.w[k] * (rhs - th * th / 3);
        scale += GL8.w[k] * (Math.abs(rhs) + th * th / 3);
      }
      const w = 0.5 * thEnd * hStep;
      integral *= w; scale *= Math.abs(w);
      const th2 = 3 * sol.atTheta(i, thEnd, y)[1], th1 = 3 * sol.atTheta(i, 0, dy)[1];
      // The defect as an error in Θ itself (comparable with the ODE's relative tolerance); near a
      // turnaround, where Θ → 0, the step's own scale ∫(|RHS| + Θ²/3)dt takes over.
      const rel = Math.abs(th2 - th1 - integral) / Math.max(Math.abs(th1), Math.abs(th2), scale);
      if (rel > maxRel) { maxRel = rel; tAt = (mid - hist.raw.tOrigin) * tH; }
      // Pointwise form at the midpoint.
      sol.at(mid, y);
      sol.derivativeAt(mid, dy);
      const a = Math.exp(y[0]);
      const theta = 3 * y[1], dTh = 3 * dy[1], rhs = 3 * bg.accel(a);
      const pt = Math.abs(dTh + theta * theta / 3 - rhs) / (Math.abs(dTh) + theta * theta / 3 + Math.abs(rhs));
      if (pt > maxPt) maxPt = pt;
      let sumAbs = Math.abs(bg.omegaK) / (a * a);
      for (const c of bg.components) sumAbs += Math.abs(c.density(a));
      const fr = Math.abs(y[1] * y[1] - bg.E2(a)) / (y[1] * y[1] + sumAbs);
      if (fr > maxF) maxF = fr;
      n++;
    }
  }
  return { maxRelative: maxRel, tGyrAtMax: tAt, pointwiseMaxRelative: maxPt, friedmannMaxRelative: maxF, nChecked: n };
}

type NumOrArray = number | ArrayLike<number>;
function mapZ(z: NumOrArray, f: (z: number) => number): number | Float64Array {
  if (typeof z === 'number') return f(z);
  const out = new Float64Array(z.length);
  for (let i = 0; i < z.length; i++) out[i] = f(z[i]);
  return out;
}

/** Deceleration parameter q(z) = −ä a/ȧ² = −accel/E² (dimensionless; e.g. Weinberg 2008 eq. 1.5.39). */
export function decelerationParameter(bg: Background, z: NumOrArray): number | Float64Array {
  return mapZ(z, (zz) => { const a = 1 / (1 + zz); return -bg.accel(a) / bg.E2(a); });
}

/**
 * Redshift where the expansion last started to accelerate (ä changes sign from < 0 to > 0), or null
 * when the model decelerates today or has accelerated throughout its scanned past. Found on a ln-a
 * grid from today back to the past limit, then refined by Brent's method on accel(a) in ln a.
 * Flat ΛCDM without radiation: z = (2Ω_Λ/Ω_m)^(1/3) − 1 (closed form from ä = 0).
 */
export function accelerationOnsetRedshift(bg: Background): number | null {
  if (!(bg.accel(1) > 0)) return null;
  const limit = pastLimit(bg);
  const lnLow = limit.kind === 'bounce' ? Math.log(limit.aMin) : Math.log(SETTINGS.pastScanAMin);
  const step = 1 / SETTINGS.scanPerLnA;
  let prev = 0;
  for (let x = -step; x > lnLow; x -= step) {
    if (!(bg.accel(Math.exp(x)) > 0)) {
      const lnA = brent((y) => bg.accel(Math.exp(y)), x, prev, SETTINGS.edgeTolerance);
      return 1 / Math.exp(lnA) - 1;
    }
    prev = x;
  }
  return null;
}

export interface SingularityStatement {
  /** True when the strong energy condition (total) holds at every redshift of the past. */
  holds: boolean;
  text: string;
  /** Age of the model, Gyr (NaN if the past is eternal). */
  ageGyr: number;
  /** 1/H0, Gyr. */
  hubbleTimeGyr: number;
  /** Where the strong condition fails in the past (redshift intervals), when it does. */
  failsOn: [number, number][];
}

/**
 * The singularity statement of the Raychaudhuri equation: if ρ + 3p ≥ 0 throughout the past, then
 * ä ≤ 0 there, a(t) lies below its tangent line today, and a = 0 was reached less than 1/H0 ago (e.g.
 * Hawking & Ellis 1973 §4.4; Weinberg 2008 §1.5). Checked on the total matter content for
 * z up to 1/`SETTINGS.pastScanAMin` − 1.
 */
export function singularityStatement(bg: Background, hist?: History): SingularityStatement {
  const tH = hubbleTimeGyr(bg.H0);
  const limit = pastLimit(bg);
  const zTop = Math.min(limit.zMax, 1 / SETTINGS.pastScanAMin - 1);
  const report = energyConditions(bg, { zMax: zTop });
  const strong = report.total.strong;
  const h = hist ?? solveHistory(bg);
  const age = h.ageGyr;
  const fmt = (x: number) => x.toPrecision(5);
  if (strong.holds && limit.kind !== 'bounce') {
    return {
      holds: true, ageGyr: age, hubbleTimeGyr: tH, failsOn: [],
      text: `The strong energy condition ρ + 3p ≥ 0 holds at every redshift of the past (checked to z = ${zTop.toExponential(1)}), so ä ≤ 0 throughout and a(t) lies below its tangent today: the scale factor was zero a finite time ago, less than 1/H0 = ${fmt(tH)} Gyr. This model's age is ${fmt(age)} Gyr (${fmt(age / tH)} of 1/H0).`,
    };
  }
  const where = strong.failsOn.map(([lo, hi]) => `${fmt(lo)} ≤ z ≤ ${fmt(hi)}`).join(', ');
  return {
    holds: false, ageGyr: age, hubbleTimeGyr: tH, failsOn: strong.failsOn,
    text: `The strong energy condition fails for ${where || 'part of the past'}, so the Raychaudhuri equation alone does not force a singularity; ${Number.isNaN(age) ? 'this model has no beginning a finite time ago' : `the model's ${limit.kind === 'bounce' ? 'time since its bounce' : 'age'} is ${fmt(age)} Gyr against 1/H0 = ${fmt(tH)} Gyr`}.`,
  };
}
