/**
 * Background light: the bolometric intensity of the sky from a comoving emissivity j(z), integrated
 * over the past light cone,
 *   I = (c/4π) ∫_0^zMax j(z) dz / ((1+z)² H(z))
 * (energy emitted per proper volume j(1+z)³ redshifts as (1+z)⁻⁴ and dt = dz/((1+z)H); Wesson, Valle &
 * Stabell 1987, ApJ 317, 601; Peacock 1999, Cosmological Physics, ch. 3), set against the static
 * Euclidean sum I_E(R) = j R/(4π), which grows without bound with R (the dark-night-sky argument).
 *
 * Units: j in L_sun Mpc⁻³ (comoving), H in km/s/Mpc, so c/H is in Mpc; I is returned in
 * nW m⁻² sr⁻¹ (the unit of extragalactic-background measurements).
 */
import type { Background } from './background';
import { C_KM_S, MPC_M } from './constants';
import { integrateGL } from './ode';
import { compileFormulaInZ, tabulated, FormulaError } from './formula';
import { pastLimit } from './history';

/**
 * Nominal solar luminosity, W (IAU 2015 Resolution B3). Kept here until constants.ts carries it;
 * it is the only constant this module adds.
 */
export const L_SUN_W = 3.828e26;

/** A comoving emissivity: constant, formula in z (mathjs, see formula.ts), a table, or a function. */
export type Emissivity =
  | number
  | string
  | { z: ArrayLike<number>; j: ArrayLike<number> }
  | ((z: number) => number);

/** L_sun Mpc⁻² sr⁻¹ → nW m⁻² sr⁻¹. */
const TO_NW = (L_SUN_W / (MPC_M * MPC_M)) * 1e9;

function emissivityFunction(j: Emissivity): { fn: (z: number) => number; zTop: number } {
  if (typeof j === 'number') {
    if (!Number.isFinite(j) || j < 0) throw new RangeError(`emissivity: j must be a finite number ≥ 0 (L_sun Mpc⁻³), got ${j}`);
    return { fn: () => j, zTop: Infinity };
  }
  if (typeof j === 'string') return { fn: compileFormulaInZ(j, 'emissivity j(z)'), zTop: Infinity };
  if (typeof j === 'function') return { fn: j, zTop: Infinity };
  const t = tabulated(j.z, j.j, 'emissivity table');
  return { fn: t, zTop: j.z[j.z.length - 1] };
}

export interface SkyIntensity {
  /** Bolometric intensity, nW m⁻² sr⁻¹. */
  intensity: number;
  /** Upper redshift of the integral actually used. */
  zMax: number;
  /** Static Euclidean sum with the same j(0) out to the Hubble distance c/H0, nW m⁻² sr⁻¹ (for comparison). */
  euclideanToHubbleDistance: number;
}

/**
 * Sky intensity from emissivity j (L_sun Mpc⁻³) up to zMax (default 10; capped at a bounce and at the
 * top of a table), nW m⁻² sr⁻¹. Composite Gauss–Legendre in ln(1+z).
 */
export function skyIntensity(bg: Background, j: Emissivity, opts: { zMax?: number } = {}): SkyIntensity {
  let zMax = opts.zMax ?? 10;
  if (!(zMax > 0) || !Number.isFinite(zMax)) throw new RangeError(`skyIntensity: zMax must be a finite number > 0, got ${zMax}`);
  const { fn, zTop } = emissivityFunction(j);
  if (zMax > zTop) throw new FormulaError('emissivity table', `the table ends at z = ${zTop}, below zMax = ${zMax}`);
  const limit = pastLimit(bg);
  if (zMax > limit.zMax) zMax = limit.zMax;
  const L = Math.log1p(zMax);
  const pieces = Math.max(8, Math.ceil(L * 16));
  // dz/((1+z)² E) = d ln(1+z) / ((1+z) E)
  const integral = integrateGL((u) => {
    const z = Math.expm1(u);
    const jz = fn(z);
    if (!Number.isFinite(jz)) throw new FormulaError('emissivity j(z)', `gives ${jz} at z = ${z}`);
    return jz / ((1 + z) * Math.sqrt(bg.E2(1 / (1 + z))));
  }, 0, L, pieces, 12);
  const dH = C_KM_S / bg.H0; // Mpc
  return {
    intensity: (dH * integral / (4 * Math.PI)) * TO_NW,
    zMax,
    euclideanToHubbleDistance: euclideanSkyIntensity(fn(0), dH),
  };
}

/**
 * Static Euclidean sky intensity from a uniform emissivity j0 (L_sun Mpc⁻³) out to radius R (Mpc):
 * I = j0 R/(4π) (each shell contributes j0 dr whatever its radius), nW m⁻² sr⁻¹. Diverges as R → ∞.
 */
export function euclideanSkyIntensity(j0: number, rMpc: number): number {
  if (!(rMpc >= 0) || !Number.isFinite(rMpc)) throw new RangeError(`euclideanSkyIntensity: radius must be a finite number ≥ 0 Mpc, got ${rMpc}`);
  return (j0 * rMpc / (4 * Math.PI)) * TO_NW;
}
