/**
 * Builds a model's Background (background.ts) from its resolved parameters: cold matter, photons,
 * neutrinos (massless and massive), dark energy (Λ, constant w, CPL w0–wa or a custom w(a)), extra
 * fluids, curvature from the sum rule. Also holds the massive-neutrino energy integral, tabulated
 * once per process.
 *
 * Building is cheap (a few microseconds): nothing is integrated until a call needs it.
 */
import type { Background, Component, ComponentKind } from './background';
import { K_B_EV, NU_PER_PHOTON, N_NU_SPECIES, TNU_PER_TCMB, ZETA3, photonDensity } from './constants';
import { compileFormula, tabulated } from './formula';
import { KernelParamError, type FunctionSpec, type ResolvedParams, type TableSpec } from './params';
import { gaussLegendre } from './quadrature';
import { SETTINGS } from './settings';

// ---------------------------------------------------------------------------------------------
// Massive neutrinos: the Fermi–Dirac energy integral
// ---------------------------------------------------------------------------------------------

/** I(0) = ∫₀^∞ x³/(eˣ+1) dx = 7π⁴/120 (Fermi–Dirac integral; e.g. Gradshteyn & Ryzhik 3.411.3). */
const I0 = (7 * Math.PI ** 4) / 120;

interface NuTable { y: Float64Array; f: Float64Array; df: Float64Array; d2f: Float64Array; step1: number; split: number; n1: number; step2: number }
let nuTable: NuTable | null = null;
let nuNodes: { x2: Float64Array; wOcc: Float64Array } | null = null;

/**
 * I(y), dI/dy and d²I/dy² at one y by composite Gauss–Legendre in x = p/(kT) on graded panels; the
 * nodes and Fermi–Dirac weights do not depend on y, so they are computed once.
 */
function nuIntegralDirect(y: number): [number, number, number] {
  if (!nuNodes) {
    const rule = gaussLegendre(SETTINGS.nuQuadOrder);
    const np = SETTINGS.nuQuadPanels, xMax = SETTINGS.nuQuadXMax, m = rule.x.length;
    const x2 = new Float64Array(np * m), wOcc = new Float64Array(np * m);
    for (let k = 0; k < np; k++) {
      // Quadratic grading puts short panels near x = 0, where sqrt(x² + y²) bends on the scale y.
      const lo = xMax * (k / np) ** 2, hi = xMax * ((k + 1) / np) ** 2;
      const c = 0.5 * (lo + hi), h = 0.5 * (hi - lo);
      for (let i = 0; i < m; i++) {
        const x = c + h * rule.x[i];
        x2[k * m + i] = x * x;
        wOcc[k * m + i] = (rule.w[i] * h * x * x) / (Math.exp(x) + 1);
      }
    }
    nuNodes = { x2, wOcc };
  }
  const { x2, wOcc } = nuNodes;
  const y2 = y * y;
  let I = 0, dI = 0, d2I = 0;
  for (let j = 0; j < x2.length; j++) {
    const r2 = x2[j] + y2, r = Math.sqrt(r2), w = wOcc[j];
    I += w * r;
    dI += (w * y) / r;
    d2I += (w * x2[j]) / (r2 * r);
  }
  return [I, dI, d2I];
}

/**
 * Large-y expansion of I(y) = ∫ x² √(x²+y²)/(eˣ+1) dx: expanding the root in x²/y² and using
 * ∫ x^n/(eˣ+1) dx = (1 − 2^(−n)) n! ζ(n+1) (standard Fermi–Dirac moments). Terms to (x/y)^8; the
 * first omitted one is ~1e-12 relative at y = 80.
 */
const ZETA5 = 1.0369277551433699, ZETA7 = 1.0083492773819228, ZETA9 = 1.0020083928260822, ZETA11 = 1.0004941886041195;
const AS = [1.5 * ZETA3, 11.25 * ZETA5, -88.59375 * ZETA7, 2510.15625 * ZETA9, -(5 / 128) * (1023 / 1024) * 3628800 * ZETA11];
function nuIntegralAsymptotic(y: number): [number, number, number] {
  const u = 1 / (y * y);
  const I = y * (AS[0] + u * (AS[1] + u * (AS[2] + u * (AS[3] + u * AS[4]))));
  // d/dy [y Σ A_k y^(−2k)] = Σ (1 − 2k) A_k y^(−2k)
  const dI = AS[0] + u * (-AS[1] + u * (-3 * AS[2] + u * (-5 * AS[3] + u * (-7 * AS[4]))));
  const d2I = (u / y) * (2 * AS[1] + u * (12 * AS[2] + u * (30 * AS[3] + u * (56 * AS[4]))));
  return [I, dI, d2I];
}

