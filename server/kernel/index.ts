/**
 * Comoving's cosmology kernel: `universe(params)` builds an immutable model; every method takes a
 * redshift (number, number[] or Float64Array) and returns a number or a Float64Array.
 *
 * Units: H in km/s/Mpc, distances in Mpc (not Mpc/h; see `toMpcPerH`), times in Gyr, volumes in Mpc³,
 * temperatures in K. Distances follow Hogg 1999 (astro-ph/9905116); the background is the
 * Friedmann equation for the model's components (components.ts).
 */
import { buildBackground, type ModelBackground } from './components';
import { C_KM_S, MPC_KM, RAD_PER_ARCSEC, TNU_PER_TCMB, criticalDensity, hubbleDistanceMpc, hubbleTimeGyr } from './constants';
import { Integrals, UnreachableRedshiftError, invertCells } from './distances';
import { KernelParamError, resolveParams, type ResolvedParams, type UniverseParams } from './params';
import { SETTINGS } from './settings';
import { solveGrowth, type GrowthNormalization, type GrowthSolution } from './growth';
import { pastLimit, solveHistory, type History, type PastLimit } from './history';
import { accelerationOnsetRedshift, raychaudhuriResidual, singularityStatement, type RaychaudhuriReport, type SingularityStatement } from './raychaudhuri';
import { energyConditions, type EnergyConditionsReport } from './energy-conditions';
import { equalityRedshift } from './thermal';
import { skyIntensity, type Emissivity, type SkyIntensity } from './light';
import { chi2, type Chi2Result, type MeasurementTable, type ObservableKind } from './likelihood';
import { bounceCaution, fittingFormCaution, growthCautions, type KernelWarning } from './cautions';

export { KernelParamError, UnreachableRedshiftError };
export { cmbTemperature, neutrinoTemperature, gStar, timeAtTemperature } from './thermal';
export { euclideanSkyIntensity } from './light';
export { compileFormula, FormulaError } from './formula';
export { SETTINGS } from './settings';
export * as constants from './constants';
export type { KernelWarning, History, PastLimit, GrowthNormalization, EnergyConditionsReport, RaychaudhuriReport,
  SingularityStatement, Emissivity, SkyIntensity, MeasurementTable, ObservableKind, Chi2Result };
export type { UniverseParams, ResolvedParams };
export type { Background, Component, ComponentKind } from './background';

/** Version of the kernel's numerical results; recorded with every run. Bump when results change. */
export const KERNEL_VERSION = '1.0.0';

/**
 * The model's methods that take redshifts (number | number[] | Float64Array) and return number |
 * Float64Array, for bridges that expose them by name (the sandbox).
 */
export const VECTOR_METHODS = [
  'E', 'H', 'comovingDistance', 'transverseComovingDistance', 'angularDiameterDistance', 'luminosityDistance',
  'distanceModulus', 'lookbackTime', 'age', 'conformalTime', 'particleHorizon', 'comovingVolume',
  'differentialComovingVolume', 'properSizePerArcsec', 'comovingSizePerArcsec', 'omegaMatter', 'omegaPhotons',
  'omegaNeutrinos', 'omegaDarkEnergy', 'omegaCurvature', 'Tcmb', 'Tnu', 'decelerationParameter', 'growthRate',
  'decayingMode',
] as const;
/** Inverse methods: a distance (Mpc) or time (Gyr), number or array, to redshift. */
export const INVERSE_METHODS = ['redshiftAtComovingDistance', 'redshiftAtLuminosityDistance', 'redshiftAtAge', 'redshiftAtLookbackTime'] as const;

/** A redshift or many: number, number[] or Float64Array. */
export type ZInput = number | readonly number[] | Float64Array;
/** A number for a number, a Float64Array for an array. */
export type ZOutput<T extends ZInput> = T extends number ? number : Float64Array;

/** What toJSON() gives and fromJSON() takes. */
export interface UniverseJSON {
  kind: 'comoving.universe';
  kernelVersion: string;
  params: ResolvedParams;
}

interface Prepared { xs: Float64Array; scalar: boolean; xMin: number; xMax: number }

function prepare(z: ZInput, name = 'z'): Prepared {
  if (typeof z === 'number') {
    if (!Number.isFinite(z)) throw new RangeError(`${name} must be a finite number (got ${z})`);
    if (!(z > -1)) throw new UnreachableRedshiftError(z, `${name} = ${z} is not a redshift: z must be > −1 (a = 1/(1+z) > 0)`);
    const x = -Math.log1p(z);
    return { xs: new Float64Array([x]), scalar: true, xMin: x, xMax: x };
  }
  if (!(z instanceof Float64Array) && !Array.isArray(z)) throw new TypeError(`${name} must be a number or an array of numbers`);
  const n = z.length, xs = new Float64Array(n);
  let xMin = Infinity, xMax = -Infinity;
  for (let i = 0; i < n; i++) {
    const v = z[i];
    if (typeof v !== 'number' || !Number.isFinite(v)) throw new RangeError(`${name}[${i}] must be a finite number (got ${String(v)})`);
    if (!(v > -1)) throw new UnreachableRedshiftError(v, `${name}[${i}] = ${v} is not a redshift: z must be > −1`);
    const x = -Math.log1p(v);
    xs[i] = x;
    if (x < xMin) xMin = x;
    if (x > xMax) xMax = x;
  }
  return { xs, scalar: false, xMin, xMax };
}

