/**
 * Linear growth of matter perturbations on the model's own background (sub-horizon, pressureless,
 * scale independent; e.g. Peebles 1980, The Large-Scale Structure of the Universe, §10; Linder 2005):
 *   δ'' + (2 + d ln H/d ln a) δ' − (3/2) Ω_m(a) δ = 0,   ' = d/d ln a,
 * with 2 + d ln H/d ln a = 1 + (ä/a)/H² (so any w, curvature and radiation enter through H only),
 * and Ω_m(a) = ρ_matter(a)/ρ_crit(a) counting the 'matter' components (cold dark matter + baryons;
 * massive neutrinos and other fluids are taken as smooth — see cautions.ts).
 *
 * One Dormand–Prince 5(4) solve per model in x = ln a with dense output; every D(z), f(z) after that
 * is a polynomial evaluation.
 *
 * Initial condition: the Mészáros (1974, A&A 37, 225) growing mode, exact for matter + radiation,
 *   D = a + (2/3) a_eq   with a_eq = a ρ_rad/ρ_m at the start,
 * set at a = `SETTINGS.growthAInit`; without radiation it is D = a with the first-order corrections of
 * the other components (see initialGrowingMode). This normalisation is 'early' (D → a deep in the
 * matter era).
 */
import type { Background } from './background';
import { SETTINGS } from './settings';
import { brent, gaussLegendre, solveOde, type OdeSolution } from './ode';
import { pastLimit } from './history';
import { growthCautions, type KernelWarning } from './cautions';

export type GrowthNormalization = 'today' | 'early';
type NumOrArray = number | ArrayLike<number>;

export interface GrowthSolution {
  /** Growth factor D(z) (dimensionless): 'today' → D(0) = 1; 'early' → D → a in the matter era. */
  D(z: NumOrArray, normalize?: GrowthNormalization): number | Float64Array;
  /** Growth rate f = d ln D / d ln a (dimensionless). */
  f(z: NumOrArray): number | Float64Array;
  /** f σ8(z) = f(z) σ8 D(z)/D(0), σ8 given today (dimensionless). */
  fSigma8(z: NumOrArray, sigma8: number): number | Float64Array;
  /**
   * Decaying mode D₋(z) normalised to 1 today: the second solution by reduction of order,
   * D₋ = D₊ ∫_a^∞ da'/(a'³ E D₊²), the one with no growing admixture in the far future
   * (∝ a^(−3/2) ∝ 1/t in Einstein–de Sitter; Mészáros's decaying mode with radiation).
   * Unavailable (throws) for models that recollapse.
   */
  decaying(z: NumOrArray): number | Float64Array;
  /**
   * The solution's warnings plus those that depend on the redshifts asked for (radiation-era
   * accuracy at the largest z); call with the same z as D/f/fSigma8.
   */
  warningsFor(z: NumOrArray): KernelWarning[];
  /** Scale-factor range solved. */
  readonly aRange: [number, number];
  readonly warnings: KernelWarning[];
  readonly solution: OdeSolution;
}

function mapZ(z: NumOrArray, f: (z: number) => number): number | Float64Array {
  if (typeof z === 'number') return f(z);
  const out = new Float64Array(z.length);
  for (let i = 0; i < z.length; i++) out[i] = f(z[i]);
  return out;
}

/** Largest a the growth solve goes to: `growthAEnd`, or just before a turnaround. */
function endScaleFactor(bg: Background, aEnd: number): { a: number; recollapses: boolean } {
  const step = 1 / SETTINGS.scanPerLnA;
  let prev = 0;
  for (let x = step; x <= Math.log(aEnd) + 1e-12; x += step) {
    if (!(bg.E2(Math.exp(x)) > 0)) {
      const lnT = brent((y) => bg.E2(Math.exp(y)), prev, x, SETTINGS.rootTolerance);
      return { a: Math.exp(lnT) * (1 - 1e-3), recollapses: true };
    }
    prev = x;
  }
  return { a: aEnd, recollapses: false };
}

/**
 * (δ, dδ/d ln a) of the growing mode at aInit, normalised to D → a in the matter era.
 * With radiation: the Mészáros (1974) mode D = a + (2/3)a_eq (exact for matter + radiation; other
 * components are ≲ 1e-11 of the total this early). Without radiation: D = a(1 + Σ_X c(w_X) ε_X),
 * the first-order correction for each further component X (curvature as w = −1/3) with
 * ε_X = ρ_X/ρ_m ∝ a^p, p = −3w_X, found by inserting the ansatz into the growth equation:
 *   c = (3/2)(w − 1) / ((1+p)² + (1+p)/2 − 3/2)   (c = −2/11 for Λ and −4/7 for curvature),
 * so the initial error is O(ε²).
 */