function buildNuTable(): NuTable {
  const step1 = 1 / SETTINGS.nuTablePerUnit, split = 2, step2 = 8 / SETTINGS.nuTablePerUnit;
  const n1 = Math.round(split / step1);
  const n2 = Math.round((SETTINGS.nuTableYMax - split) / step2);
  const n = n1 + n2 + 1;
  const y = new Float64Array(n), f = new Float64Array(n), df = new Float64Array(n), d2f = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const yi = i <= n1 ? i * step1 : split + (i - n1) * step2;
    const [I, dI, d2I] = nuIntegralDirect(yi);
    y[i] = yi; f[i] = I / I0; df[i] = dI / I0; d2f[i] = d2I / I0;
  }
  return { y, f, df, d2f, step1, split, n1, step2 };
}

/**
 * Energy density of one massive neutrino species relative to the same species massless,
 * F(y) = I(y)/I(0) with I(y) = ∫₀^∞ x² √(x² + y²)/(eˣ + 1) dx and y = m c² a/(k T_ν,0)
 * (relativistic Fermi–Dirac gas; e.g. Lesgourgues & Pastor 2006, Phys. Rep. 429, 307, eq. 12).
 * Writes F and dF/dy into out[0], out[1]. Tabulated once per process (quintic Hermite with exact
 * first and second derivatives; ~1e-11 relative), asymptotic series above y = 80.
 */
export function nuEnergyRatio(y: number, out: Float64Array): void {
  if (y >= SETTINGS.nuTableYMax) {
    const [I, dI] = nuIntegralAsymptotic(y);
    out[0] = I / I0; out[1] = dI / I0;
    return;
  }
  const t = nuTable ?? (nuTable = buildNuTable());
  let i: number, h: number;
  if (y < t.split) { i = Math.floor(y / t.step1); h = t.step1; }
  else { i = t.n1 + Math.floor((y - t.split) / t.step2); h = t.step2; }
  if (i >= t.y.length - 1) i = t.y.length - 2;
  const s = (y - t.y[i]) / h;
  hermite5(s, h, t.f[i], t.df[i], t.d2f[i], t.f[i + 1], t.df[i + 1], t.d2f[i + 1], out);
}

/**
 * Quintic Hermite interpolation on [x0, x0 + h] at x = x0 + s h from values, first and second
 * derivatives at both ends; writes the value and the first derivative into out[0], out[1].
 */
export function hermite5(s: number, h: number, y0: number, d0: number, c0: number, y1: number, d1: number, c1: number, out: Float64Array): void {
  const s2 = s * s, s3 = s2 * s, s4 = s3 * s, s5 = s4 * s;
  const h2 = h * h;
  const H0 = 1 - 10 * s3 + 15 * s4 - 6 * s5, H1 = s - 6 * s3 + 8 * s4 - 3 * s5, H2 = 0.5 * (s2 - 3 * s3 + 3 * s4 - s5);
  const G0 = 10 * s3 - 15 * s4 + 6 * s5, G1 = -4 * s3 + 7 * s4 - 3 * s5, G2 = 0.5 * (s3 - 2 * s4 + s5);
  out[0] = H0 * y0 + h * H1 * d0 + h2 * H2 * c0 + G0 * y1 + h * G1 * d1 + h2 * G2 * c1;
  const dH0 = -30 * s2 + 60 * s3 - 30 * s4, dH1 = 1 - 18 * s2 + 32 * s3 - 15 * s4, dH2 = 0.5 * (2 * s - 9 * s2 + 12 * s3 - 5 * s4);
  const dG0 = 30 * s2 - 60 * s3 + 30 * s4, dG1 = -12 * s2 + 28 * s3 - 15 * s4, dG2 = 0.5 * (3 * s2 - 8 * s3 + 5 * s4);
  out[1] = (dH0 * y0 + dG0 * y1) / h + dH1 * d0 + dG1 * d1 + h * (dH2 * c0 + dG2 * c1);
}

