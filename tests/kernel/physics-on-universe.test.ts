import { describe, it, expect } from 'vitest';
import { universe } from '../../server/kernel/index';
import { equalityRedshift } from '../../server/kernel/thermal';
import { solveHistory, pastLimit } from '../../server/kernel/history';
import { solveGrowth } from '../../server/kernel/growth';
import { raychaudhuriResidual } from '../../server/kernel/raychaudhuri';
import { growthCautions, bounceCaution } from '../../server/kernel/cautions';

// Planck 2018 results VI (A&A 641, A6), Table 2, column TT,TE,EE+lowE+lensing: ω_b = 0.02237,
// ω_c = 0.1200, H0 = 67.36, one massive neutrino of 0.06 eV, N_eff = 3.046; age 13.797 ± 0.023 Gyr,
// z_eq = 3402 ± 26.
const h = 0.6736;
const planck = () => universe({ H0: 67.36, omegaM: (0.02237 + 0.12) / h ** 2, omegaB: 0.02237 / h ** 2, mNu: [0.06], Tcmb: 2.7255, Neff: 3.046 });

describe('physics modules on the kernel’s own backgrounds (universe())', () => {
  it('age from integrating a(t) in cosmic time equals the core’s age quadrature (independent methods) to 1e-10, and Planck 2018 Table 2 to its digits', () => {
    const u = planck();
    const hist = solveHistory(u.background);
    expect(Math.abs(hist.ageGyr / (u.age(0) as number) - 1)).toBeLessThan(1e-10);
    expect(hist.ageGyr.toFixed(3)).toBe('13.797');
  });

  it('z_eq from the model’s densities is within 0.1 % of Planck 2018 Table 2 (3402; a posterior mean, not the value at the mean parameters)', () => {
    const z = equalityRedshift(planck().background)!;
    expect(Math.abs(z / 3402 - 1)).toBeLessThan(1e-3);
  });

  it('growth with a massive neutrino carries the scale-dependence caution; the Raychaudhuri residual stays small with real components', () => {
    const u = planck();
    const g = solveGrowth(u.background);
    expect(g.warnings.map((w) => w.code)).toContain('growth_massive_neutrinos');
    expect(growthCautions(u.background, 5000).map((w) => w.code)).toContain('growth_radiation_era');
    expect(g.warningsFor([0, 1, 2]).map((w) => w.code)).not.toContain('growth_radiation_era');
    expect(g.warningsFor([0, 800]).map((w) => w.code)).toContain('growth_radiation_era'); // ρ_r/ρ_m ≈ 0.24 at z = 800
    expect(raychaudhuriResidual(u.background).maxRelative).toBeLessThan(1e-8);
  });

  it('a closed model with a large Λ bounces; redshifts past the bounce get a caution', () => {
    const u = universe({ H0: 70, omegaM: 0.01, omegaDE: 1.6, Tcmb: 0 });
    const lim = pastLimit(u.background);
    expect(lim.kind).toBe('bounce');
    expect(bounceCaution(lim.zMax + 0.1, lim)!.code).toBe('redshift_past_bounce');
    expect(bounceCaution(lim.zMax / 2, lim)!.code).toBe('redshift_before_bounce_ambiguous');
    expect(bounceCaution(1, pastLimit(planck().background))).toBeNull();
  });
});