function initialGrowingMode(bg: Background, aInit: number, rm: number, warnings: KernelWarning[]): [number, number] {
  let rRad = 0;
  const others: { eps: number; w: number }[] = [];
  for (const c of bg.components) {
    if (c.kind === 'matter') continue;
    const r = c.density(aInit), w = c.w(aInit);
    if (Math.abs(w - 1 / 3) < 1e-3) rRad += r;
    else others.push({ eps: r / rm, w });
  }
  if (bg.omegaK !== 0) others.push({ eps: bg.omegaK / (aInit * aInit) / rm, w: -1 / 3 });
  const ratio = rRad / rm; // 1/y of Mészáros
  let corr = 0, dcorr = 0;
  for (const { eps, w } of others) {
    if (Math.abs(eps) < 1e-15) continue;
    const p = -3 * w;
    const den = (1 + p) ** 2 + (1 + p) / 2 - 1.5;
    if (p < 0.05 || Math.abs(eps) > 1e-3) {
      if (Math.abs(eps) < 1e-9) continue; // negligible whatever its scaling
      warnings.push({ code: 'growth_initial_condition', message: `at a = ${aInit} a component with w = ${w.toPrecision(3)} is ${Math.abs(eps).toExponential(1)} of the matter density and does not fade into the past; the matter-era initial condition is approximate` });
      continue;
    }
    if (ratio > 1e-6) continue; // radiation era: these terms are far below the radiation's effect
    const c = (1.5 * (w - 1)) / den;
    corr += c * eps;
    dcorr += c * (1 + p) * eps;
  }
  return [aInit * (1 + (2 / 3) * ratio + corr), aInit * (1 + dcorr)];
}