/** Direct (untabulated) F(y) = I(y)/I(0), for tests of the table. */
export function nuEnergyRatioDirect(y: number): number {
  return (y >= SETTINGS.nuTableYMax ? nuIntegralAsymptotic(y)[0] : nuIntegralDirect(y)[0]) / I0;
}

/**
 * Fitting form of F(y): (1 + (k y)^p)^(1/p) with p = 1.83, k = 0.3173 (Komatsu et al. 2011,
 * ApJS 192, 18, eq. 26; the same constants as astropy's nu_relative_density). d ln F / d ln y =
 * (ky)^p / (1 + (ky)^p).
 */
export const KOMATSU_P = 1.83;
export const KOMATSU_K = 0.3173;
const KOMATSU_INVP = 0.54644808743; // astropy's rounded 1/p, kept so results match to ~1e-12

// ---------------------------------------------------------------------------------------------
// The model background
// ---------------------------------------------------------------------------------------------

/** The Background plus what the core needs to know about the parameters. */
export interface ModelBackground extends Background {
  /** Photons today, Ω_γ,0 (from T_CMB). */
  readonly omegaPhotons0: number;
  /** All neutrinos today, Ω_ν,0 (massless and massive). */
  readonly omegaNeutrinos0: number;
  /** Cold matter today (CDM + baryons). */
  readonly omegaMatter0: number;
  /** Dark energy today. */
  readonly omegaDE0: number;
  /** T_CMB today, K. */
  readonly Tcmb0: number;
  /** Whether some neutrino species is massive. */
  readonly hasMassiveNu: boolean;
  /** True when every density is analytic in a (no formula or table): integrals may use wide panels. */
  readonly analytic: boolean;
  /**
   * Spread of the equations of state present, max w − min w over components and curvature (w = −1/3),
   * sampled over a ∈ [1e-8, 4]. Two components with w_i, w_j put a complex zero of E² at
   * Im ln a = π/(3|w_i − w_j|): the integrators size their panels from it.
   */
  readonly wSpread: number;
  /** E² > 0 for every a (analytic laws, all densities ≥ 0, Ω_k ≥ 0): no bounce or turnaround can exist. */
  readonly alwaysExpanding: boolean;
  /** Density of one named component at a (ρ_i/ρ_crit,0); 0 for an absent standard one; throws on an unknown name. */
  componentDensity(name: string, a: number): number;
}

const LN_TABLE_STEP = 1 / 64;
const GL4 = gaussLegendre(4);

/**
 * A custom w(a) tabulated lazily in ln a with step 1/64, growing as calls reach further:
 *   ln ρ(a)/ρ(1) = −3 ∫_0^{ln a} (1 + w) d ln a'   (continuity equation),
 * read back by cubic Hermite with the exact slope −3(1+w) at the nodes (~1e-10 relative); w itself is
 * read back by Catmull–Rom interpolation of the node values (~1e-9 for smooth w), so that E², ä/a and
 * everything built on them never call the (mathjs) formula after the table exists.
 */
class WTable {
  private kLo = 0;
  private kHi = 0;
  /** L[k − kLo] = ln ρ(a_k)/ρ(1); S[k − kLo] = d L/d ln a = −3(1 + w(a_k)). */
  private L = new Float64Array([0]);
  private S: Float64Array;
  private readonly wfn: (a: number) => number;

  constructor(wfn: (a: number) => number) {
    this.wfn = wfn;
    this.S = new Float64Array([-3 * (1 + wfn(1))]);
  }

  private cell(x0: number, x1: number): number {
    const rule = GL4, c = 0.5 * (x0 + x1), h = 0.5 * (x1 - x0);
    let s = 0;
    for (let i = 0; i < 4; i++) s += rule.w[i] * (1 + this.wfn(Math.exp(c + h * rule.x[i])));
    return -3 * h * s;
  }