function values(v: ZInput, name: string): { v: Float64Array; scalar: boolean } {
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) throw new RangeError(`${name} must be a finite number (got ${v})`);
    return { v: new Float64Array([v]), scalar: true };
  }
  if (!(v instanceof Float64Array) && !Array.isArray(v)) throw new TypeError(`${name} must be a number or an array of numbers`);
  const out = Float64Array.from(v as ArrayLike<number>);
  for (let i = 0; i < out.length; i++) if (!Number.isFinite(out[i])) throw new RangeError(`${name}[${i}] must be a finite number`);
  return { v: out, scalar: false };
}

/** Redshift of ln a. */
function zOfX(x: number): number {
  return Math.expm1(-x);
}

const EMPTY = new Float64Array(0);
const DIRECT_MAX = SETTINGS.directMaxPoints;

function shape(out: Float64Array, scalar: boolean): number | Float64Array {
  return scalar ? out[0] : out;
}

/** A cosmological model: immutable, serialisable; methods are vectorised over redshift. */
export class Universe {
  /** Resolved parameters (defaults filled in). */
  readonly params: ResolvedParams;
  /** The component description every result derives from. */
  readonly background: ModelBackground;
  /** Hubble constant today, km/s/Mpc. */
  readonly H0: number;
  /** Hubble distance c/H0, Mpc (Hogg 1999 eq. 4). */
  readonly hubbleDistance: number;
  /** Hubble time 1/H0, Gyr (Hogg 1999 eq. 3). */
  readonly hubbleTime: number;
  /** Curvature today Ω_k,0. */
  readonly omegaK0: number;
  private readonly sqrtOk: number;
  private integ: Integrals | null = null;

  /** Use `universe(params)`. */
  constructor(params: ResolvedParams) {
    this.params = params;
    this.background = buildBackground(params);
    this.H0 = params.H0;
    this.hubbleDistance = hubbleDistanceMpc(params.H0);
    this.hubbleTime = hubbleTimeGyr(params.H0);
    this.omegaK0 = this.background.omegaK;
    this.sqrtOk = Math.sqrt(Math.abs(this.omegaK0));
    deepFreeze(this.params);
  }

  private get I(): Integrals {
    return this.integ ?? (this.integ = new Integrals(this.background));
  }

  // ---------------------------------------------------------------------------------------------
  // Integrals from today and from the past, direct or from the grid
  // ---------------------------------------------------------------------------------------------

  /** [∫_0^x dx/E, ∫_0^x dx/(aE)] (1/H0 and c/H0 units, signed) at the prepared points. */
  private fromToday(p: Prepared, want1: boolean, want2: boolean): [Float64Array, Float64Array] {
    const I = this.I, n = p.xs.length;
    I.checkReachable(p.xMin, p.xMax, zOfX);
    const o1 = want1 ? new Float64Array(n) : EMPTY, o2 = want2 ? new Float64Array(n) : EMPTY;
    if (n === 0) return [o1, o2];
    if ((n <= DIRECT_MAX && !I.hasGrid(p.xMin, p.xMax)) || I.nearBoundary(p.xMin, p.xMax)) {
      I.directFromToday(p.xs, want1 ? o1 : null, want2 ? o2 : null);
    } else {
      const g = I.gridCovering(p.xMin, p.xMax);
      if (want1) g.interp(p.xs, g.c1, g.g1, g.d1, o1);
      if (want2) g.interp(p.xs, g.c2, g.g2, g.d2, o2);
    }
    return [o1, o2];
  }

  /** [time, conformal time] since the bang or bounce at the prepared points (1/H0 units). */
  private fromPast(p: Prepared, want1: boolean, want2: boolean): [Float64Array, Float64Array] {
    const I = this.I, n = p.xs.length;
    I.checkReachable(p.xMin, p.xMax, zOfX);
    const o1 = want1 ? new Float64Array(n) : EMPTY, o2 = want2 ? new Float64Array(n) : EMPTY;
    if (n === 0) return [o1, o2];
    I.scanPast(-Infinity);
    const floor = SETTINGS.pastLnA;
    const inf = I.infinitePast();
    // An eternal past (infinite age or conformal time) is handled by the direct path, which keeps the Infinity.
    const infinite = (want1 && inf.t) || (want2 && inf.eta);
    if (infinite || (n <= DIRECT_MAX && !I.hasGrid(p.xMin, p.xMax)) || I.nearBoundary(p.xMin, p.xMax) || p.xMin < floor) {
      I.directFromPast(p.xs, want1 ? o1 : null, want2 ? o2 : null);
    } else {
      const g = I.gridCovering(p.xMin, p.xMax);
      const [p1, p2] = g.pastArrays();
      if (want1) g.interp(p.xs, p1, g.g1, g.d1, o1);
      if (want2) g.interp(p.xs, p2, g.g2, g.d2, o2);
    }
    return [o1, o2];
  }