/** Solve the growth equation once for a model (see the module comment for the equation and sources). */
export function solveGrowth(bg: Background): GrowthSolution {
  const matter = bg.components.filter((c) => c.kind === 'matter');
  if (matter.length === 0 || matter.every((c) => c.omega0 <= 0)) {
    throw new RangeError('growth: the model has no clustering matter (omegaM must be > 0)');
  }
  const rhoM = (a: number) => { let s = 0; for (const c of matter) s += c.density(a); return s; };
  const warnings: KernelWarning[] = [...growthCautions(bg)];
  const limit = pastLimit(bg);
  let aInit = SETTINGS.growthAInit;
  let early = true;
  if (limit.kind === 'bounce') {
    aInit = limit.aMin * 1.05;
    early = false;
    warnings.push({ code: 'growth_after_bounce', message: `the model bounces at a = ${limit.aMin.toPrecision(5)}; growth starts just after the bounce with δ' = 0, so only the 'today' normalisation is meaningful` });
  }
  const { a: aEnd, recollapses } = endScaleFactor(bg, SETTINGS.growthAEnd);

  // One pass over the components gives E², ä/a and ρ_m together (the Background contract defines
  // E2 and accel as these sums), about a third cheaper than three separate calls.
  const comps = bg.components, nComp = comps.length, isMatter = comps.map((c) => c.kind === 'matter');
  const rhs = (x: number, y: Float64Array, d: Float64Array) => {
    const a = Math.exp(x);
    let e2 = bg.omegaK / (a * a), acc = 0, rm = 0;
    for (let i = 0; i < nComp; i++) {
      const c = comps[i];
      const r = c.density(a);
      e2 += r;
      acc += r * (1 + 3 * c.w(a));
      if (isMatter[i]) rm += r;
    }
    d[0] = y[1];
    d[1] = -(1 - 0.5 * acc / e2) * y[1] + 1.5 * (rm / e2) * y[0];
  };
  let y0: [number, number];
  if (early) {
    y0 = initialGrowingMode(bg, aInit, rhoM(aInit), warnings);
  } else {
    y0 = [1, 0];
  }
  const xInit = Math.log(aInit), xEnd = Math.log(aEnd);
  // After a bounce δ is O(1) and δ' starts at 0, so the tiny absolute tolerance of the matter-era start
  // (δ ~ aInit) would make the first step vanish; scale it to δ instead.
  const atol = early ? SETTINGS.growthAtol : SETTINGS.growthRtol * 1e-3;
  const sol = solveOde(rhs, xInit, y0, xEnd, { rtol: SETTINGS.growthRtol, atol, maxSteps: 200000 });
  if (sol.status !== 'done') throw new Error(`growth: the integration stopped early (${sol.status}) at a = ${Math.exp(sol.tEnd)}`);
  const buf = new Float64Array(2);
  const stateAtZ = (z: number): Float64Array => {
    if (!(z > -1)) throw new RangeError(`growth: z must be > −1, got ${z}`);
    const x = -Math.log1p(z);
    if (x < xInit || x > xEnd) {
      throw new RangeError(`growth: z = ${z} is outside the solved range ${(1 / aEnd - 1).toPrecision(4)} ≤ z ≤ ${(1 / aInit - 1).toPrecision(4)}`);
    }
    return sol.at(x, buf);
  };
  const D1 = sol.at(0)[0];
  const D = (z: NumOrArray, normalize: GrowthNormalization = 'today') => {
    if (normalize === 'early' && !early) throw new RangeError("growth: the 'early' normalisation needs a matter era; this model bounces");
    const s = normalize === 'today' ? 1 / D1 : 1;
    return mapZ(z, (zz) => stateAtZ(zz)[0] * s);
  };
  const f = (z: NumOrArray) => mapZ(z, (zz) => { const y = stateAtZ(zz); return y[1] / y[0]; });
  const fSigma8 = (z: NumOrArray, sigma8: number) => {
    if (!(sigma8 > 0) || !Number.isFinite(sigma8)) throw new RangeError(`fSigma8: sigma8 must be a finite number > 0, got ${sigma8}`);
    return mapZ(z, (zz) => { const y = stateAtZ(zz); return (y[1] / y[0]) * sigma8 * y[0] / D1; });
  };

  // Decaying mode: J(x) = ∫_x^∞ g dx', g = 1/(a² E D₊²), by Gauss–Legendre on each step of the dense
  // output, accumulated from the end; the tail beyond aEnd from the local power law of g.
  let cum: Float64Array | null = null;
  const rule = gaussLegendre(8);
  const g = (x: number): number => { const a = Math.exp(x); const d = sol.at(x, buf)[0]; return 1 / (a * a * Math.sqrt(bg.E2(a)) * d * d); };
  const glInt = (lo: number, hi: number): number => {
    const mid = 0.5 * (lo + hi), half = 0.5 * (hi - lo);
    let s = 0;
    for (let i = 0; i < 8; i++) s += rule.w[i] * g(mid + half * rule.x[i]);
    return s * half;
  };
  const buildCum = (): Float64Array => {
    const ts = sol.t, m = ts.length;
    const c = new Float64Array(m);
    const gEnd = g(xEnd), gPrev = g(xEnd - 1e-3);
    const k = -(Math.log(gEnd) - Math.log(gPrev)) / 1e-3;
    c[m - 1] = gEnd / k;
    for (let i = m - 2; i >= 0; i--) c[i] = c[i + 1] + glInt(ts[i], ts[i + 1]);
    return c;
  };
  let decay1 = NaN;
  const decayingRaw = (x: number): number => {
    if (!cum) cum = buildCum();
    const k = sol.stepIndex(x);
    const J = cum[k + 1] + glInt(x, sol.t[k + 1]);
    return sol.at(x, buf)[0] * J;
  };
  const decaying = (z: NumOrArray) => {
    if (recollapses) throw new RangeError('growth: the decaying mode is defined by the far future, and this model recollapses');
    if (Number.isNaN(decay1)) decay1 = decayingRaw(0);
    return mapZ(z, (zz) => { stateAtZ(zz); return decayingRaw(-Math.log1p(zz)) / decay1; });
  };
  const warningsFor = (z: NumOrArray): KernelWarning[] => {
    let zMax = -1;
    if (typeof z === 'number') zMax = z;
    else for (let i = 0; i < z.length; i++) if (z[i] > zMax) zMax = z[i];
    const extra = growthCautions(bg, zMax).filter((w) => w.code === 'growth_radiation_era');
    return [...warnings, ...extra];
  };
  return { D, f, fSigma8, decaying, warningsFor, aRange: [aInit, aEnd], warnings, solution: sol };
}
