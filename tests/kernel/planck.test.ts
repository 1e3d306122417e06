/**
 * Published numbers: Planck 2018 results VI (Planck Collaboration, A&A 641, A6, 2020), Table 2, with that
 * paper's base-ΛCDM conventions — one massive neutrino of 0.06 eV, N_eff = 3.046, T_CMB = 2.7255 K
 * (Fixsen 2009) — and the table's mean Ω_b h², Ω_c h², H0 (table values from memory). The table's derived
 * entries are posterior means, not functions of the mean parameters, so each is checked to the digits the
 * table prints where that is within a tenth of its quoted 1σ; θ* and z_eq to a tenth of 1σ.
 * Closed forms for flat ΛCDM without radiation (standard, e.g. Ryden, Introduction to Cosmology §6.2,
 * from memory): q0 = Ω_m/2 − Ω_Λ, z_acc = (2Ω_Λ/Ω_m)^(1/3) − 1.
 */
import { describe, expect, it } from 'vitest';
import { universe } from '../../server/kernel/index';
import { gaussLegendre } from '../../server/kernel/quadrature';
import { C_KM_S, photonDensity } from '../../server/kernel/constants';

interface Column {
  label: string; obh2: number; och2: number; H0: number; zStar: number; zDrag: number;
  age: number; omegaL: number; rStar: number; theta100: number; theta100Sigma: number; rDrag: number; zEq: number; zEqSigma: number;
}
const columns: Column[] = [
  { label: 'TT,TE,EE+lowE+lensing', obh2: 0.02237, och2: 0.1200, H0: 67.36, zStar: 1089.92, zDrag: 1059.94,
    age: 13.797, omegaL: 0.6847, rStar: 144.43, theta100: 1.04110, theta100Sigma: 0.00031, rDrag: 147.09, zEq: 3402, zEqSigma: 26 },
  { label: 'TT,TE,EE+lowE+lensing+BAO', obh2: 0.02242, och2: 0.11933, H0: 67.66, zStar: 1089.80, zDrag: 1060.01,
    age: 13.787, omegaL: 0.6889, rStar: 144.57, theta100: 1.04119, theta100Sigma: 0.00029, rDrag: 147.21, zEq: 3387, zEqSigma: 21 },
];

/** Comoving sound horizon r_s(z) = ∫_z^∞ c_s dz'/H(z'), c_s = c/√(3(1 + R)), R = 3ρ_b/(4ρ_γ) (e.g. Hu & Sugiyama 1996), Mpc. */
function soundHorizon(m: ReturnType<typeof universe>, obh2: number, z: number): number {
  const h = m.H0 / 100;
  const R1 = (3 * obh2) / (h * h) / (4 * photonDensity(m.params.Tcmb, m.H0));
  const rule = gaussLegendre(20), x1 = -Math.log1p(z);
  const xs: number[] = [], ws: number[] = [];
  for (let p = 0; p < 40; p++) {
    const lo = x1 - 20 + p * 0.5;
    for (let i = 0; i < 20; i++) { xs.push(lo + 0.25 * (1 + rule.x[i])); ws.push(0.25 * rule.w[i]); }
  }
  const E = m.E(xs.map((x) => Math.expm1(-x)));
  let s = 0;
  xs.forEach((x, i) => { const a = Math.exp(x); s += (ws[i] / Math.sqrt(3 * (1 + R1 * a))) / (a * E[i]); });
  return (s * C_KM_S) / m.H0;
}

describe('Planck 2018 VI Table 2 (base ΛCDM)', () => {
  for (const c of columns) {
    describe(c.label, () => {
      const h = c.H0 / 100;
      const params = { H0: c.H0, omegaM: (c.obh2 + c.och2) / (h * h), omegaB: c.obh2 / (h * h), mNu: [0.06], Neff: 3.046, Tcmb: 2.7255 };
      const m = universe(params);
      it(`age ${c.age} Gyr`, () => expect(Math.abs(m.age(0) - c.age)).toBeLessThan(0.0005));
      it(`Ω_Λ ${c.omegaL}`, () => expect(Math.abs(m.background.omegaDE0 - c.omegaL)).toBeLessThan(0.00005));
      it(`r* ${c.rStar} Mpc and r_drag ${c.rDrag} Mpc`, () => {
        expect(Math.abs(soundHorizon(m, c.obh2, c.zStar) - c.rStar)).toBeLessThan(0.005);
        expect(Math.abs(soundHorizon(m, c.obh2, c.zDrag) - c.rDrag)).toBeLessThan(0.005);
      });
      it(`100θ* = 100 r*/D_M(z*) = ${c.theta100} (to 0.1σ)`, () => {
        const theta = (100 * soundHorizon(m, c.obh2, c.zStar)) / m.transverseComovingDistance(c.zStar);
        expect(Math.abs(theta - c.theta100)).toBeLessThan(0.1 * c.theta100Sigma);
      });
      it(`z_eq ${c.zEq} (to 0.1σ)`, () => {
        const zeq = m.equalityRedshift();
        expect(zeq).not.toBeNull();
        expect(Math.abs((zeq as number) - c.zEq)).toBeLessThan(0.1 * c.zEqSigma);
      });
      it('the fitting form gives the same age to the table digits', () => {
        const f = universe({ ...params, neutrinoModel: 'fitting' });
        expect(Math.abs(f.age(0) - c.age)).toBeLessThan(0.0005);
      });
    });
  }
});

describe('flat ΛCDM closed forms (no radiation)', () => {
  for (const om of [0.25, 0.3, 0.3153]) {
    it(`Ω_m = ${om}: q0 = Ω_m/2 − Ω_Λ and z_acc = (2Ω_Λ/Ω_m)^(1/3) − 1`, () => {
      const m = universe({ H0: 70, omegaM: om, Tcmb: 0 });
      const ol = 1 - om;
      expect(Math.abs(m.decelerationParameter(0) - (om / 2 - ol))).toBeLessThan(1e-12);
      const zacc = m.accelerationOnsetRedshift();
      expect(zacc).not.toBeNull();
      expect(Math.abs((zacc as number) - (Math.cbrt((2 * ol) / om) - 1))).toBeLessThan(1e-9);
      // q changes sign there (deceleration parameter from the kernel's own background).
      expect(m.decelerationParameter((zacc as number) + 1e-6)).toBeGreaterThan(0);
      expect(m.decelerationParameter((zacc as number) - 1e-6)).toBeLessThan(0);
    });
  }
});
