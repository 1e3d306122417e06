import { describe, it, expect } from 'vitest';
import { makeBackground } from './helpers';
import { solveHistory } from '../../server/kernel/history';
import { raychaudhuriResidual, decelerationParameter, accelerationOnsetRedshift, singularityStatement } from '../../server/kernel/raychaudhuri';
import { hubbleTimeGyr } from '../../server/kernel/constants';
import { SETTINGS } from '../../server/kernel/settings';

describe('Raychaudhuri checks', () => {
  it('residual of dΘ/dt + Θ²/3 = −4πG(ρ+3p) + Λ (Raychaudhuri 1955) along the solved history: integrated form at the ODE tolerance (< 5 historyRtol), pointwise form < 1e-8, Friedmann constraint at the tolerance', () => {
    // The pointwise form uses the derivative of the quartic dense-output polynomial, one order less
    // accurate than the solution itself (Shampine 1986), hence its looser bound.
    for (const m of [
      { omegaM: 0.3, omegaDE: 0.7, omegaR: 9e-5 },
      { omegaM: 1 },
      { omegaM: 2 },
      { omegaM: 0.01, omegaDE: 1.6, omegaK: -0.61 },
      { omegaM: 0.3, omegaDE: 0.7, w0: -0.8, wa: 0.5 },
    ]) {
      const r = raychaudhuriResidual(makeBackground(m));
      expect(r.nChecked).toBeGreaterThan(100);
      expect(r.maxRelative).toBeLessThan(5 * SETTINGS.historyRtol); // seen: 1e-14 … 3e-12
      expect(r.pointwiseMaxRelative).toBeLessThan(1e-8);
      expect(r.friedmannMaxRelative).toBeLessThan(100 * SETTINGS.historyRtol);
    }
  });

  it('a wrong solution fails the check (the residual is not tautological)', () => {
    // Solve one model, check it against another: the residual must be large.
    const h = solveHistory(makeBackground({ omegaM: 0.3, omegaDE: 0.7 }));
    const r = raychaudhuriResidual(makeBackground({ omegaM: 0.35, omegaDE: 0.65 }), h);
    expect(r.maxRelative).toBeGreaterThan(1e-3);
  });

  it('q0 = Ω_m/2 − Ω_Λ and q(z) of flat ΛCDM (closed form from the second Friedmann equation)', () => {
    const bg = makeBackground({ omegaM: 0.3, omegaDE: 0.7 });
    expect(decelerationParameter(bg, 0)).toBeCloseTo(0.15 - 0.7, 14);
    const z = 2, x = 0.3 * (1 + z) ** 3;
    expect((decelerationParameter(bg, [z]) as Float64Array)[0]).toBeCloseTo((x / 2 - 0.7) / (x + 0.7), 14);
  });

  it('acceleration onset z = (2Ω_Λ/Ω_m)^(1/3) − 1 for flat ΛCDM (closed form from ä = 0), to 1e-10; null when decelerating today', () => {
    for (const om of [0.2, 0.3, 0.45]) {
      const z = accelerationOnsetRedshift(makeBackground({ omegaM: om, omegaDE: 1 - om }))!;
      expect(Math.abs(z - (Math.cbrt((2 * (1 - om)) / om) - 1))).toBeLessThan(1e-10);
    }
    expect(accelerationOnsetRedshift(makeBackground({ omegaM: 1 }))).toBeNull();
    // de Sitter accelerates at every time: no onset.
    expect(accelerationOnsetRedshift(makeBackground({ omegaDE: 1 }))).toBeNull();
  });

  it('strong energy condition in the past ⇒ a bang less than 1/H0 ago (Hawking & Ellis 1973 §4.4): EdS age = (2/3)/H0', () => {
    const s = singularityStatement(makeBackground({ H0: 70, omegaM: 1 }));
    expect(s.holds).toBe(true);
    expect(s.ageGyr).toBeLessThan(s.hubbleTimeGyr);
    expect(Math.abs(s.ageGyr / hubbleTimeGyr(70) - 2 / 3)).toBeLessThan(1e-9);
    expect(s.text).toContain('less than 1/H0');
    const open = singularityStatement(makeBackground({ omegaM: 0.3, omegaR: 1e-4 }));
    expect(open.holds).toBe(true);
    expect(open.ageGyr).toBeLessThan(open.hubbleTimeGyr);
  });

  it('ΛCDM breaks the strong condition since the acceleration onset, so no statement follows', () => {
    const s = singularityStatement(makeBackground({ omegaM: 0.3, omegaDE: 0.7 }));
    expect(s.holds).toBe(false);
    expect(s.failsOn).toHaveLength(1);
    expect(s.failsOn[0][0]).toBe(0);
    expect(Math.abs(s.failsOn[0][1] - (Math.cbrt(2 * 0.7 / 0.3) - 1))).toBeLessThan(1e-9);
  });
});
