/**
 * The Comoving script API: everything a script sees inside the sandbox, declared once.
 *
 * The sandbox bridge (server/sandbox/prelude.ts) is type-checked against this file. The editor shows
 * it as the scripts' globals: every line starting with `export ` becomes a global declaration once that
 * word is removed (`source.replace(/^export /gm, '')`), so keep each export on its own line start.
 *
 * Units are the ones cosmologists use: H in km/s/Mpc, distances in Mpc, times in Gyr, temperatures in K,
 * neutrino masses in eV. Formula sources are named in the kernel's doc comments (server/kernel).
 *
 * Arrays: every kernel method takes a number or an array of numbers (a Float64Array is fastest; a plain
 * array is converted) and returns a number for a number and a Float64Array for an array. Bad arguments
 * stop the run with an error naming the function and the argument.
 */

/** A number or an array of numbers (Float64Array preferred: it crosses into the kernel in one copy). */
export type Numbers = number | Float64Array | readonly number[];

/** A tabulated function of the scale factor a (or of redshift z): give exactly one of `a` and `z`. */
export interface TableSpec {
  a?: readonly number[];
  z?: readonly number[];
  values: readonly number[];
}

/** A function of the scale factor: a constant, a mathjs formula in `a` (and `z`), or a table. */
export type FunctionSpec = number | string | TableSpec;

/** An extra component of the energy budget. */
export interface FluidParams {
  /** Density today in units of the critical density (dimensionless Ω). */
  omega: number;
  /** Equation of state w(a) = p/(ρc²) (constant, formula or table); default 0 unless `density` is given. */
  w?: FunctionSpec;
  /** ρ(a)/ρ(a=1) as a formula or table (then w follows from its slope). Give `w` or `density`, not both. */
  density?: string | TableSpec;
  /** Label used in Ω_i(z) and energy-condition reports; default `fluid[i]`. */
  name?: string;
}

/** Parameters of a model, as the kernel takes them (server/kernel/params.ts). */
export interface UniverseParams {
  /** Hubble constant today, km/s/Mpc. */
  H0: number;
  /** Cold matter density today (CDM + baryons, not massive neutrinos), dimensionless Ω_m. */
  omegaM: number;
  /** Baryon density today (part of omegaM), dimensionless. */
  omegaB?: number;
  /** Curvature density today Ω_k = −k c²/(a0 H0)²; give at most one of omegaK and omegaDE (flat when neither). */
  omegaK?: number;
  /** Dark-energy density today; give at most one of omegaK and omegaDE. */
  omegaDE?: number;
  /** CPL w(a) = w0 + wa (1 − a) (Chevallier & Polarski 2001; Linder 2003); default −1. */
  w0?: number;
  /** CPL slope, default 0. */
  wa?: number;
  /** A custom dark-energy w(a) (mathjs formula in `a`, or a table); replaces w0 and wa. */
  w?: string | TableSpec;
  /** CMB temperature today, K; 0 means no radiation (photons and neutrinos alike). Default 2.7255 (Fixsen 2009). */
  Tcmb?: number;
  /** Effective number of neutrino species, shared equally by three species; default 3.046 (common practice). */
  Neff?: number;
  /** Masses of the massive neutrino species, eV (at most three). */
  mNu?: number | readonly number[];
  /** 'exact' Fermi–Dirac integral (default) or the Komatsu et al. 2011 (WMAP7, eq. 26) fitting form. */
  neutrinoModel?: 'exact' | 'fitting';
  /** Extra components. */
  fluids?: readonly FluidParams[];
}

/** One redshift range [from, to]. */
export type RedshiftRange = [number, number];

/**
 * A cosmological model. Lives on the server; the script holds a handle to it.
 * Vectorised methods: number in → number out; array in → Float64Array out.
 */
/** What skyIntensity answers; intensities in nW m⁻² sr⁻¹. */
export interface SkyIntensity {
  /** I = (c/4π) ∫ j dz / ((1+z)² H(z)) from 0 to zMax. */
  readonly intensity: number;
  readonly zMax: number;
  /** The static Euclidean sum j R / 4π out to R = c/H0, for comparison. */
  readonly euclideanToHubbleDistance: number;
}

