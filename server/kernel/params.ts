/**
 * Parameters of a model and their validation. Every rule that a parameter can break throws a
 * `KernelParamError` naming the parameter and the rule, so that callers (scripts, sweeps, the API) can
 * show the user exactly what to fix.
 */

/** A tabulated function of the scale factor a (or of redshift z): give exactly one of `a` and `z`. */
export interface TableSpec {
  a?: readonly number[];
  z?: readonly number[];
  values: readonly number[];
}

/** A function of the scale factor: a constant, a mathjs formula in `a` (and `z`), or a table. */
export type FunctionSpec = number | string | TableSpec;

/** An extra component: its density today and either its equation of state or its density law. */
export interface FluidParams {
  /** Density today in units of the critical density. */
  omega: number;
  /** Equation of state w(a) (constant, formula or table); default 0 unless `density` is given. */
  w?: FunctionSpec;
  /** ρ(a)/ρ(a=1) as a formula or table (then w follows from its slope). Give `w` or `density`, not both. */
  density?: string | TableSpec;
  /** Label used in Ω_i(z) and energy-condition reports; default `fluid[i]`. */
  name?: string;
}

export type NeutrinoModel = 'exact' | 'fitting';

/** Parameters of `universe()`, in the trade's usual units. */
export interface UniverseParams {
  /** Hubble constant today, km/s/Mpc. */
  H0: number;
  /** Cold matter today (CDM + baryons, not massive neutrinos), in units of the critical density. */
  omegaM: number;
  /** Baryons today (part of omegaM). */
  omegaB?: number;
  /** Curvature today Ω_k = −k c²/(a0 H0)². Give at most one of omegaK and omegaDE; flat if neither. */
  omegaK?: number;
  /** Dark energy today. Give at most one of omegaK and omegaDE. */
  omegaDE?: number;
  /** CPL w(a) = w0 + wa (1 − a) (Chevallier & Polarski 2001; Linder 2003). Default −1. */
  w0?: number;
  /** Default 0. */
  wa?: number;
  /** A custom dark-energy w(a) (formula in `a`, or table); replaces w0 and wa. */
  w?: string | TableSpec;
  /** CMB temperature today, K; 0 removes all radiation (photons and neutrinos). Default 2.7255 (Fixsen 2009). */
  Tcmb?: number;
  /** Effective number of neutrino species, shared equally by three species. Default 3.046. */
  Neff?: number;
  /** Masses of the massive neutrino species, eV (at most three; the others are massless). */
  mNu?: number | readonly number[];
  /** 'exact' Fermi–Dirac integral (default) or the Komatsu et al. 2011 eq. 26 fitting form. */
  neutrinoModel?: NeutrinoModel;
  /** Extra components. */
  fluids?: readonly FluidParams[];
}

/** Parameters with every default filled in; what a model records in toJSON(). */
export interface ResolvedParams {
  H0: number;
  omegaM: number;
  omegaB: number | null;
  omegaK: number | null;
  omegaDE: number | null;
  w0: number;
  wa: number;
  w: string | TableSpec | null;
  Tcmb: number;
  Neff: number;
  mNu: number[];
  neutrinoModel: NeutrinoModel;
  fluids: { omega: number; w: FunctionSpec | null; density: string | TableSpec | null; name: string }[];
}

/** A parameter broke a rule: `param` names it (e.g. 'fluids[1].w'), `rule` says which rule. */
export class KernelParamError extends Error {
  readonly param: string;
  readonly rule: string;
  constructor(param: string, rule: string, message?: string) {
    super(message ?? `${param}: ${rule}`);
    this.name = 'KernelParamError';
    this.param = param;
    this.rule = rule;
  }
}

/** Default CMB temperature, K (Fixsen 2009, ApJ 707, 916). */
export const DEFAULT_TCMB = 2.7255;
/** Default N_eff (Mangano et al. 2005; the value Planck 2018 uses). */
export const DEFAULT_NEFF = 3.046;

const KNOWN_KEYS = new Set([
  'H0', 'omegaM', 'omegaB', 'omegaK', 'omegaDE', 'w0', 'wa', 'w', 'Tcmb', 'Neff', 'mNu', 'neutrinoModel', 'fluids',
]);
const FLUID_KEYS = new Set(['omega', 'w', 'density', 'name']);
const TABLE_KEYS = new Set(['a', 'z', 'values']);

function describe(v: unknown): string {
  if (typeof v === 'number') return String(v);
  if (typeof v === 'string') return JSON.stringify(v);
  if (v === null) return 'null';
  if (Array.isArray(v)) return 'an array';
  return typeof v;
}

function finiteNumber(name: string, v: unknown): number {
  if (typeof v !== 'number' || !Number.isFinite(v)) {
    throw new KernelParamError(name, 'must be a finite number', `${name} must be a finite number (got ${describe(v)})`);
  }
  return v;
}

function optionalFinite(name: string, v: unknown): number | undefined {
  return v === undefined ? undefined : finiteNumber(name, v);
}