  /** Line-of-sight comoving distance in units of c/H0 at the prepared points. */
  private chi(p: Prepared): Float64Array {
    const c2 = this.fromToday(p, false, true)[1];
    for (let i = 0; i < c2.length; i++) c2[i] = -c2[i];
    return c2;
  }

  /** S_k(χ) in units of c/H0 (Hogg 1999 eq. 16). */
  private sk(chi: number): number {
    const ok = this.omegaK0;
    if (ok === 0) return chi;
    const s = this.sqrtOk;
    return ok > 0 ? Math.sinh(s * chi) / s : Math.sin(s * chi) / s;
  }

  /** In place: χ → S_k(χ) · factor_i (factor from the ln a of each point: e^{px}). */
  private skScaled(chi: Float64Array, xs: Float64Array, power: number, scale: number): void {
    const ok = this.omegaK0, s = this.sqrtOk, n = chi.length;
    if (ok === 0) {
      if (power === 0) for (let i = 0; i < n; i++) chi[i] *= scale;
      else for (let i = 0; i < n; i++) chi[i] *= scale * Math.exp(power * xs[i]);
    } else if (ok > 0) {
      for (let i = 0; i < n; i++) chi[i] = (scale * Math.sinh(s * chi[i]) * (power === 0 ? 1 : Math.exp(power * xs[i]))) / s;
    } else {
      for (let i = 0; i < n; i++) chi[i] = (scale * Math.sin(s * chi[i]) * (power === 0 ? 1 : Math.exp(power * xs[i]))) / s;
    }
  }

  // ---------------------------------------------------------------------------------------------
  // Expansion rate and densities
  // ---------------------------------------------------------------------------------------------

  /** E(z) = H(z)/H0, dimensionless (Friedmann equation; Hogg 1999 eq. 14 generalised to the model's components). */
  E<T extends ZInput>(z: T): ZOutput<T> {
    const p = prepare(z);
    const out = new Float64Array(p.xs.length), bg = this.background;
    this.I.checkReachable(p.xMin, p.xMax, zOfX);
    for (let i = 0; i < out.length; i++) out[i] = Math.sqrt(bg.E2(Math.exp(p.xs[i])));
    return shape(out, p.scalar) as ZOutput<T>;
  }

  /** H(z) = H0 E(z), km/s/Mpc. */
  H<T extends ZInput>(z: T): ZOutput<T> {
    const e = this.E(z as ZInput);
    if (typeof e === 'number') return (e * this.H0) as ZOutput<T>;
    for (let i = 0; i < e.length; i++) e[i] *= this.H0;
    return e as ZOutput<T>;
  }

  private densityRatio(z: ZInput, rho: (a: number) => number): number | Float64Array {
    const p = prepare(z);
    this.I.checkReachable(p.xMin, p.xMax, zOfX);
    const out = new Float64Array(p.xs.length), bg = this.background;
    for (let i = 0; i < out.length; i++) {
      const a = Math.exp(p.xs[i]);
      out[i] = rho(a) / bg.E2(a);
    }
    return shape(out, p.scalar);
  }

  /** Ω_m(z) = Ω_m,0 (1+z)³ / E²(z), cold matter (dimensionless; Friedmann equation). */
  omegaMatter<T extends ZInput>(z: T): ZOutput<T> {
    const om = this.background.omegaMatter0;
    return this.densityRatio(z, (a) => om / (a * a * a)) as ZOutput<T>;
  }
  /** Ω_γ(z) = Ω_γ,0 (1+z)⁴ / E²(z) (dimensionless). */
  omegaPhotons<T extends ZInput>(z: T): ZOutput<T> {
    const og = this.background.omegaPhotons0;
    return this.densityRatio(z, (a) => og / (a * a * a * a)) as ZOutput<T>;
  }
  /** Ω_ν(z): all neutrinos, massless and massive (dimensionless). */
  omegaNeutrinos<T extends ZInput>(z: T): ZOutput<T> {
    const bg = this.background;
    return this.densityRatio(z, (a) => bg.componentDensity('neutrinos', a)) as ZOutput<T>;
  }
  /** Ω_DE(z) = ρ_DE(z)/ρ_crit(z) (dimensionless). */
  omegaDarkEnergy<T extends ZInput>(z: T): ZOutput<T> {
    const bg = this.background;
    return this.densityRatio(z, (a) => bg.componentDensity('darkEnergy', a)) as ZOutput<T>;
  }
  /** Ω_k(z) = Ω_k,0 (1+z)² / E²(z) (dimensionless). */
  omegaCurvature<T extends ZInput>(z: T): ZOutput<T> {
    const ok = this.omegaK0;
    return this.densityRatio(z, (a) => ok / (a * a)) as ZOutput<T>;
  }
  /** Ω_i(z) of one named component ('matter', 'photons', 'neutrinos', 'darkEnergy' or a fluid's name). */
  omegaComponent<T extends ZInput>(name: string, z: T): ZOutput<T> {
    const bg = this.background;
    bg.componentDensity(name, 1);
    return this.densityRatio(z, (a) => bg.componentDensity(name, a)) as ZOutput<T>;
  }

