/**
 * Structured warnings where an approximation, not the numerics, limits a result's accuracy.
 * Calls that are affected return them alongside their numbers; index.ts forwards them.
 */
import type { Background } from './background';
import type { PastLimit } from './history';

export interface KernelWarning {
  /** Stable machine-readable code, e.g. 'growth_massive_neutrinos'. */
  code: string;
  /** One sentence a cosmologist can act on. */
  message: string;
}

/**
 * Cautions for the scale-independent linear growth of growth.ts:
 *  - massive neutrinos free-stream, so real growth is scale dependent; below the free-streaming scale
 *    power is suppressed by roughly ΔP/P ≈ −8 f_ν relative to large scales (Hu, Eisenstein & Tegmark
 *    1998, PRL 80, 5255), a percent-level effect for Σm_ν ~ 0.1 eV;
 *  - at z above ~ a tenth of z_eq radiation perturbations (ignored here, only its background is kept)
 *    affect δ_m at the percent level.
 * `zMaxAsked` is the largest redshift of the call (optional).
 */
export function growthCautions(bg: Background, zMaxAsked?: number): KernelWarning[] {
  const out: KernelWarning[] = [];
  const nu = bg.components.find((c) => c.kind === 'neutrinos');
  const matter = bg.components.find((c) => c.kind === 'matter');
  if (nu && matter) {
    // Massive species behave like matter today: ρ_ν ∝ a⁻³ rather than a⁻⁴ between a = 0.5 and 1.
    const slope = Math.log(nu.density(1) / nu.density(0.5)) / Math.log(2);
    if (slope > -3.5 && nu.omega0 > 0) {
      const fnu = nu.omega0 / (nu.omega0 + matter.omega0);
      out.push({
        code: 'growth_massive_neutrinos',
        message: `massive neutrinos (f_ν = ${fnu.toPrecision(2)}) make growth scale dependent; this D treats them as smooth (the small-scale limit, only cold matter sources growth), while above their free-streaming scale they cluster: the two limits differ by ΔP/P ≈ 8 f_ν ≈ ${(800 * fnu).toPrecision(2)} % in power today`,
      });
    }
  }
  if (zMaxAsked !== undefined && matter) {
    const rad = bg.components.filter((c) => c.kind === 'photons' || c.kind === 'neutrinos');
    const a = 1 / (1 + zMaxAsked);
    const rr = rad.reduce((s, c) => s + c.density(a), 0) / matter.density(a);
    if (rr > 0.01) {
      out.push({
        code: 'growth_radiation_era',
        message: `at z = ${zMaxAsked.toPrecision(4)} radiation is ${(100 * rr).toPrecision(2)} % of matter; the growth equation keeps radiation only in H(z), not its perturbations, so D is good to the percent level there`,
      });
    }
  }
  return out;
}

/** Caution for a redshift beyond, or near, a bounce (where z stops being a coordinate). */
export function bounceCaution(z: number, limit: PastLimit): KernelWarning | null {
  if (limit.kind !== 'bounce') return null;
  if (z > limit.zMax) {
    return { code: 'redshift_past_bounce', message: `z = ${z} is beyond the bounce at z = ${limit.zMax.toPrecision(6)}: the model never reaches it` };
  }
  return {
    code: 'redshift_before_bounce_ambiguous',
    message: `the model bounced at z = ${limit.zMax.toPrecision(6)}: every smaller redshift also occurs in the contracting phase before the bounce; values here are for the expanding branch`,
  };
}

/** Caution when massive neutrinos use the Komatsu et al. (2011, ApJS 192, 18, eq. 26) fitting form. */
export function fittingFormCaution(): KernelWarning {
  return {
    code: 'neutrino_fitting_form',
    message: 'massive neutrino density uses the Komatsu et al. (2011) fitting form, accurate to about 0.2 % in ρ_ν (differs from the exact Fermi–Dirac integral by up to ~2e-6 in distances near z = 1100)',
  };
}
