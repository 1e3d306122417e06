import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { makeBackground, type SimpleModel } from './helpers';
import { solveGrowth } from '../../server/kernel/growth';
import { solveHistory } from '../../server/kernel/history';
import { integrateGL } from '../../server/kernel/ode';

const rel = (x: number, y: number) => Math.abs(x / y - 1);
const num = (x: number | Float64Array) => x as number;

describe('linear growth', () => {
  it('Einstein–de Sitter: growing mode D ∝ a ∝ t^(2/3), decaying mode ∝ a^(−3/2) ∝ 1/t, f = 1 (analytic), to 1e-9', () => {
    const bg = makeBackground({ omegaM: 1 });
    const g = solveGrowth(bg);
    const h = solveHistory(bg);
    const t0 = h.ageGyr;
    for (const frac of [1e-3, 0.01, 0.2, 0.7, 1]) {
      const a = h.scaleFactorAt(frac * t0);
      const z = 1 / a - 1;
      expect(rel(num(g.D(z)), Math.pow(frac, 2 / 3))).toBeLessThan(1e-9);
      expect(rel(num(g.D(z, 'early')), a)).toBeLessThan(1e-9);
      expect(rel(num(g.decaying(z)), 1 / frac)).toBeLessThan(1e-9);
      expect(Math.abs(num(g.f(z)) - 1)).toBeLessThan(1e-9);
    }
  });

  it('Heath (1977) integral D = (5Ω_m/2) E ∫₀^a da/(aE)³ for w = −1 with any curvature, to 1e-8; decaying mode ∝ H only up to a growing admixture', () => {
    for (const m of [
      { omegaM: 0.3, omegaDE: 0.7 },
      { omegaM: 0.3 },
      { omegaM: 0.5, omegaDE: 0.8 },
      { omegaM: 0.2, omegaDE: 0.5 },
      { omegaM: 1.3, omegaDE: 0.1 },
    ] as SimpleModel[]) {
      const bg = makeBackground(m);
      const g = solveGrowth(bg);
      const E = (a: number) => Math.sqrt(bg.E2(a));
      for (const z of [0, 0.5, 1, 3, 20]) {
        const a = 1 / (1 + z);
        // a' = a u²: the integrand becomes smooth at u = 0.
        const I = integrateGL((u) => (u === 0 ? 0 : (2 * a * u) / Math.pow(a * u * u * E(a * u * u), 3)), 0, 1, 16, 16);
        const heath = 2.5 * m.omegaM! * E(a) * I;
        expect(rel(num(g.D(z, 'early')), heath)).toBeLessThan(1e-8);
      }
    }
  });

  it('for w = −1 (any curvature) the decaying mode lies in span{H, D₊} (Heath 1977: H itself solves the growth equation), to 1e-8', () => {
    for (const m of [{ omegaM: 0.3, omegaDE: 0.7 }, { omegaM: 0.4, omegaDE: 0.8 }, { omegaM: 0.3 }] as SimpleModel[]) {
      const bg = makeBackground(m);
      const g = solveGrowth(bg);
      const E = (z: number) => Math.sqrt(bg.E2(1 / (1 + z)));
      // Fit D₋ = αE + βD₊ at two redshifts, then check three others.
      const [z1, z2] = [0.2, 3];
      const d1 = num(g.decaying(z1)), d2 = num(g.decaying(z2)), p1 = num(g.D(z1)), p2 = num(g.D(z2));
      const det = E(z1) * p2 - E(z2) * p1;
      const alpha = (d1 * p2 - d2 * p1) / det, beta = (E(z1) * d2 - E(z2) * d1) / det;
      for (const z of [0, 1, 10]) expect(rel(num(g.decaying(z)), alpha * E(z) + beta * num(g.D(z)))).toBeLessThan(1e-8);
      expect(Math.abs(alpha)).toBeGreaterThan(0.1); // a genuine second solution, not a multiple of D₊
    }
  });

  it('Carroll, Press & Turner (1992, ARA&A 30, 499, eq. 29) approximation to ~1 % (their stated accuracy, from memory) for flat and open models', () => {
    for (const m of [{ omegaM: 0.3, omegaDE: 0.7 }, { omegaM: 0.25, omegaDE: 0.75 }, { omegaM: 0.3 }, { omegaM: 0.5, omegaDE: 0.5 }] as SimpleModel[]) {
      const bg = makeBackground(m);
      const g = solveGrowth(bg);
      for (const z of [0, 0.5, 1, 2]) {
        const a = 1 / (1 + z);
        const e2 = bg.E2(a);
        const om = (m.omegaM! / a ** 3) / e2, ol = (m.omegaDE ?? 0) / e2;
        const cpt = a * 2.5 * om / (Math.pow(om, 4 / 7) - ol + (1 + om / 2) * (1 + ol / 70));
        expect(rel(num(g.D(z, 'early')), cpt)).toBeLessThan(0.01);
      }
    }
  });

  it('f ≈ Ω_m(a)^0.55 for ΛCDM (Linder 2005, PRD 72, 043529) to 1 % in f for 0.25 ≤ Ω_m ≤ 0.35 (its known accuracy, from memory)', () => {
    for (const om0 of [0.25, 0.3, 0.35]) {
      const bg = makeBackground({ omegaM: om0, omegaDE: 1 - om0 });
      const g = solveGrowth(bg);
      const zs = [0, 0.3, 0.7, 1.5, 3];
      const f = g.f(zs) as Float64Array;
      zs.forEach((z, i) => {
        const a = 1 / (1 + z);
        const om = (om0 / a ** 3) / bg.E2(a);
        expect(rel(f[i], Math.pow(om, 0.55))).toBeLessThan(0.01);
      });
    }
  });

  it('agrees with scipy solve_ivp (DOP853, rtol 1e-13) from tests/reference/growth-reference.json to 1e-7', () => {
    const ref = JSON.parse(readFileSync(new URL('../reference/growth-reference.json', import.meta.url), 'utf8')) as {
      models: { model: SimpleModel & { name: string }; rows: { z: number; Dearly: number; Dtoday: number; f: number }[] }[];
    };
    expect(ref.models.length).toBeGreaterThanOrEqual(6);
    let worst = 0;
    for (const { model, rows } of ref.models) {
      const g = solveGrowth(makeBackground(model));
      const zs = rows.map((r) => r.z);
      const De = g.D(zs, 'early') as Float64Array, Dt = g.D(zs, 'today') as Float64Array, f = g.f(zs) as Float64Array;
      rows.forEach((r, i) => {
        for (const [x, y] of [[De[i], r.Dearly], [Dt[i], r.Dtoday], [f[i], r.f]]) worst = Math.max(worst, rel(x, y));
      });
    }
    expect(worst).toBeLessThan(1e-7);
  });

  it('fSigma8 = f σ8 D(z)/D(0), vectorised; bad σ8 refused', () => {
    const g = solveGrowth(makeBackground({ omegaM: 0.3, omegaDE: 0.7 }));
    const zs = new Float64Array([0, 0.5, 1]);
    const fs8 = g.fSigma8(zs, 0.8) as Float64Array;
    const f = g.f(zs) as Float64Array, D = g.D(zs) as Float64Array;
    for (let i = 0; i < 3; i++) expect(fs8[i]).toBeCloseTo(f[i] * 0.8 * D[i], 14);
    expect(() => g.fSigma8(0, -1)).toThrow(/sigma8/);
    expect(() => g.D(-2)).toThrow(/z must be > −1/);
  });

  it('models that recollapse have no decaying mode defined by the far future; a bouncing model has no early normalisation', () => {
    const closed = solveGrowth(makeBackground({ omegaM: 2 }));
    expect(() => closed.decaying(0.5)).toThrow(/recollapses/);
    const bounce = solveGrowth(makeBackground({ omegaM: 0.01, omegaDE: 1.6, omegaK: -0.61 }));
    expect(() => bounce.D(0, 'early')).toThrow(/bounces/);
    expect(bounce.warnings.map((w) => w.code)).toContain('growth_after_bounce');
  });
});