function tableSpec(name: string, v: unknown): TableSpec {
  if (typeof v !== 'object' || v === null || Array.isArray(v)) {
    throw new KernelParamError(name, 'must be a number, a formula string or a table {a|z, values}');
  }
  const t = v as Record<string, unknown>;
  for (const k of Object.keys(t)) {
    if (!TABLE_KEYS.has(k)) throw new KernelParamError(`${name}.${k}`, 'unknown table key (use a or z, and values)');
  }
  if ((t.a === undefined) === (t.z === undefined)) {
    throw new KernelParamError(name, 'a table needs exactly one of a and z');
  }
  const axisName = t.a !== undefined ? 'a' : 'z';
  const axis = t[axisName];
  const values = t.values;
  if (!Array.isArray(axis)) throw new KernelParamError(`${name}.${axisName}`, 'must be an array of numbers');
  if (!Array.isArray(values)) throw new KernelParamError(`${name}.values`, 'must be an array of numbers');
  if (axis.length !== values.length) {
    throw new KernelParamError(name, `${axisName} and values must have the same length (${axis.length} vs ${values.length})`);
  }
  if (axis.length < 2) throw new KernelParamError(name, 'a table needs at least 2 rows');
  for (let i = 0; i < axis.length; i++) {
    const x = axis[i];
    finiteNumber(`${name}.${axisName}[${i}]`, x);
    finiteNumber(`${name}.values[${i}]`, values[i]);
    if (axisName === 'a' && x <= 0) throw new KernelParamError(`${name}.a[${i}]`, 'scale factors must be > 0');
    if (axisName === 'z' && x <= -1) throw new KernelParamError(`${name}.z[${i}]`, 'redshifts must be > −1');
    if (i > 0 && !(x > axis[i - 1])) throw new KernelParamError(`${name}.${axisName}`, 'must be strictly increasing');
  }
  return axisName === 'a'
    ? { a: [...(axis as number[])], values: [...(values as number[])] }
    : { z: [...(axis as number[])], values: [...(values as number[])] };
}

function formulaString(name: string, v: string): string {
  if (v.trim() === '') throw new KernelParamError(name, 'a formula must not be empty');
  if (v.length > 2000) throw new KernelParamError(name, 'a formula must be at most 2000 characters');
  return v;
}

function functionSpec(name: string, v: unknown): FunctionSpec {
  if (typeof v === 'number') return finiteNumber(name, v);
  if (typeof v === 'string') return formulaString(name, v);
  return tableSpec(name, v);
}

/**
 * Checks every parameter and fills in the defaults. Throws `KernelParamError` on the first rule broken.
 * Sum rule (Friedmann equation at a = 1): Ω_m + Ω_γ + Ω_ν + Ω_DE + Σ Ω_fluid + Ω_k = 1, checked where
 * the component densities are known (components.ts).
 */
