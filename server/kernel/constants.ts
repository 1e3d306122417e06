/**
 * Physical constants and unit conversions used by the kernel, each with its source.
 * One module so that every number the kernel depends on can be audited in one place.
 *
 * Sources:
 *  - CODATA 2018: Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021); the SI defining constants
 *    (c, h, e, k_B) are exact since the 2019 SI redefinition.
 *  - IAU 2012 Resolution B2: the astronomical unit, exact in metres.
 *  - IAU 2015 Resolution B2: the parsec, exactly au · 648000/π.
 *  - IAU 2015 Resolution B3: nominal solar values (GM_sun), used only for the solar mass.
 *  - Julian year: IAU (365.25 days of 86400 s), the year used for Gyr here.
 */

/** Speed of light in vacuum, m/s (exact; CODATA 2018 / SI). */
export const C_M_S = 299_792_458;
/** Speed of light in vacuum, km/s (exact). */
export const C_KM_S = C_M_S / 1000;
/** Newtonian constant of gravitation, m³ kg⁻¹ s⁻² (CODATA 2018, relative uncertainty 2.2e-5). */
export const G_SI = 6.6743e-11;
/** Planck constant, J s (exact; SI 2019). */
export const H_PLANCK = 6.62607015e-34;
/** Reduced Planck constant ħ = h/2π, J s (exact by derivation). */
export const HBAR = H_PLANCK / (2 * Math.PI);
/** Boltzmann constant, J/K (exact; SI 2019). */
export const K_B = 1.380649e-23;
/** Elementary charge, C (exact; SI 2019); 1 eV = this many joules. */
export const EV_J = 1.602176634e-19;
/** Boltzmann constant in eV/K (exact by derivation, k_B / e). */
export const K_B_EV = K_B / EV_J;
/**
 * Stefan–Boltzmann constant σ = 2π⁵ k_B⁴ / (15 h³ c²), W m⁻² K⁻⁴ (exact by derivation from the SI
 * defining constants; CODATA 2018 lists 5.670374419e-8).
 */
export const SIGMA_SB = (2 * Math.PI ** 5 * K_B ** 4) / (15 * H_PLANCK ** 3 * C_M_S ** 2);
/** Radiation constant a_rad = 4σ/c, J m⁻³ K⁻⁴ (definition). */
export const A_RAD = (4 * SIGMA_SB) / C_M_S;

/** Astronomical unit, m (exact; IAU 2012 Resolution B2). */
export const AU_M = 149_597_870_700;
/** Parsec, m (exact; IAU 2015 Resolution B2: 1 pc = au · 648000/π). */
export const PC_M = (AU_M * 648_000) / Math.PI;
/** Megaparsec, m. */
export const MPC_M = PC_M * 1e6;
/** Megaparsec, km. */
export const MPC_KM = PC_M * 1e3;
/** Julian year, s (IAU: 365.25 d of 86400 s). */
export const YEAR_S = 365.25 * 86_400;
/** Gigayear, s (Julian). */
export const GYR_S = 1e9 * YEAR_S;
/** Nominal solar mass parameter GM_sun, m³/s² (IAU 2015 Resolution B3). */
export const GM_SUN = 1.3271244e20;
/** Solar mass, kg (IAU 2015 B3 GM_sun divided by CODATA 2018 G). */
export const M_SUN_KG = GM_SUN / G_SI;
/** Radians per arcsecond (definition). */
export const RAD_PER_ARCSEC = Math.PI / 648_000;

/** Riemann ζ(3) (mathematical constant). */
export const ZETA3 = 1.2020569031595942;

/**
 * Massless-neutrino to photon energy density per effective species, (7/8)(4/11)^(4/3)
 * (Fermi–Dirac vs Bose–Einstein factor 7/8 and the temperature ratio after e± annihilation;
 * e.g. Weinberg, Cosmology (2008) §3.1, or Dodelson, Modern Cosmology eq. 2.80).
 */
export const NU_PER_PHOTON = (7 / 8) * Math.pow(4 / 11, 4 / 3);
/** Neutrino to photon temperature ratio after e± annihilation, (4/11)^(1/3) (same sources). */
export const TNU_PER_TCMB = Math.cbrt(4 / 11);
/** Number of neutrino species sharing N_eff equally (common practice: three). */
export const N_NU_SPECIES = 3;

/**
 * Hubble distance c/H0 in Mpc for H0 in km/s/Mpc (definition; Hogg 1999, astro-ph/9905116, eq. 4).
 */
export function hubbleDistanceMpc(H0: number): number {
  return C_KM_S / H0;
}

/** Hubble time 1/H0 in Gyr for H0 in km/s/Mpc (definition; Hogg 1999 eq. 3). */
export function hubbleTimeGyr(H0: number): number {
  return MPC_KM / (H0 * GYR_S);
}

/**
 * Critical density today ρ_crit,0 = 3H0²/(8πG), kg/m³, for H0 in km/s/Mpc (Friedmann equation).
 */
export function criticalDensity(H0: number): number {
  const H0s = H0 / MPC_KM;
  return (3 * H0s * H0s) / (8 * Math.PI * G_SI);
}

/**
 * Photon density today Ω_γ = a_rad T⁴ / (c² ρ_crit,0) (dimensionless) for T_CMB in K and H0 in
 * km/s/Mpc (black-body energy density, Stefan–Boltzmann law).
 */
export function photonDensity(Tcmb: number, H0: number): number {
  return (A_RAD * Tcmb ** 4) / (C_M_S * C_M_S * criticalDensity(H0));
}