  /** Makes nodes kFrom…kTo exist (both ends inclusive). */
  private ensure(kFrom: number, kTo: number): void {
    if (kFrom >= this.kLo && kTo <= this.kHi) return;
    const lo = Math.min(this.kLo, kFrom - 64), hi = Math.max(this.kHi, kTo + 64);
    const n = hi - lo + 1, L = new Float64Array(n), S = new Float64Array(n);
    const off = this.kLo - lo;
    L.set(this.L, off); S.set(this.S, off);
    const h = LN_TABLE_STEP;
    for (let k = this.kHi + 1; k <= hi; k++) {
      L[k - lo] = L[k - 1 - lo] + this.cell((k - 1) * h, k * h);
      S[k - lo] = -3 * (1 + this.wfn(Math.exp(k * h)));
    }
    for (let k = this.kLo - 1; k >= lo; k--) {
      L[k - lo] = L[k + 1 - lo] - this.cell(k * h, (k + 1) * h);
      S[k - lo] = -3 * (1 + this.wfn(Math.exp(k * h)));
    }
    this.L = L; this.S = S; this.kLo = lo; this.kHi = hi;
  }

  /** ρ(a)/ρ(1). */
  rho(a: number): number {
    const u = Math.log(a) / LN_TABLE_STEP, k = Math.floor(u);
    this.ensure(k - 1, k + 2);
    const i = k - this.kLo, h = LN_TABLE_STEP, s = u - k;
    const s2 = s * s, s3 = s2 * s, L = this.L, S = this.S;
    return Math.exp((2 * s3 - 3 * s2 + 1) * L[i] + (s3 - 2 * s2 + s) * h * S[i] + (-2 * s3 + 3 * s2) * L[i + 1] + (s3 - s2) * h * S[i + 1]);
  }

  /** w(a) from the node values (Catmull–Rom). */
  w(a: number): number {
    const u = Math.log(a) / LN_TABLE_STEP, k = Math.floor(u);
    this.ensure(k - 1, k + 2);
    const i = k - this.kLo, t = u - k, S = this.S;
    const p0 = S[i - 1], p1 = S[i], p2 = S[i + 1], p3 = S[i + 2];
    const v = p1 + 0.5 * t * (p2 - p0 + t * (2 * p0 - 5 * p1 + 4 * p2 - p3 + t * (3 * (p1 - p2) + p3 - p0)));
    return -1 - v / 3;
  }
}

function densityFromW(wfn: (a: number) => number): { rho: (a: number) => number; w: (a: number) => number } {
  const t = new WTable(wfn);
  return { rho: (a) => t.rho(a), w: (a) => t.w(a) };
}

/** A function of a from a table in a or z (clamped at the ends for w; as the table says otherwise). */
function tableFunction(t: TableSpec, name: string, clamp: boolean): (a: number) => number {
  const outside = clamp ? 'clamp' : 'error';
  if (t.a) return tabulated(t.a, t.values, name, outside);
  const z = t.z as readonly number[];
  const aAxis = z.map((zi) => 1 / (1 + zi)).reverse();
  return tabulated(aAxis, [...t.values].reverse(), name, outside);
}

function functionOfA(spec: FunctionSpec, name: string, clamp: boolean): (a: number) => number {
  if (typeof spec === 'number') return () => spec;
  if (typeof spec === 'string') {
    try {
      return compileFormula(spec, name);
    } catch (e) {
      throw new KernelParamError(name, (e as Error).message);
    }
  }
  return tableFunction(spec, name, clamp);
}

/** w(a) = −1 − (1/3) d ln ρ / d ln a by a five-point central difference in ln a (step 1e-3). */
function wFromDensity(rho: (a: number) => number): (a: number) => number {
  const h = 1e-3;
  return (a: number) => {
    const x = Math.log(a);
    const f = (d: number) => Math.log(rho(Math.exp(x + d)));
    const slope = (f(-2 * h) - 8 * f(-h) + 8 * f(h) - f(2 * h)) / (12 * h);
    return -1 - slope / 3;
  };
}

function makeComponent(name: string, kind: ComponentKind, omega0: number, density: (a: number) => number, w: (a: number) => number): Component {
  return Object.freeze({ name, kind, omega0, density, w });
}

type Law = { rho: (a: number) => number; w: (a: number) => number; analytic: boolean };
type FluidLaw = Law & { omega: number; name: string };

// Local copies: imported bindings are getters after transpilation, too slow for the inner loops.
const KP = KOMATSU_P, KK = KOMATSU_K, KINV = KOMATSU_INVP;
const NO_NU = new Float64Array(0);

/**
 * The model background as a class, so that building one allocates no closures for the common
 * (analytic) models: a sweep builds thousands. Components are materialised on first access.
 */