export interface Universe {
  /** The parameters the model was built from (after defaults). */
  readonly params: UniverseParams;
  /** E(z) = H(z)/H0 (dimensionless), Friedmann equation. */
  E(z: number): number;
  E(z: Float64Array | readonly number[]): Float64Array;
  /** Hubble rate H(z), km/s/Mpc. */
  H(z: number): number;
  H(z: Float64Array | readonly number[]): Float64Array;
  /** Line-of-sight comoving distance, Mpc. */
  comovingDistance(z: number): number;
  comovingDistance(z: Float64Array | readonly number[]): Float64Array;
  /** Transverse comoving distance (curvature included), Mpc. */
  transverseComovingDistance(z: number): number;
  transverseComovingDistance(z: Float64Array | readonly number[]): Float64Array;
  /** Angular-diameter distance, Mpc. */
  angularDiameterDistance(z: number): number;
  angularDiameterDistance(z: Float64Array | readonly number[]): Float64Array;
  /** Angular-diameter distance between z1 < z2, Mpc. */
  angularDiameterDistanceBetween(z1: number, z2: number): number;
  angularDiameterDistanceBetween(z1: Numbers, z2: Numbers): Float64Array;
  /** Luminosity distance, Mpc. */
  luminosityDistance(z: number): number;
  luminosityDistance(z: Float64Array | readonly number[]): Float64Array;
  /** Distance modulus μ = 5 log10(d_L / 10 pc), mag. */
  distanceModulus(z: number): number;
  distanceModulus(z: Float64Array | readonly number[]): Float64Array;
  /** Lookback time to redshift z, Gyr. */
  lookbackTime(z: number): number;
  lookbackTime(z: Float64Array | readonly number[]): Float64Array;
  /** Age of the universe at redshift z, Gyr. */
  age(z: number): number;
  age(z: Float64Array | readonly number[]): Float64Array;
  /** Conformal time since the big bang at redshift z, Gyr (η with c = 1 in Gyr). */
  conformalTime(z: number): number;
  conformalTime(z: Float64Array | readonly number[]): Float64Array;
  /** Comoving particle horizon at redshift z, Mpc. */
  particleHorizon(z: number): number;
  particleHorizon(z: Float64Array | readonly number[]): Float64Array;
  /** Comoving volume within redshift z (whole sky), Mpc³. */
  comovingVolume(z: number): number;
  comovingVolume(z: Float64Array | readonly number[]): Float64Array;
  /** Differential comoving volume dV/dz/dΩ, Mpc³/sr. */
  differentialComovingVolume(z: number): number;
  differentialComovingVolume(z: Float64Array | readonly number[]): Float64Array;
  /** Proper size subtended by one arcsecond at redshift z, kpc/arcsec. */
  properSizePerArcsec(z: number): number;
  properSizePerArcsec(z: Float64Array | readonly number[]): Float64Array;
  /** Comoving size subtended by one arcsecond at redshift z, kpc/arcsec. */
  comovingSizePerArcsec(z: number): number;
  comovingSizePerArcsec(z: Float64Array | readonly number[]): Float64Array;
  /** Cold-matter density parameter Ω_m(z) (dimensionless). */
  omegaMatter(z: number): number;
  omegaMatter(z: Float64Array | readonly number[]): Float64Array;
  /** Photon density parameter Ω_γ(z) (dimensionless). */
  omegaPhotons(z: number): number;
  omegaPhotons(z: Float64Array | readonly number[]): Float64Array;
  /** Neutrino density parameter Ω_ν(z) (dimensionless, massless and massive). */
  omegaNeutrinos(z: number): number;
  omegaNeutrinos(z: Float64Array | readonly number[]): Float64Array;
  /** Dark-energy density parameter Ω_DE(z) (dimensionless). */
  omegaDarkEnergy(z: number): number;
  omegaDarkEnergy(z: Float64Array | readonly number[]): Float64Array;
  /** Curvature density parameter Ω_k(z) (dimensionless). */
  omegaCurvature(z: number): number;
  omegaCurvature(z: Float64Array | readonly number[]): Float64Array;
  /** CMB temperature T(z) = T0 (1 + z), K. */
  Tcmb(z: number): number;
  Tcmb(z: Float64Array | readonly number[]): Float64Array;
  /** Neutrino temperature T_ν(z) = (4/11)^(1/3) T0 (1 + z), K (entropy conservation through e± annihilation). */
  Tnu(z: number): number;
  Tnu(z: Float64Array | readonly number[]): Float64Array;
  /** Deceleration parameter q(z) = −ä a / ȧ² (dimensionless). */
  decelerationParameter(z: number): number;
  decelerationParameter(z: Float64Array | readonly number[]): Float64Array;
  /** Linear growth factor D(z); normalize 'today' (D(0) = 1, default) or 'early' (D → a in the matter era). */
  growthFactor(z: number, options?: { normalize?: 'today' | 'early' }): number;
  growthFactor(z: Float64Array | readonly number[], options?: { normalize?: 'today' | 'early' }): Float64Array;
  /** Linear growth rate f = d ln D / d ln a (dimensionless). */
  growthRate(z: number): number;
  growthRate(z: Float64Array | readonly number[]): Float64Array;
  /** Decaying mode D₋(z), 1 today (∝ 1/t in Einstein–de Sitter). */
  decayingMode(z: number): number;
  decayingMode(z: Float64Array | readonly number[]): Float64Array;
  /** f(z)·σ8(z) for the given σ8 today (dimensionless). */
  fSigma8(z: number, sigma8: number): number;
  fSigma8(z: Float64Array | readonly number[], sigma8: number): Float64Array;
  /** Inverse of comovingDistance: redshift at comoving distance d (Mpc). */
  redshiftAtComovingDistance(d: number): number;
  redshiftAtComovingDistance(d: Float64Array | readonly number[]): Float64Array;
  /** Inverse of luminosityDistance: redshift at luminosity distance d (Mpc). */
  redshiftAtLuminosityDistance(d: number): number;
  redshiftAtLuminosityDistance(d: Float64Array | readonly number[]): Float64Array;
  /** Inverse of age: redshift at which the universe had age t (Gyr). */
  redshiftAtAge(t: number): number;
  redshiftAtAge(t: Float64Array | readonly number[]): Float64Array;
  /** Inverse of lookbackTime: redshift at lookback time t (Gyr). */
  redshiftAtLookbackTime(t: number): number;
  redshiftAtLookbackTime(t: Float64Array | readonly number[]): Float64Array;
  /** Distances in Mpc converted to Mpc/h (multiplied by h = H0 / 100 km/s/Mpc). */
  toMpcPerH(d: number): number;
  toMpcPerH(d: Float64Array | readonly number[]): Float64Array;
  /** Distances in Mpc/h converted to Mpc (divided by h). */
  fromMpcPerH(d: number): number;
  fromMpcPerH(d: Float64Array | readonly number[]): Float64Array;
  /** Scale factor a at cosmic time t since the big bang or bounce, Gyr (from the solved a(t)). */
  scaleFactorAtTime(t: number): number;
  scaleFactorAtTime(t: Float64Array | readonly number[]): Float64Array;
  /** Hubble rate H at cosmic time t since the big bang or bounce (t in Gyr), km/s/Mpc; negative while contracting. */
  hubbleAtTime(t: number): number;
  hubbleAtTime(t: Float64Array | readonly number[]): Float64Array;
  /** Redshift where the expansion starts to accelerate (q = 0), or null if it never does. */
  accelerationOnsetRedshift(): number | null;
  /**
   * Null, weak, strong and dominant energy conditions per component and in total, with the redshift
   * ranges (up to zMax) where each fails. The shape is the kernel's report, passed through.
   */
  energyConditions(options?: { zMax?: number }): KernelReport;
  /**
   * a(t) over the whole life of the model: origin ('bang' | 'bounce' | 'eternal'), ageGyr, fate
   * ('crunch' | 'rip' | 'open'), events ({kind, tGyr, a, H}), tRange (Gyr), redshiftCoordinate, warnings,
   * and `samples` {t (Gyr), a, H (km/s/Mpc), q} at `options.samples` times (default 200) with every event included.
   */
  history(options?: { samples?: number }): KernelReport;
  /** How the past ends: {kind: 'bang' | 'bounce' | 'eternal', aMin, zMax} (zMax is null for no bound). */
  pastLimit(): KernelReport;
  /** Largest residual of dΘ/dt + Θ²/3 = −4πG(ρ + 3p) + Λ along the solved history, Θ = 3H. Kernel's report. */
  raychaudhuriResidual(): KernelReport;
  /** What the Raychaudhuri equation implies when the strong energy condition holds throughout the past: {holds, text, ageGyr, hubbleTimeGyr}. */
  singularityStatement(): KernelReport;
  /** Matter–radiation equality redshift, or null without radiation. */
  equalityRedshift(): number | null;
  /**
   * Bolometric sky intensity I = (c/4π) ∫ j(z) dz / ((1+z)² H(z)) for a comoving emissivity j (a constant
   * in L_sun Mpc⁻³, a mathjs formula in z, or a table {z, j}), with the static Euclidean sum out to c/H0
   * for comparison: {intensity, zMax, euclideanToHubbleDistance} in nW m⁻² sr⁻¹.
   */
  skyIntensity(j: number | string | { z: readonly number[]; j: readonly number[] }, options?: { zMax?: number }): SkyIntensity;
  /** Cautions where an approximation limits accuracy: [{code, message}]. */
  warnings(options?: { zMax?: number }): readonly { readonly code: string; readonly message: string }[];
  /** The model as plain JSON (parameters and kernel version), for recording with a result. */
  toJSON(): KernelReport;
}