  /** CMB temperature T(z) = T0 (1+z), K (adiabatic expansion of black-body radiation). */
  Tcmb<T extends ZInput>(z: T): ZOutput<T> {
    const p = prepare(z), T0 = this.params.Tcmb;
    const out = new Float64Array(p.xs.length);
    for (let i = 0; i < out.length; i++) out[i] = T0 * Math.exp(-p.xs[i]);
    return shape(out, p.scalar) as ZOutput<T>;
  }

  /** Neutrino temperature T_ν(z) = (4/11)^(1/3) T0 (1+z), K (entropy conservation through e± annihilation). */
  Tnu<T extends ZInput>(z: T): ZOutput<T> {
    const t = this.Tcmb(z as ZInput);
    if (typeof t === 'number') return (t * TNU_PER_TCMB) as ZOutput<T>;
    for (let i = 0; i < t.length; i++) t[i] *= TNU_PER_TCMB;
    return t as ZOutput<T>;
  }

  /** Deceleration parameter q(z) = −ä a/ȧ² = −(ä/a)/H² (dimensionless; Raychaudhuri equation via background.accel). */
  decelerationParameter<T extends ZInput>(z: T): ZOutput<T> {
    const bg = this.background;
    return this.densityRatio(z, (a) => -bg.accel(a)) as ZOutput<T>;
  }

  /** Critical density today ρ_crit,0 = 3H0²/(8πG), kg/m³. */
  get criticalDensity0(): number {
    return criticalDensity(this.H0);
  }

  // ---------------------------------------------------------------------------------------------
  // Distances (Hogg 1999)
  // ---------------------------------------------------------------------------------------------

  /** Line-of-sight comoving distance D_C = (c/H0) ∫_0^z dz'/E(z'), Mpc (Hogg 1999 eq. 15). */
  comovingDistance<T extends ZInput>(z: T): ZOutput<T> {
    const p = prepare(z);
    const chi = this.chi(p), dh = this.hubbleDistance;
    for (let i = 0; i < chi.length; i++) chi[i] *= dh;
    return shape(chi, p.scalar) as ZOutput<T>;
  }

  /** Transverse comoving distance D_M = (c/H0) S_k(D_C H0/c), Mpc (Hogg 1999 eq. 16; sinh/sin for open/closed). */
  transverseComovingDistance<T extends ZInput>(z: T): ZOutput<T> {
    const p = prepare(z);
    const chi = this.chi(p);
    this.skScaled(chi, p.xs, 0, this.hubbleDistance);
    return shape(chi, p.scalar) as ZOutput<T>;
  }

  /** Angular-diameter distance D_A = D_M/(1+z), Mpc (Hogg 1999 eq. 18). */
  angularDiameterDistance<T extends ZInput>(z: T): ZOutput<T> {
    const p = prepare(z);
    const chi = this.chi(p);
    this.skScaled(chi, p.xs, 1, this.hubbleDistance);
    return shape(chi, p.scalar) as ZOutput<T>;
  }

  /** Luminosity distance D_L = (1+z) D_M, Mpc (Hogg 1999 eq. 21). */
  luminosityDistance<T extends ZInput>(z: T): ZOutput<T> {
    const p = prepare(z);
    const chi = this.chi(p);
    this.skScaled(chi, p.xs, -1, this.hubbleDistance);
    return shape(chi, p.scalar) as ZOutput<T>;
  }

  /** Distance modulus μ = 5 log10(D_L / 10 pc), mag (Hogg 1999 eq. 25). */
  distanceModulus<T extends ZInput>(z: T): ZOutput<T> {
    const d = this.luminosityDistance(z as ZInput);
    if (typeof d === 'number') return (5 * Math.log10(d) + 25) as ZOutput<T>;
    for (let i = 0; i < d.length; i++) d[i] = 5 * Math.log10(d[i]) + 25;
    return d as ZOutput<T>;
  }

