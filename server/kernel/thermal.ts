/**
 * Thermal history: the CMB temperature, the effective numbers of relativistic degrees of freedom
 * g*(T) and g*s(T) through e± annihilation, the neutrino temperature, the radiation-era
 * time–temperature relation, and matter–radiation equality of a model.
 *
 * Sources: Kolb & Turner 1990, The Early Universe, §3.3–3.4 (g*, g*s, T_ν/T = (4/11)^(1/3), the
 * relation t = 0.301 g*^(−1/2) m_Pl/T²); Weinberg 2008, Cosmology, §3.1 (e± annihilation with
 * entropy conservation). Instantaneous neutrino decoupling before annihilation (common practice).
 */
import type { Background } from './background';
import { C_M_S, EV_J, G_SI, HBAR, TNU_PER_TCMB } from './constants';
import { brent, integrateGL } from './ode';
import { SETTINGS } from './settings';

type NumOrArray = number | ArrayLike<number>;
function map(x: NumOrArray, f: (x: number) => number): number | Float64Array {
  if (typeof x === 'number') return f(x);
  const out = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) out[i] = f(x[i]);
  return out;
}

/** CMB temperature T(z) = T0 (1 + z), K (adiabatic expansion of a black body; T0 in K). */
export function cmbTemperature(T0: number, z: NumOrArray): number | Float64Array {
  return map(z, (zz) => T0 * (1 + zz));
}

/** Neutrino temperature after e± annihilation, T_ν = (4/11)^(1/3) T0 (1 + z), K (Kolb & Turner §3.4). */
export function neutrinoTemperature(T0: number, z: NumOrArray): number | Float64Array {
  return map(z, (zz) => TNU_PER_TCMB * T0 * (1 + zz));
}

/** Electron rest energy m_e c², MeV (CODATA 2018: 0.51099895000 MeV). */
export const ELECTRON_MASS_MEV = 0.51099895;
/** Muon rest energy, MeV (PDG 2020: 105.6583755 MeV): above ~m_μ/3 the e±/γ/ν counting is incomplete. */
export const MUON_MASS_MEV = 105.6583755;

/**
 * Energy density, pressure of one fermionic d.o.f. of mass m at temperature T, relative to a massless
 * one (x = m/T): ρ̂ = ∫ y² E/(e^E + 1) dy / (7π⁴/120), p̂ = ∫ y⁴/(3E)/(e^E + 1) dy / (7π⁴/360).
 */
function fermionRelative(x: number): { rho: number; p: number } {
  const rho0 = 7 * Math.PI ** 4 / 120;
  const p0 = rho0 / 3;
  // y up to 60 + x: e^(−60) is negligible.
  const top = 60 + x;
  const rho = integrateGL((y) => { const E = Math.sqrt(y * y + x * x); return y * y * E / (Math.exp(E) + 1); }, 0, top, 24, 16);
  const p = integrateGL((y) => { const E = Math.sqrt(y * y + x * x); return y ** 4 / (3 * E) / (Math.exp(E) + 1); }, 0, top, 24, 16);
  return { rho: rho / rho0, p: p / p0 };
}

export interface GStar {
  /** Energy-density degrees of freedom: ρ_rad = (π²/30) g* T⁴ (T the photon temperature). */
  gStar: number;
  /** Entropy degrees of freedom: s = (2π²/45) g*s T³. */
  gStarS: number;
  /** T_ν / T at this temperature. */
  tnuOverT: number;
}

/**
 * g*(T) and g*s(T) for photons (2), three neutrino species (7/8·6 at T_ν) and e± (7/8·4 times the
 * exact Fermi–Dirac suppression for m_e), with T_ν/T from entropy conservation of the γ–e± plasma
 * after neutrino decoupling: (T_ν/T)³ = g_s,γe(T)/(11/2). Limits: 10.75 above annihilation and
 * 3.36 (3.91 for entropy) after it (Kolb & Turner 1990 §3.3). T in MeV, valid for T ≲ m_μ/3 ≈ 35 MeV.
 */