class FlrwBackground implements ModelBackground {
  readonly H0: number;
  readonly omegaK: number;
  readonly omegaPhotons0: number;
  readonly omegaNeutrinos0: number;
  readonly omegaMatter0: number;
  readonly omegaDE0: number;
  readonly Tcmb0: number;
  readonly hasMassiveNu: boolean;
  readonly analytic: boolean;
  readonly alwaysExpanding: boolean;
  readonly wSpread: number;
  private readonly orad: number;
  private readonly cnu: number;
  private readonly nMassive: number;
  private readonly nMassless: number;
  private readonly nuY: Float64Array;
  private readonly fitting: boolean;
  private readonly deMode: 0 | 1 | 2 | 3;
  private readonly dePow: number;
  private readonly wa3: number;
  private readonly w0: number;
  private readonly wa: number;
  private readonly deLaw: Law | null;
  private readonly fluids: FluidLaw[];
  private readonly tmp: Float64Array;
  private nuSum = 0;
  private nuSlope = 0;
  private comps: readonly Component[] | null = null;

  constructor(p: ResolvedParams) {
    this.H0 = p.H0;
    this.Tcmb0 = p.Tcmb;
    const omegaG = p.Tcmb > 0 ? photonDensity(p.Tcmb, p.H0) : 0;
    // Per-species neutrino density when massless (each of three takes N_eff/3).
    this.cnu = p.Tcmb > 0 ? (omegaG * NU_PER_PHOTON * p.Neff) / N_NU_SPECIES : 0;
    this.nMassive = p.mNu.length;
    this.nMassless = N_NU_SPECIES - this.nMassive;
    const Tnu0 = p.Tcmb * TNU_PER_TCMB;
    this.nuY = this.nMassive > 0 ? Float64Array.from(p.mNu, (m) => m / (K_B_EV * Tnu0)) : NO_NU;
    this.fitting = p.neutrinoModel === 'fitting';
    this.tmp = this.nMassive > 0 && !this.fitting ? new Float64Array(2) : NO_NU;
    this.hasMassiveNu = this.nMassive > 0;
    this.nuEval(1);
    const omegaNu = this.cnu * (this.nMassless + this.nuSum);
    this.orad = omegaG + this.cnu * this.nMassless; // pure a⁻⁴ part
    this.omegaPhotons0 = omegaG;
    this.omegaNeutrinos0 = omegaNu;
    this.omegaMatter0 = p.omegaM;
    this.w0 = p.w0; this.wa = p.wa;

    // Dark-energy density law (relative to today) and w(a).
    this.deLaw = null;
    if (p.w !== null) {
      const t = densityFromW(functionOfA(p.w, 'w', true));
      this.deLaw = { rho: t.rho, w: t.w, analytic: false };
      this.deMode = 3;
    } else if (p.wa !== 0) this.deMode = 2; // CPL: ρ/ρ0 = a^(−3(1+w0+wa)) exp(−3 wa (1 − a)) (Linder 2003, PRL 90, 091301)
    else if (p.w0 !== -1) this.deMode = 1; // ρ/ρ0 = a^(−3(1+w))
    else this.deMode = 0; // Λ
    this.dePow = this.deMode === 1 ? -3 * (1 + p.w0) : this.deMode === 2 ? -3 * (1 + p.w0 + p.wa) : 0;
    this.wa3 = -3 * p.wa;

    this.fluids = p.fluids.map((f, i) => fluidLaw(f, i));
    const omegaFluids = this.fluids.reduce((acc, f) => acc + f.omega, 0);

    let omegaK: number, omegaDE: number;
    const rest = p.omegaM + omegaG + omegaNu + omegaFluids;
    if (p.omegaDE !== null) { omegaDE = p.omegaDE; omegaK = 1 - rest - omegaDE; }
    else if (p.omegaK !== null) { omegaK = p.omegaK; omegaDE = 1 - rest - omegaK; }
    else { omegaK = 0; omegaDE = 1 - rest; }
    // Rounding noise of the sum rule is not curvature.
    if (Math.abs(omegaK) < 1e-15) omegaK = 0;
    this.omegaK = omegaK;
    this.omegaDE0 = omegaDE;
    this.analytic = this.deMode !== 3 && this.fluids.every((f) => f.analytic);
    // Every density positive for all a and Ω_k ≥ 0: E² > 0 everywhere (no bounce or turnaround).
    this.alwaysExpanding = this.analytic && omegaK >= 0 && omegaDE >= 0 && p.omegaM >= 0 && this.fluids.every((f) => f.omega >= 0);
    // w of what is present: matter 0, radiation 1/3, curvature −1/3, dark energy and fluids sampled.
    let wMin = p.omegaM !== 0 ? 0 : Infinity, wMax = p.omegaM !== 0 ? 0 : -Infinity;
    const see = (w: number) => { if (Number.isFinite(w)) { if (w < wMin) wMin = w; if (w > wMax) wMax = w; } };
    if (this.orad > 0 || this.nMassive > 0) { see(1 / 3); if (this.nMassive > 0) see(0); }
    if (omegaK !== 0) see(-1 / 3);
    const samples = [1e-8, 1e-3, 0.1, 0.5, 1, 2, 4];
    if (omegaDE !== 0) {
      if (this.deMode <= 1) see(this.deW(1));
      else for (const a of samples) see(this.deW(a));
    }
    for (const f of this.fluids) for (const a of f.analytic ? [1] : samples) see(f.w(a));
    this.wSpread = wMax > wMin ? wMax - wMin : 0;
  }