  /**
   * Angular-diameter distance of z2 seen from z1, D_A12 = (c/H0) S_k(χ2 − χ1)/(1+z2), Mpc (Hogg 1999
   * eq. 19 in its form valid for any curvature). z1 and z2: numbers or equal-length arrays (or one a number).
   */
  angularDiameterDistanceBetween(z1: ZInput, z2: ZInput): number | Float64Array {
    const n1 = typeof z1 === 'number' ? 1 : z1.length, n2 = typeof z2 === 'number' ? 1 : z2.length;
    if (typeof z1 !== 'number' && typeof z2 !== 'number' && n1 !== n2) {
      throw new RangeError(`z1 and z2 must have the same length (${n1} vs ${n2}) or one be a number`);
    }
    const n = Math.max(n1, n2);
    const all = new Float64Array(n1 + n2);
    const p1 = prepare(z1, 'z1'), p2 = prepare(z2, 'z2');
    all.set(p1.xs, 0); all.set(p2.xs, n1);
    const p: Prepared = { xs: all, scalar: false, xMin: Math.min(p1.xMin, p2.xMin), xMax: Math.max(p1.xMax, p2.xMax) };
    const chi = this.chi(p), dh = this.hubbleDistance;
    const out = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const i1 = n1 === 1 ? 0 : i, i2 = n2 === 1 ? 0 : i;
      out[i] = dh * this.sk(chi[n1 + i2] - chi[i1]) * Math.exp(p2.xs[i2]);
    }
    return typeof z1 === 'number' && typeof z2 === 'number' ? out[0] : out;
  }

  /** Lookback time t_L = (1/H0) ∫_0^z dz'/((1+z')E(z')), Gyr (Hogg 1999 eq. 30). */
  lookbackTime<T extends ZInput>(z: T): ZOutput<T> {
    const p = prepare(z);
    const o = this.fromToday(p, true, false)[0], th = this.hubbleTime;
    for (let i = 0; i < o.length; i++) o[i] = -o[i] * th;
    return shape(o, p.scalar) as ZOutput<T>;
  }

  /**
   * Age at z: t(z) = (1/H0) ∫_z^∞ dz'/((1+z')E(z')), Gyr (Hogg 1999 eq. 30 with the upper limit at the
   * big bang); for a model that bounced, the time since the bounce; Infinity for an eternal past.
   */
  age<T extends ZInput>(z: T): ZOutput<T> {
    const p = prepare(z);
    const o = this.fromPast(p, true, false)[0], th = this.hubbleTime;
    for (let i = 0; i < o.length; i++) o[i] *= th;
    return shape(o, p.scalar) as ZOutput<T>;
  }

  /** Conformal time η(z) = ∫_0^t dt'/a = (1/H0) ∫_z^∞ dz'/E(z'), Gyr (c = 1; definition of conformal time). */
  conformalTime<T extends ZInput>(z: T): ZOutput<T> {
    const p = prepare(z);
    const o = this.fromPast(p, false, true)[1], th = this.hubbleTime;
    for (let i = 0; i < o.length; i++) o[i] *= th;
    return shape(o, p.scalar) as ZOutput<T>;
  }

  /** Comoving particle horizon c·η(z) = (c/H0) ∫_z^∞ dz'/E(z'), Mpc (e.g. Dodelson, Modern Cosmology eq. 2.45). */
  particleHorizon<T extends ZInput>(z: T): ZOutput<T> {
    const p = prepare(z);
    const o = this.fromPast(p, false, true)[1], dh = this.hubbleDistance;
    for (let i = 0; i < o.length; i++) o[i] *= dh;
    return shape(o, p.scalar) as ZOutput<T>;
  }

  /**
   * Comoving volume to z over the whole sky, V_C = 4π (c/H0)³ ∫_0^χ S_k(χ')² dχ', Mpc³ (Hogg 1999
   * eq. 29, written as the integral so that small |Ω_k| needs no cancelling closed form).
   */
  comovingVolume<T extends ZInput>(z: T): ZOutput<T> {
    const p = prepare(z);
    const chi = this.chi(p), dh3 = this.hubbleDistance ** 3, ok = this.omegaK0;
    for (let i = 0; i < chi.length; i++) chi[i] = 4 * Math.PI * dh3 * integralSk2(chi[i], ok);
    return shape(chi, p.scalar) as ZOutput<T>;
  }

  /** dV_C/dz/dΩ = (c/H0) D_M²/E(z), Mpc³/sr per unit redshift (Hogg 1999 eq. 28). */
  differentialComovingVolume<T extends ZInput>(z: T): ZOutput<T> {
    const p = prepare(z);
    const chi = this.chi(p), dh = this.hubbleDistance, bg = this.background;
    for (let i = 0; i < chi.length; i++) {
      const dm = dh * this.sk(chi[i]);
      chi[i] = (dh * dm * dm) / Math.sqrt(bg.E2(Math.exp(p.xs[i])));
    }
    return shape(chi, p.scalar) as ZOutput<T>;
  }

  /** Proper (physical) size subtended by one arcsecond at z, D_A · (π/648000) · 1000, kpc/arcsec (small-angle). */
  properSizePerArcsec<T extends ZInput>(z: T): ZOutput<T> {
    const d = this.angularDiameterDistance(z as ZInput);
    const f = RAD_PER_ARCSEC * 1000;
    if (typeof d === 'number') return (d * f) as ZOutput<T>;
    for (let i = 0; i < d.length; i++) d[i] *= f;
    return d as ZOutput<T>;
  }

  /** Comoving size subtended by one arcsecond at z, D_M · (π/648000) · 1000, kpc/arcsec. */
  comovingSizePerArcsec<T extends ZInput>(z: T): ZOutput<T> {
    const d = this.transverseComovingDistance(z as ZInput);
    const f = RAD_PER_ARCSEC * 1000;
    if (typeof d === 'number') return (d * f) as ZOutput<T>;
    for (let i = 0; i < d.length; i++) d[i] *= f;
    return d as ZOutput<T>;
  }

  // ---------------------------------------------------------------------------------------------
  // Inverses, read from the same grid
  // ---------------------------------------------------------------------------------------------

  private inverse(targets: Float64Array, scalar: boolean, what: string,
    pick: (g: ReturnType<Integrals['gridCovering']>) => { c: ArrayLike<number>; g: ArrayLike<number>; d: ArrayLike<number> },
    wantFuture: boolean): number | Float64Array {
    const I = this.I;
    let lo = -4, hi = wantFuture ? 1 : 0;
    let tMin = Infinity, tMax = -Infinity;
    for (let i = 0; i < targets.length; i++) { if (targets[i] < tMin) tMin = targets[i]; if (targets[i] > tMax) tMax = targets[i]; }
    const out = new Float64Array(targets.length);
    if (targets.length === 0) return out;
    // Extend the grid until it brackets every target (or the model's past/future ends).
    for (let iter = 0; iter < 12; iter++) {
      const b = I.scanPast(lo - 2);
      const f = wantFuture ? I.scanFuture(hi + 2) : null;
      const xLo = b ? Math.max(lo, b.x + 3) : Math.max(lo, SETTINGS.pastLnA);
      const xHi = f ? Math.min(hi, f.x - 0.5) : hi;
      const g = I.gridCovering(xLo, xHi);
      const arr = pick(g);
      const h = g.h;
      const i0 = Math.ceil(xLo / h) - g.kLo, i1 = Math.floor(xHi / h) - g.kLo;
      let cmin = Math.min(arr.c[i0], arr.c[i1]), cmax = Math.max(arr.c[i0], arr.c[i1]);
      const done = tMin >= cmin && tMax <= cmax;
      const canGrow = !b && lo > SETTINGS.pastLnA;
      const canGrowUp = wantFuture && !f && hi < 10;
      if (done || (!canGrow && !canGrowUp) || iter === 11) {
        invertCells(arr.c, arr.g, arr.d, (i) => (i + g.kLo) * h, h, i0, i1, targets, out, (v) => {
          throw new UnreachableRedshiftError(NaN, `${what} ${fmtNum(v)} is outside what the model reaches (${fmtNum(cmin)} … ${fmtNum(cmax)})`);
        });
        for (let i = 0; i < out.length; i++) out[i] = Math.expm1(-out[i]);
        void cmax; void cmin;
        return shape(out, scalar);
      }
      if (canGrow) lo = Math.max(SETTINGS.pastLnA, lo * 2);
      if (canGrowUp) hi = hi * 2;
      cmin = cmax = 0;
    }
    throw new Error('unreachable');
  }

  /** Redshift at a line-of-sight comoving distance (Mpc); inverse of comovingDistance from the same grid. */
  redshiftAtComovingDistance<T extends ZInput>(d: T): ZOutput<T> {
    const { v, scalar } = values(d as ZInput, 'distance');
    for (let i = 0; i < v.length; i++) v[i] = -v[i] / this.hubbleDistance;
    return this.inverse(v, scalar, 'comoving distance', (g) => ({ c: g.c2, g: g.g2, d: g.d2 }), true) as ZOutput<T>;
  }

  /** Redshift at a luminosity distance (Mpc); inverse of luminosityDistance, quintic Hermite on the grid's D_L(x). */
  redshiftAtLuminosityDistance<T extends ZInput>(d: T): ZOutput<T> {
    const { v, scalar } = values(d as ZInput, 'distance');
    for (let i = 0; i < v.length; i++) {
      if (!(v[i] >= 0)) throw new RangeError(`luminosity distance must be ≥ 0 Mpc (got ${v[i]})`);
      v[i] /= this.hubbleDistance;
    }
    const ok = this.omegaK0, s = Math.sqrt(Math.abs(ok));
    return this.inverse(v, scalar, 'luminosity distance', (g) => {
      // D_L(x) = e^{−x} S_k(χ), χ = −c2; slopes by the chain rule (S″ = Ω_k S).
      const n = g.c2.length, L = new Float64Array(n), L1 = new Float64Array(n), L2 = new Float64Array(n);
      let end = n;
      for (let i = 0; i < n; i++) {
        const x = (i + g.kLo) * g.h, A = Math.exp(-x), chi = -g.c2[i];
        const S = ok === 0 ? chi : ok > 0 ? Math.sinh(s * chi) / s : Math.sin(s * chi) / s;
        const C = ok === 0 ? 1 : ok > 0 ? Math.cosh(s * chi) : Math.cos(s * chi);
        const c1 = -g.g2[i], c2 = -g.d2[i];
        L[i] = A * S;
        L1[i] = -A * S + A * C * c1;
        L2[i] = A * S - 2 * A * C * c1 + A * (ok * S * c1 * c1 + C * c2);
        if (L1[i] >= 0 && x < 0 && end === n) end = i;
      }
      // Beyond a turnover of D_L (closed models) the inverse is not unique: refuse past it.
      if (end < n) throw new UnreachableRedshiftError(NaN, 'the luminosity distance of this closed model is not monotonic over the range asked; the inverse is not unique');
      return { c: L, g: L1, d: L2 };
    }, false) as ZOutput<T>;
  }

  /** Redshift at which the model's age is t (Gyr); inverse of age from the same grid. */
  redshiftAtAge<T extends ZInput>(t: T): ZOutput<T> {
    const { v, scalar } = values(t as ZInput, 'age');
    for (let i = 0; i < v.length; i++) {
      if (!(v[i] > 0)) throw new RangeError(`age must be > 0 Gyr (got ${v[i]})`);
      v[i] /= this.hubbleTime;
    }
    return this.inverse(v, scalar, 'age (1/H0 units)', (g) => { const [p1] = g.pastArrays(); return { c: p1, g: g.g1, d: g.d1 }; }, true) as ZOutput<T>;
  }

  /** Redshift at a lookback time (Gyr); inverse of lookbackTime from the same grid. */
  redshiftAtLookbackTime<T extends ZInput>(t: T): ZOutput<T> {
    const { v, scalar } = values(t as ZInput, 'lookback time');
    for (let i = 0; i < v.length; i++) v[i] = -v[i] / this.hubbleTime;
    return this.inverse(v, scalar, 'lookback time (1/H0 units)', (g) => ({ c: g.c1, g: g.g1, d: g.d1 }), true) as ZOutput<T>;
  }

  // ---------------------------------------------------------------------------------------------
  // Physics modules (growth.ts, history.ts, raychaudhuri.ts, energy-conditions.ts, thermal.ts,
  // light.ts, likelihood.ts, cautions.ts), solved lazily once per model
  // ---------------------------------------------------------------------------------------------

  private cache: Map<string, unknown> | null = null;
  private once<T>(key: string, make: () => T): T {
    const c = this.cache ?? (this.cache = new Map());
    if (!c.has(key)) c.set(key, make());
    return c.get(key) as T;
  }
  private growthSolution(): GrowthSolution {
    return this.once('growth', () => solveGrowth(this.background));
  }
  /** Checks the redshifts (z > −1, reached by the model) and returns them as given. */
  private reachable<T extends ZInput>(z: T): T {
    const p = prepare(z);
    this.I.checkReachable(p.xMin, p.xMax, zOfX);
    return z;
  }

  /**
   * Linear growth factor D(z) (dimensionless) of δ'' + (2 + d ln H/d ln a) δ' − (3/2) Ω_m(a) δ = 0 in ln a
   * (growth.ts); normalize 'today' (D(0) = 1, default) or 'early' (D → a deep in the matter era).
   */
  growthFactor<T extends ZInput>(z: T, opts: { normalize?: GrowthNormalization } = {}): ZOutput<T> {
    return this.growthSolution().D(this.reachable(z), opts.normalize ?? 'today') as ZOutput<T>;
  }
  /** Growth rate f = d ln D/d ln a (dimensionless; growth.ts). */
  growthRate<T extends ZInput>(z: T): ZOutput<T> {
    return this.growthSolution().f(this.reachable(z)) as ZOutput<T>;
  }
  /** f σ8(z) = f(z) σ8 D(z)/D(0) for σ8 given today (dimensionless; growth.ts). */
  fSigma8<T extends ZInput>(z: T, sigma8: number): ZOutput<T> {
    if (typeof sigma8 !== 'number' || !(sigma8 > 0) || !Number.isFinite(sigma8)) throw new RangeError(`sigma8 must be a finite number > 0 (got ${String(sigma8)})`);
    return this.growthSolution().fSigma8(this.reachable(z), sigma8) as ZOutput<T>;
  }
  /** Decaying mode D₋(z), 1 today (∝ 1/t in Einstein–de Sitter; growth.ts, reduction of order). */
  decayingMode<T extends ZInput>(z: T): ZOutput<T> {
    return this.growthSolution().decaying(this.reachable(z)) as ZOutput<T>;
  }
  /** Redshift where ä changes sign from negative (past) to positive, or null (raychaudhuri.ts). */
  accelerationOnsetRedshift(): number | null {
    return this.once('accelOnset', () => accelerationOnsetRedshift(this.background));
  }
  /** Null, weak, strong and dominant energy conditions per component and in total, with the z ranges where each fails (energy-conditions.ts). */
  energyConditions(opts: { zMax?: number } = {}): EnergyConditionsReport {
    return this.once(`ec:${opts.zMax ?? ''}`, () => energyConditions(this.background, opts));
  }
  /** a(t) over the whole life of the model, with big bang/bounce, turnaround, crunch or rip (history.ts; Gyr, km/s/Mpc). */
  history(): History {
    return this.once('history', () => solveHistory(this.background));
  }
  /** How the past ends ('bang' | 'bounce' | 'eternal') and the largest redshift reached (history.ts). */
  pastLimit(): PastLimit {
    return this.once('pastLimit', () => pastLimit(this.background));
  }
  /** Largest residual of dΘ/dt + Θ²/3 = −4πG(ρ + 3p) + Λ along the solved history, Θ = 3H (raychaudhuri.ts). */
  raychaudhuriResidual(): RaychaudhuriReport {
    return this.once('rayResidual', () => raychaudhuriResidual(this.background, this.history()));
  }
  /** What the Raychaudhuri equation implies when the strong energy condition holds throughout the past (raychaudhuri.ts). */
  singularityStatement(): SingularityStatement {
    return this.once('singularity', () => singularityStatement(this.background, this.history()));
  }
  /** Matter–radiation equality redshift (thermal.ts), or null without radiation. */
  equalityRedshift(): number | null {
    return this.once('zeq', () => equalityRedshift(this.background));
  }
  /** Bolometric sky intensity I = (c/4π) ∫ j(z) dz/((1+z)² H(z)) for a comoving emissivity j (light.ts; nW m⁻² sr⁻¹). */
  skyIntensity(j: Emissivity, opts: { zMax?: number } = {}): SkyIntensity {
    return skyIntensity(this.background, j, opts);
  }
  /** χ² against a table (distance modulus with M marginalised, H(z) or fσ8; likelihood.ts). */
  chi2(kind: ObservableKind, table: MeasurementTable, opts: { sigma8?: number } = {}): Chi2Result {
    return chi2(this as unknown as Parameters<typeof chi2>[0], kind, table, opts);
  }

  /**
   * Cautions where an approximation, not the numerics, limits results of this model (cautions.ts):
   * the neutrino fitting form, scale-independent growth with massive neutrinos or radiation at `zMax`,
   * a bounce in the past.
   */
  warnings(opts: { zMax?: number } = {}): KernelWarning[] {
    const out: KernelWarning[] = [];
    if (this.params.neutrinoModel === 'fitting' && this.params.mNu.length > 0) out.push(fittingFormCaution());
    out.push(...growthCautions(this.background, opts.zMax));
    const limit = this.pastLimit();
    if (limit.kind === 'bounce') {
      const c = bounceCaution(opts.zMax ?? 0, limit);
      if (c) out.push(c);
    }
    return out;
  }

  // ---------------------------------------------------------------------------------------------
  // Serialisation and units
  // ---------------------------------------------------------------------------------------------

  /** A plain-JSON description from which `universe.fromJSON` rebuilds the same model. */
  toJSON(): UniverseJSON {
    return { kind: 'comoving.universe', kernelVersion: KERNEL_VERSION, params: JSON.parse(JSON.stringify(this.params)) };
  }

  /** h = H0 / (100 km/s/Mpc). */
  get h(): number {
    return this.H0 / 100;
  }

  /** Converts Mpc to Mpc/h (multiplies by h). */
  toMpcPerH<T extends ZInput>(dMpc: T): ZOutput<T> {
    const { v, scalar } = values(dMpc as ZInput, 'distance');
    for (let i = 0; i < v.length; i++) v[i] *= this.h;
    return shape(v, scalar) as ZOutput<T>;
  }

  /** Converts Mpc/h to Mpc (divides by h). */
  fromMpcPerH<T extends ZInput>(dMpcPerH: T): ZOutput<T> {
    const { v, scalar } = values(dMpcPerH as ZInput, 'distance');
    for (let i = 0; i < v.length; i++) v[i] /= this.h;
    return shape(v, scalar) as ZOutput<T>;
  }
}