export function resolveParams(input: unknown): ResolvedParams {
  if (typeof input !== 'object' || input === null || Array.isArray(input)) {
    throw new KernelParamError('params', 'must be an object with at least H0 and omegaM');
  }
  const p = input as Record<string, unknown>;
  for (const k of Object.keys(p)) {
    if (!KNOWN_KEYS.has(k)) throw new KernelParamError(k, 'unknown parameter', `unknown parameter '${k}'`);
  }
  if (p.H0 === undefined) throw new KernelParamError('H0', 'is required (km/s/Mpc)');
  const H0 = finiteNumber('H0', p.H0);
  if (!(H0 > 0)) throw new KernelParamError('H0', 'must be > 0 km/s/Mpc (an expanding model today)');
  if (H0 > 1e4) throw new KernelParamError('H0', 'must be at most 10000 km/s/Mpc');

  if (p.omegaM === undefined) throw new KernelParamError('omegaM', 'is required');
  const omegaM = finiteNumber('omegaM', p.omegaM);
  if (omegaM < 0) throw new KernelParamError('omegaM', 'must be ≥ 0');

  const omegaB = optionalFinite('omegaB', p.omegaB);
  if (omegaB !== undefined) {
    if (omegaB < 0) throw new KernelParamError('omegaB', 'must be ≥ 0');
    if (omegaB > omegaM) throw new KernelParamError('omegaB', 'must not exceed omegaM (baryons are part of the cold matter)');
  }

  const omegaK = optionalFinite('omegaK', p.omegaK);
  const omegaDE = optionalFinite('omegaDE', p.omegaDE);
  if (omegaK !== undefined && omegaDE !== undefined) {
    throw new KernelParamError('omegaK', 'give at most one of omegaK and omegaDE (the other follows from the sum rule)');
  }

  const w0 = optionalFinite('w0', p.w0) ?? -1;
  const wa = optionalFinite('wa', p.wa) ?? 0;
  let w: string | TableSpec | null = null;
  if (p.w !== undefined) {
    if (p.w0 !== undefined || p.wa !== undefined) {
      throw new KernelParamError('w', 'give either w (a custom w(a)) or w0/wa, not both');
    }
    if (typeof p.w === 'number') throw new KernelParamError('w', 'a constant w goes in w0 (w is for a formula or table)');
    w = typeof p.w === 'string' ? formulaString('w', p.w) : tableSpec('w', p.w);
  }

  const Tcmb = optionalFinite('Tcmb', p.Tcmb) ?? DEFAULT_TCMB;
  if (Tcmb < 0) throw new KernelParamError('Tcmb', 'must be ≥ 0 K (0 removes all radiation)');
  if (Tcmb > 1000) throw new KernelParamError('Tcmb', 'must be at most 1000 K');

  const Neff = optionalFinite('Neff', p.Neff) ?? DEFAULT_NEFF;
  if (Neff < 0) throw new KernelParamError('Neff', 'must be ≥ 0');
  if (Neff > 30) throw new KernelParamError('Neff', 'must be at most 30');

  let mNu: number[] = [];
  if (p.mNu !== undefined) {
    if (typeof p.mNu === 'number') mNu = [finiteNumber('mNu', p.mNu)];
    else if (Array.isArray(p.mNu)) mNu = p.mNu.map((m, i) => finiteNumber(`mNu[${i}]`, m));
    else throw new KernelParamError('mNu', 'must be a mass in eV or an array of at most three masses');
    if (mNu.length > 3) throw new KernelParamError('mNu', 'at most three massive species (N_eff is shared by three)');
    mNu.forEach((m, i) => {
      if (m < 0) throw new KernelParamError(`mNu[${i}]`, 'masses must be ≥ 0 eV');
      if (m > 100) throw new KernelParamError(`mNu[${i}]`, 'masses must be at most 100 eV');
    });
    mNu = mNu.filter((m) => m > 0);
    if (mNu.length > 0 && Tcmb === 0) {
      throw new KernelParamError('mNu', 'massive neutrinos need Tcmb > 0 (their density follows from the neutrino temperature)');
    }
    if (mNu.length > 0 && Neff === 0) throw new KernelParamError('mNu', 'massive neutrinos need Neff > 0');
  }

  let neutrinoModel: NeutrinoModel = 'exact';
  if (p.neutrinoModel !== undefined) {
    if (p.neutrinoModel !== 'exact' && p.neutrinoModel !== 'fitting') {
      throw new KernelParamError('neutrinoModel', "must be 'exact' or 'fitting'");
    }
    neutrinoModel = p.neutrinoModel;
  }

  const fluids: ResolvedParams['fluids'] = [];
  if (p.fluids !== undefined) {
    if (!Array.isArray(p.fluids)) throw new KernelParamError('fluids', 'must be an array of {omega, w} objects');
    if (p.fluids.length > 16) throw new KernelParamError('fluids', 'at most 16 extra fluids');
    const names = new Set<string>(['matter', 'photons', 'neutrinos', 'darkEnergy', 'curvature']);
    p.fluids.forEach((f: unknown, i: number) => {
      const base = `fluids[${i}]`;
      if (typeof f !== 'object' || f === null || Array.isArray(f)) throw new KernelParamError(base, 'must be an object {omega, w}');
      const fr = f as Record<string, unknown>;
      for (const k of Object.keys(fr)) {
        if (!FLUID_KEYS.has(k)) throw new KernelParamError(`${base}.${k}`, 'unknown fluid key (use omega, w, density, name)');
      }
      if (fr.omega === undefined) throw new KernelParamError(`${base}.omega`, 'is required');
      const omega = finiteNumber(`${base}.omega`, fr.omega);
      if (fr.w !== undefined && fr.density !== undefined) {
        throw new KernelParamError(base, 'give w or density, not both');
      }
      const fw = fr.w === undefined ? null : functionSpec(`${base}.w`, fr.w);
      let density: string | TableSpec | null = null;
      if (fr.density !== undefined) {
        if (typeof fr.density === 'number') throw new KernelParamError(`${base}.density`, 'must be a formula string or a table (a constant density is w = −1)');
        density = typeof fr.density === 'string' ? formulaString(`${base}.density`, fr.density) : tableSpec(`${base}.density`, fr.density);
      }
      let name = `fluid[${i}]`;
      if (fr.name !== undefined) {
        if (typeof fr.name !== 'string' || !/^[A-Za-z][A-Za-z0-9_\-]{0,39}$/.test(fr.name)) {
          throw new KernelParamError(`${base}.name`, 'must be 1–40 letters, digits, _ or -, starting with a letter');
        }
        name = fr.name;
      }
      if (names.has(name)) throw new KernelParamError(`${base}.name`, `name '${name}' is already used by another component`);
      names.add(name);
      fluids.push({ omega, w: fw, density, name });
    });
  }

  return {
    H0, omegaM, omegaB: omegaB ?? null, omegaK: omegaK ?? null, omegaDE: omegaDE ?? null,
    w0, wa, w, Tcmb, Neff, mNu, neutrinoModel, fluids,
  };
}