  /** Σ over massive species of F(y_i a) → nuSum and of y dF/dy → nuSlope. */
  private nuEval(a: number): void {
    let sum = 0, slope = 0;
    const n = this.nMassive, ys = this.nuY;
    if (this.fitting) {
      for (let i = 0; i < n; i++) {
        const t = Math.pow(KK * ys[i] * a, KP);
        const F = Math.pow(1 + t, KINV);
        sum += F; slope += (F * t) / (1 + t);
      }
    } else {
      const tmp = this.tmp;
      for (let i = 0; i < n; i++) {
        const y = ys[i] * a;
        nuEnergyRatio(y, tmp);
        sum += tmp[0]; slope += tmp[1] * y;
      }
    }
    this.nuSum = sum; this.nuSlope = slope;
  }

  /** ρ_DE(a)/ρ_crit,0. */
  deDensity(a: number): number {
    const ode = this.omegaDE0;
    if (ode === 0) return 0;
    switch (this.deMode) {
      case 0: return ode;
      case 1: return ode * Math.pow(a, this.dePow);
      case 2: return ode * Math.pow(a, this.dePow) * Math.exp(this.wa3 * (1 - a));
      default: return ode * (this.deLaw as Law).rho(a);
    }
  }

  /** w_DE(a). */
  deW(a: number): number {
    switch (this.deMode) {
      case 0: return -1;
      case 1: return this.w0;
      case 2: return this.w0 + this.wa * (1 - a);
      default: return (this.deLaw as Law).w(a);
    }
  }

  /** ρ_ν(a)/ρ_crit,0, massless and massive species. */
  nuDensity(a: number): number {
    if (this.cnu === 0) return 0;
    let s = this.nMassless;
    if (this.nMassive > 0) { this.nuEval(a); s += this.nuSum; }
    const ia2 = 1 / (a * a);
    return this.cnu * s * ia2 * ia2;
  }

  /** w_ν(a) = (1/3)(1 − Σ y F′ / Σ F), massless species having F = 1 (from ρ ∝ a⁻⁴ F(y a)). */
  nuW(a: number): number {
    if (this.nMassive === 0) return 1 / 3;
    this.nuEval(a);
    return (1 / 3) * (1 - this.nuSlope / (this.nMassless + this.nuSum));
  }

  /** E²(a) = Σ ρ_i(a)/ρ_crit,0 + Ω_k a⁻² (Friedmann equation). */
  E2(a: number): number {
    const ia = 1 / a, ia2 = ia * ia;
    let s = ia2 * (ia2 * this.orad + ia * this.omegaMatter0 + this.omegaK) + this.deDensity(a);
    if (this.nMassive > 0) { this.nuEval(a); s += this.cnu * this.nuSum * ia2 * ia2; }
    const fl = this.fluids;
    for (let i = 0; i < fl.length; i++) s += fl[i].omega * fl[i].rho(a);
    return s;
  }