function deepFreeze(o: unknown): void {
  if (o && typeof o === 'object' && !Object.isFrozen(o)) {
    Object.freeze(o);
    for (const v of Object.values(o)) deepFreeze(v);
  }
}

/** ∫_0^χ S_k(χ')² dχ' in (c/H0)³: closed form (S C − χ)/(2Ω_k), a series where that cancels. */
function integralSk2(chi: number, ok: number): number {
  const u2 = ok * chi * chi;
  if (Math.abs(u2) < 0.1) {
    // sinh²u/u² integrated: χ³ Σ c_n u^{2n}, c = 1/3, 1/15, 2/315, 1/2835, 2/155925, 4/6081075 (Taylor series).
    return chi * chi * chi * (1 / 3 + u2 * (1 / 15 + u2 * (2 / 315 + u2 * (1 / 2835 + u2 * (2 / 155925 + u2 * (4 / 6081075))))));
  }
  const s = Math.sqrt(Math.abs(ok));
  const S = ok > 0 ? Math.sinh(s * chi) / s : Math.sin(s * chi) / s;
  const C = ok > 0 ? Math.cosh(s * chi) : Math.cos(s * chi);
  return (S * C - chi) / (2 * ok);
}

function fmtNum(v: number): string {
  return Number(v.toPrecision(6)).toString();
}