export function gStar(T_MeV: number): GStar {
  if (!(T_MeV > 0) || !Number.isFinite(T_MeV)) throw new RangeError(`gStar: T must be a finite temperature > 0 MeV, got ${T_MeV}`);
  if (T_MeV > MUON_MASS_MEV / 3) throw new RangeError(`gStar: T = ${T_MeV} MeV is above m_μ/3; muons, pions and quarks are not counted here (valid below ${(MUON_MASS_MEV / 3).toFixed(1)} MeV)`);
  const x = ELECTRON_MASS_MEV / T_MeV;
  const fe = x > 200 ? { rho: 0, p: 0 } : fermionRelative(x);
  const sE = (3 * fe.rho + fe.p) / 4; // entropy ∝ (ρ + p)/T, normalised to the massless value (4/3 ρ0)
  const gsGammaE = 2 + (7 / 8) * 4 * sE;
  const tnu3 = gsGammaE / (11 / 2);
  const tnu = Math.cbrt(tnu3);
  return {
    gStar: 2 + (7 / 8) * 4 * fe.rho + (7 / 8) * 6 * tnu3 * tnu,
    gStarS: gsGammaE + (7 / 8) * 6 * tnu3,
    tnuOverT: tnu,
  };
}

/**
 * Radiation-era time–temperature relation t = 1/(2H) with H² = (8πG/3) ρ/c², ρ = g* (π²/30) (kT)⁴/(ħc)³,
 * i.e. t = 0.301 g*^(−1/2) m_Pl/T² ≈ 2.42 g*^(−1/2) (T/MeV)^(−2) s (Kolb & Turner 1990 eq. 3.29).
 * Exact where g* is constant; across e± annihilation it is the usual instantaneous approximation.
 * T in MeV; returns seconds. g* defaults to gStar(T).gStar.
 */
export function timeAtTemperature(T_MeV: NumOrArray, gstar?: number): number | Float64Array {
  return map(T_MeV, (T) => {
    const g = gstar ?? gStar(T).gStar;
    const kT = T * 1e6 * EV_J;
    const rho = g * (Math.PI ** 2 / 30) * kT ** 4 / (HBAR * C_M_S) ** 3; // J/m³
    const H = Math.sqrt((8 * Math.PI * G_SI / 3) * rho / (C_M_S * C_M_S));
    return 1 / (2 * H);
  });
}

/**
 * Redshift of matter–radiation equality from the model's own densities: ρ_m(a) + (1 − 3w_ν) ρ_ν(a) =
 * ρ_γ(a) + 3 w_ν ρ_ν(a), i.e. massive neutrinos split by their pressure into the relativistic part
 * 3p and the rest, as they are at that epoch (definition as in Planck 2018 VI, Table 2's z_eq).
 * Returns null if the model has no radiation or no matter.
 */
export function equalityRedshift(bg: Background): number | null {
  const diff = (lnA: number): number => {
    const a = Math.exp(lnA);
    let m = 0, r = 0;
    for (const c of bg.components) {
      const rho = c.density(a);
      if (c.kind === 'matter') m += rho;
      else if (c.kind === 'photons') r += rho;
      else if (c.kind === 'neutrinos') { const w = c.w(a); r += 3 * w * rho; m += (1 - 3 * w) * rho; }
    }
    return m - r;
  };
  if (!bg.components.some((c) => c.kind === 'photons' || c.kind === 'neutrinos')) return null;
  if (!bg.components.some((c) => c.kind === 'matter' && c.omega0 > 0)) return null;
  const step = 1 / SETTINGS.scanPerLnA;
  let prev = 0;
  if (diff(0) <= 0) return null;
  for (let x = -step; x >= Math.log(SETTINGS.pastScanAMin); x -= step) {
    if (diff(x) <= 0) {
      const lnA = brent(diff, x, prev, SETTINGS.edgeTolerance);
      return Math.exp(-lnA) - 1;
    }
    prev = x;
  }
  return null;
}
