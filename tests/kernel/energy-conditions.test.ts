import { describe, it, expect } from 'vitest';
import { makeBackground } from './helpers';
import { energyConditions, conditionMargin } from '../../server/kernel/energy-conditions';

// Expected outcomes follow from the definitions for p = wρ (Hawking & Ellis 1973 §4.3; Visser 1995 ch. 12):
// null ⇔ w ≥ −1; weak ⇔ ρ ≥ 0, w ≥ −1; strong ⇔ w ≥ −1/3 (and w ≥ −1); dominant ⇔ |w| ≤ 1.
describe('energy conditions', () => {
  const bg = makeBackground({ omegaM: 0.3, omegaR: 1e-4, omegaDE: 0.7, fluids: [{ omega: 0.01, w: -1.3 }, { omega: 0.001, w: 2 }] });
  const r = energyConditions(bg, { zMax: 5 });

  it('Λ violates the strong condition only', () => {
    const de = r.components.darkEnergy;
    expect(de.null.holds).toBe(true);
    expect(de.weak.holds).toBe(true);
    expect(de.dominant.holds).toBe(true);
    expect(de.strong.holds).toBe(false);
    expect(de.strong.failsOn).toEqual([[0, 5]]);
  });
  it('w < −1 violates null (hence weak, strong and dominant)', () => {
    const ph = r.components['fluid[0]'];
    for (const k of ['null', 'weak', 'strong', 'dominant'] as const) expect(ph[k].holds).toBe(false);
  });
  it('matter and radiation satisfy all four; w = 2 violates dominant only', () => {
    for (const name of ['matter', 'photons']) for (const k of ['null', 'weak', 'strong', 'dominant'] as const) expect(r.components[name][k].holds).toBe(true);
    const stiff = r.components['fluid[1]'];
    expect(stiff.null.holds && stiff.weak.holds && stiff.strong.holds).toBe(true);
    expect(stiff.dominant.holds).toBe(false);
  });
  it('total of flat ΛCDM fails strong exactly for z < (2Ω_Λ/Ω_m)^(1/3) − 1 (closed form), edge to 1e-9', () => {
    const t = energyConditions(makeBackground({ omegaM: 0.3, omegaDE: 0.7 }), { zMax: 3 }).total;
    expect(t.null.holds && t.weak.holds && t.dominant.holds).toBe(true);
    expect(t.strong.failsOn).toHaveLength(1);
    expect(t.strong.failsOn[0][0]).toBe(0);
    expect(Math.abs(t.strong.failsOn[0][1] - (Math.cbrt(2 * 0.7 / 0.3) - 1))).toBeLessThan(1e-9);
  });
  it('a phantom crossing (CPL w0 = −1.1, wa = 0.5 crosses w = −1 at a = 0.8) gives a null-failure range with the right edge', () => {
    const t = energyConditions(makeBackground({ omegaM: 0.3, omegaDE: 0.7, w0: -1.1, wa: 0.5 }), { zMax: 4 }).components.darkEnergy;
    // w(a) = −1.1 + 0.5(1 − a) < −1 for a > 0.8, i.e. z < 0.25 (algebra).
    expect(t.null.failsOn).toHaveLength(1);
    expect(t.null.failsOn[0][0]).toBe(0);
    expect(Math.abs(t.null.failsOn[0][1] - 0.25)).toBeLessThan(1e-9);
  });
  it('condition margins for single fluids', () => {
    expect(conditionMargin('dominant', 1, 1)).toBe(0);
    expect(conditionMargin('strong', 1, -0.5)).toBeLessThan(0);
    expect(conditionMargin('weak', -1, 2)).toBeLessThan(0);
  });
  it('refuses a bad zMax', () => {
    expect(() => energyConditions(bg, { zMax: -1 })).toThrow(/zMax/);
  });
});