/**
 * Builds a model from its parameters (see UniverseParams for units and defaults). Throws a
 * KernelParamError naming the parameter and the rule when one is invalid or inconsistent.
 */
export function universe(params: UniverseParams): Universe {
  return new Universe(resolveParams(params));
}

/** Rebuilds a model from `model.toJSON()` (or its JSON text). */
universe.fromJSON = function fromJSON(json: UniverseJSON | string): Universe {
  const j = typeof json === 'string' ? (JSON.parse(json) as UniverseJSON) : json;
  if (!j || j.kind !== 'comoving.universe' || typeof j.params !== 'object') {
    throw new KernelParamError('json', "is not a model description (expected {kind: 'comoving.universe', params})");
  }
  const p = j.params as ResolvedParams;
  const input: Record<string, unknown> = {
    H0: p.H0, omegaM: p.omegaM, Tcmb: p.Tcmb, Neff: p.Neff, mNu: p.mNu, neutrinoModel: p.neutrinoModel,
  };
  if (p.omegaB !== null) input.omegaB = p.omegaB;
  if (p.omegaK !== null) input.omegaK = p.omegaK;
  if (p.omegaDE !== null) input.omegaDE = p.omegaDE;
  if (p.w !== null) input.w = p.w; else { input.w0 = p.w0; input.wa = p.wa; }
  if (p.fluids.length) {
    input.fluids = p.fluids.map((f) => {
      const o: Record<string, unknown> = { omega: f.omega, name: f.name };
      if (f.w !== null) o.w = f.w;
      if (f.density !== null) o.density = f.density;
      return o;
    });
  }
  return universe(input as unknown as UniverseParams);
};

void C_KM_S; void MPC_KM;
