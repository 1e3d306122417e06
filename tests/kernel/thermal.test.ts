import { describe, it, expect } from 'vitest';
import { makeBackground } from './helpers';
import { cmbTemperature, neutrinoTemperature, gStar, timeAtTemperature, equalityRedshift } from '../../server/kernel/thermal';
import type { Background, Component } from '../../server/kernel/background';

describe('thermal history', () => {
  it('T(z) = T0(1+z) (adiabatic black body) and T_ν = (4/11)^(1/3) T (Kolb & Turner 1990 §3.4)', () => {
    expect(cmbTemperature(2.7255, 1089)).toBeCloseTo(2.7255 * 1090, 10);
    const t = cmbTemperature(2.7255, [0, 1, 9]) as Float64Array;
    expect(Array.from(t)).toEqual([2.7255, 2 * 2.7255, 10 * 2.7255]);
    expect(neutrinoTemperature(2.7255, 0)).toBeCloseTo(1.9454, 4); // 1.945 K today (Kolb & Turner 1990)
    expect(Math.abs((neutrinoTemperature(1, 3) as number) / 4 - Math.cbrt(4 / 11))).toBeLessThan(1e-15);
  });

  it('g* = 10.75 above e± annihilation; 3.36 (3.91 for entropy) after; T_ν/T → (4/11)^(1/3) (Kolb & Turner 1990 §3.3)', () => {
    const hot = gStar(30);
    expect(Math.abs(hot.gStar - 10.75)).toBeLessThan(5e-3); // m_e/T = 0.017 leaves a 3e-4 mass correction
    expect(Math.abs(hot.tnuOverT - 1)).toBeLessThan(1e-3);
    const cold = gStar(1e-3);
    expect(cold.gStar).toBeCloseTo(3.36, 2);
    expect(cold.gStarS).toBeCloseTo(3.91, 2);
    expect(Math.abs(cold.gStar - (2 + (21 / 4) * Math.pow(4 / 11, 4 / 3)))).toBeLessThan(1e-12);
    expect(Math.abs(cold.tnuOverT - Math.cbrt(4 / 11))).toBeLessThan(1e-12);
    // g* falls monotonically through annihilation (physical expectation).
    let prev = Infinity;
    for (const T of [10, 3, 1, 0.5, 0.2, 0.1, 0.05, 0.01]) { const g = gStar(T).gStar; expect(g).toBeLessThan(prev); prev = g; }
    expect(() => gStar(200)).toThrow(/m_μ/);
  });

  it('t(T) = 2.42 g*^(−1/2) (T/MeV)^(−2) s in the radiation era (Kolb & Turner 1990 eq. 3.29, 3 digits)', () => {
    const t1 = timeAtTemperature(1, 10.75) as number;
    expect(Math.abs(t1 / (2.42 / Math.sqrt(10.75)) - 1)).toBeLessThan(2e-3);
    expect(Math.abs((timeAtTemperature(0.1, 10.75) as number) / t1 - 100)).toBeLessThan(1e-9);
    // After annihilation g* = 3.36: t ≈ 1.32 s (T/MeV)^(−2) (Kolb & Turner 1990).
    expect(Math.abs((timeAtTemperature(0.001) as number) * 1e-6 / 1.32 - 1)).toBeLessThan(5e-3);
  });

  it('matter–radiation equality: 1 + z_eq = Ω_m/Ω_r for matter + radiation (algebra), to 1e-10', () => {
    const bg = makeBackground({ omegaM: 0.3, omegaR: 9e-5, omegaDE: 0.7 });
    expect(Math.abs(equalityRedshift(bg)! / (0.3 / 9e-5 - 1) - 1)).toBeLessThan(1e-10);
    expect(equalityRedshift(makeBackground({ omegaM: 1 }))).toBeNull();
  });

  it('massive neutrinos count by their pressure at equality (3p as radiation, ρ − 3p as matter)', () => {
    // A toy neutrino component: w = 1/3 until a = 1e-3, then w = 0 (density continuous at a = 1e-3).
    const base = makeBackground({ omegaM: 0.3, omegaR: 5e-5, omegaDE: 0.7 });
    const nu: Component = {
      name: 'neutrinos', kind: 'neutrinos', omega0: 3e-2,
      density: (a) => (a < 1e-3 ? 3e-5 * a ** -4 : 3e-2 * a ** -3),
      w: (a) => (a < 1e-3 ? 1 / 3 : 0),
    };
    const bg: Background = { ...base, components: [...base.components, nu], E2: (a) => base.E2(a) + nu.density(a), accel: base.accel };
    // Before a = 1e-3 the neutrinos are radiation: z_eq from 0.3 a⁻³ = 8e-5 a⁻⁴.
    expect(Math.abs(equalityRedshift(bg)! / (0.3 / 8e-5 - 1) - 1)).toBeLessThan(1e-10);
  });
});