  /** (ä/a)/H0² = −½ Σ ρ_i (1 + 3w_i) (Raychaudhuri equation for a perfect-fluid FLRW model). */
  accel(a: number): number {
    const ia = 1 / a, ia2 = ia * ia;
    let s = -ia2 * (ia2 * this.orad + 0.5 * ia * this.omegaMatter0);
    if (this.omegaDE0 !== 0) s -= 0.5 * this.deDensity(a) * (1 + 3 * this.deW(a));
    if (this.nMassive > 0) {
      this.nuEval(a);
      // 1 + 3w_ν = 2 − d ln F/d ln y per massive species.
      s -= 0.5 * this.cnu * ia2 * ia2 * (2 * this.nuSum - this.nuSlope);
    }
    const fl = this.fluids;
    for (let i = 0; i < fl.length; i++) s -= 0.5 * fl[i].omega * fl[i].rho(a) * (1 + 3 * fl[i].w(a));
    return s;
  }

  get components(): readonly Component[] {
    if (this.comps) return this.comps;
    const list: Component[] = [];
    const om = this.omegaMatter0, og = this.omegaPhotons0;
    list.push(makeComponent('matter', 'matter', om, (a) => om / (a * a * a), () => 0));
    if (og > 0) list.push(makeComponent('photons', 'photons', og, (a) => og / (a * a * a * a), () => 1 / 3));
    if (this.omegaNeutrinos0 > 0) list.push(makeComponent('neutrinos', 'neutrinos', this.omegaNeutrinos0, (a) => this.nuDensity(a), (a) => this.nuW(a)));
    if (this.omegaDE0 !== 0) list.push(makeComponent('darkEnergy', 'darkEnergy', this.omegaDE0, (a) => this.deDensity(a), (a) => this.deW(a)));
    for (const f of this.fluids) {
      const o = f.omega, r = f.rho;
      list.push(makeComponent(f.name, 'fluid', o, (a) => o * r(a), f.w));
    }
    this.comps = Object.freeze(list);
    return this.comps;
  }

  componentDensity(name: string, a: number): number {
    switch (name) {
      case 'matter': return this.omegaMatter0 / (a * a * a);
      case 'photons': return this.omegaPhotons0 / (a * a * a * a);
      case 'neutrinos': return this.nuDensity(a);
      case 'darkEnergy': return this.deDensity(a);
    }
    const f = this.fluids.find((fl) => fl.name === name);
    if (!f) throw new Error(`unknown component '${name}' (this model has matter, photons, neutrinos, darkEnergy${this.fluids.map((fl) => ', ' + fl.name).join('')})`);
    return f.omega * f.rho(a);
  }
}

function fluidLaw(f: ResolvedParams['fluids'][number], i: number): FluidLaw {
  const base = `fluids[${i}]`;
  if (f.density !== null) {
    const raw = typeof f.density === 'string' ? functionOfA(f.density, `${base}.density`, false) : tableFunction(f.density, `${base}.density`, false);
    const r1 = raw(1);
    if (!(r1 > 0)) throw new KernelParamError(`${base}.density`, `must be > 0 at a = 1 (got ${r1}); it is normalised to ρ(a)/ρ(1)`);
    const rho = (a: number) => raw(a) / r1;
    return { omega: f.omega, name: f.name, rho, w: wFromDensity(rho), analytic: false };
  }
  const spec = f.w ?? 0;
  if (typeof spec === 'number') {
    const pw = -3 * (1 + spec);
    return { omega: f.omega, name: f.name, rho: (a: number) => Math.pow(a, pw), w: () => spec, analytic: true };
  }
  const t = densityFromW(functionOfA(spec, `${base}.w`, true));
  return { omega: f.omega, name: f.name, rho: t.rho, w: t.w, analytic: false };
}

/**
 * Builds the Background for resolved parameters. Sum rule (Friedmann equation at a = 1):
 * Ω_k = 1 − Ω_m − Ω_γ − Ω_ν − Ω_DE − Σ Ω_fluid, or Ω_DE from it when Ω_k is given.
 * Neutrinos follow astropy's convention (and CLASS's with T_ν = (4/11)^(1/3) T_CMB): each of three
 * species carries N_eff/3 of (7/8)(4/11)^(4/3) Ω_γ when massless, times F(m a/(k T_ν,0)) when massive.
 */
export function buildBackground(p: ResolvedParams): ModelBackground {
  return new FlrwBackground(p);
}