/**
 * A structured answer from the kernel, passed through as plain data: numbers, strings, booleans,
 * null, arrays and objects; numeric arrays arrive as Float64Array.
 */
export type KernelReport = { readonly [key: string]: KernelValue };
export type KernelValue =
  | number
  | string
  | boolean
  | null
  | Float64Array
  | readonly KernelValue[]
  | { readonly [key: string]: KernelValue };

/** A group's uploaded table, read by name with dataset(name). */
export interface Dataset {
  readonly name: string;
  /** 'distance_modulus' | 'hubble' | 'fsigma8' | 'table'. */
  readonly kind: string;
  /** Every column by its name, as Float64Array. */
  readonly columns: { readonly [name: string]: Float64Array };
  /** Units of the columns that have one. */
  readonly units: { readonly [name: string]: string };
  /** Measurement kinds: the redshifts. */
  readonly z?: Float64Array;
  /** Measurement kinds: the measured value (μ in mag, H in km/s/Mpc, or f·σ8). */
  readonly value?: Float64Array;
  /** Measurement kinds: the 1σ uncertainty, same unit as value. */
  readonly sigma?: Float64Array;
  /** The covariance matrix, when uploaded: one Float64Array per row. */
  readonly cov?: readonly Float64Array[];
}

/** χ² of a model against a measured dataset (kernel likelihoods). */
export interface Chi2Result {
  /** χ² (dimensionless); for distance moduli, with the absolute magnitude marginalised analytically. */
  readonly chi2: number;
  /** Number of data points. */
  readonly n: number;
  /** Degrees of freedom: n − 1 when an offset is marginalised, else n. */
  readonly dof: number;
  /** Best-fitting additive offset (mag), distance modulus only. */
  readonly offset?: number;
  /** −2 ln of the likelihood marginalised over the offset (distance modulus only). */
  readonly minusTwoLnMarginal?: number;
  /** The model's prediction at each row, same unit as the dataset's value. */
  readonly prediction: Float64Array;
}

/** Declaration of a recipe input. */
export interface ParamOptions {
  /** Value used when the run gives none. */
  default: number;
  min?: number;
  max?: number;
  /** Unit shown in the form, e.g. 'km/s/Mpc'. */
  unit?: string;
  /** Label shown in the form. */
  label?: string;
}

/** One column of show.table. */
export interface TableColumn {
  name: string;
  unit?: string;
  values: Numbers;
}

/** One series of show.plot. */
export interface PlotSeries {
  name: string;
  values: Numbers;
  /** 'band' only: lower edge. */
  lower?: Numbers;
  /** 'band' only: upper edge. */
  upper?: Numbers;
}

/** A plot. A heatmap takes x, y and a matrix `values` (one row per y). */
export interface PlotSpec {
  type: 'line' | 'scatter' | 'band' | 'heatmap';
  title?: string;
  x: Numbers;
  /** Heatmap only. */
  y?: Numbers;
  /** Line, scatter and band. */
  series?: readonly PlotSeries[];
  /** Heatmap only: values[iy][ix]. */
  values?: readonly Numbers[];
  xLabel?: string;
  yLabel?: string;
  xScale?: 'linear' | 'log';
  yScale?: 'linear' | 'log';
}

export interface Show {
  /** Show one named number with an optional unit. */
  value(name: string, value: number, unit?: string): void;
  /** Show a table; all columns must have the same length. */
  table(name: string, columns: readonly TableColumn[]): void;
  /** Show a plot. */
  plot(spec: PlotSpec): void;
}

/** Build a model. Invalid parameters stop the run with the kernel's message. */
export declare function universe(params: UniverseParams): Universe;

/** n evenly spaced numbers from start to stop inclusive. */
export declare function linspace(start: number, stop: number, n: number): Float64Array;

/** n numbers evenly spaced in log10 from 10^startExp to 10^stopExp inclusive. */
export declare function logspace(startExp: number, stopExp: number, n: number): Float64Array;

/**
 * Convert a value between units through mathjs units; Mpc, Gpc, Gyr, km/s/Mpc, K and eV are known.
 * Example: convert(1, 'Mpc', 'km').
 */
export declare function convert(value: number, from: string, to: string): number;

/** A recipe input: the run's value for `name`, else the default; checked against min and max. */
export declare function param(name: string, options: ParamOptions): number;

/** A dataset of the group, by name. */
export declare function dataset(name: string): Dataset;

/** Run a saved recipe of the group in a fresh context with these inputs; returns its shown values by name. */
export declare function recipe(name: string, inputs?: { readonly [name: string]: number }): { readonly [name: string]: number | null };

/**
 * χ² of the model against a measurement dataset: distance_modulus (absolute magnitude marginalised
 * analytically), hubble (km/s/Mpc) or fsigma8 (needs options.sigma8, σ8 today). Uses the covariance
 * when the dataset has one, else the sigma column.
 */
export declare function chi2(model: Universe, data: Dataset, options?: { sigma8?: number }): Chi2Result;

/** A pseudo-random number in [0, 1) from the run's seed (mulberry32); Math.random draws from the same stream. */
export declare function random(): number;

/** Outputs shown beneath the script. */
export declare const show: Show;

/** Write a line to the run's log; arguments are joined by spaces. */
export declare function print(...args: unknown[]): void;
