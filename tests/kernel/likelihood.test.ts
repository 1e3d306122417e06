import { describe, it, expect } from 'vitest';
import { chi2, chi2Prediction, cholesky, LikelihoodInputError, type PredictingModel } from '../../server/kernel/likelihood';
import { integrateGL } from '../../server/kernel/ode';

// A stand-in model with simple closed-form predictions (the real one is universe() in index.ts).
const model: PredictingModel = {
  distanceModulus: (z) => z.map((x) => 40 + 5 * Math.log10(x)),
  H: (z) => z.map((x) => 70 * (1 + x)),
  fSigma8: (z, s8) => z.map((x) => 0.5 * s8 / (1 + x)),
};

describe('χ² against measured tables', () => {
  it('H(z) with σ: hand-computed Σ((d − m)/σ)²', () => {
    const r = chi2(model, 'hubble', { z: [0, 1], value: [72, 137], sigma: [2, 5] });
    // ((72−70)/2)² + ((137−140)/5)² = 1 + 0.36 (hand computation)
    expect(r.chi2).toBeCloseTo(1.36, 12);
    expect(r.dof).toBe(2);
  });

  it('f σ8 with a 2×2 covariance: hand-computed rᵀC⁻¹r', () => {
    const s8 = 0.8;
    const z = [0, 1], pred = [0.4, 0.2];
    const value = [0.45, 0.18];
    const cov = [[0.01, 0.002], [0.002, 0.0025]];
    const r = [value[0] - pred[0], value[1] - pred[1]];
    const det = cov[0][0] * cov[1][1] - cov[0][1] ** 2;
    const hand = (cov[1][1] * r[0] ** 2 - 2 * cov[0][1] * r[0] * r[1] + cov[0][0] * r[1] ** 2) / det; // 2×2 inverse (algebra)
    expect(chi2(model, 'fSigma8', { z, value, cov }, { sigma8: s8 }).chi2).toBeCloseTo(hand, 12);
    expect(chi2(model, 'fSigma8', { z, value, cov: cov.flat() }, { sigma8: s8 }).chi2).toBeCloseTo(hand, 12);
    expect(() => chi2(model, 'fSigma8', { z, value, cov })).toThrow(/sigma8/);
  });

  it('distance modulus: analytic marginalisation over M (Goliath et al. 2001) equals brute-force numerical marginalisation', () => {
    const z = [0.05, 0.2, 0.5, 0.9];
    const mu = model.distanceModulus(new Float64Array(z)) as Float64Array;
    const value = Array.from(mu, (m, i) => m + 0.3 + [0.05, -0.1, 0.02, 0.08][i]);
    const cov = [[0.04, 0.01, 0, 0], [0.01, 0.05, 0.005, 0], [0, 0.005, 0.03, 0.002], [0, 0, 0.002, 0.06]];
    const res = chi2(model, 'distanceModulus', { z, value, cov });
    // Brute force: χ²(M) = (d − μ − M)ᵀ C⁻¹ (d − μ − M), minimised and integrated over M numerically.
    const chiAt = (M: number) => chi2Prediction({ z, value, cov }, (zz) => zz.map((_, i) => mu[i] + M), false).chi2;
    let best = Infinity, bestM = 0;
    for (let M = 0; M <= 0.6; M += 1e-5) { const c = chiAt(M); if (c < best) { best = c; bestM = M; } }
    expect(res.chi2).toBeCloseTo(best, 8);
    expect(res.offset!).toBeCloseTo(bestM, 4);
    const L = integrateGL((M) => Math.exp(-0.5 * (chiAt(M) - res.chi2)), res.offset! - 4, res.offset! + 4, 40, 16);
    expect(res.minusTwoLnMarginal!).toBeCloseTo(res.chi2 - 2 * Math.log(L), 9);
    expect(res.dof).toBe(3);
  });

  it('a non-positive-definite covariance is refused with the failing row', () => {
    try {
      chi2(model, 'hubble', { z: [0, 1], value: [70, 140], cov: [[1, 2], [2, 1]] });
      expect.unreachable();
    } catch (e) {
      expect(e).toBeInstanceOf(LikelihoodInputError);
      expect((e as LikelihoodInputError).message).toMatch(/not positive definite/);
      expect((e as LikelihoodInputError).row).toBe(2);
    }
    expect(() => cholesky(new Float64Array([0, 0, 0, 0]), 2)).toThrow(/row 1/);
    expect(() => chi2(model, 'hubble', { z: [0, 1], value: [70, 140], cov: [[1, 0.5], [0.4, 1]] })).toThrow(/not symmetric/);
  });

  it('validates inputs and names the wrong row', () => {
    const bad = (t: Parameters<typeof chi2>[2], re: RegExp) => expect(() => chi2(model, 'hubble', t)).toThrow(re);
    bad({ z: [0, 1], value: [70], sigma: [1, 1] }, /value has 1 rows but z has 2/);
    bad({ z: [0, 1], value: [70, 71], sigma: [1, 0] }, /sigma in row 2 must be > 0/);
    bad({ z: [0, NaN], value: [70, 71], sigma: [1, 1] }, /z in row 2 is not a finite number/);
    bad({ z: [0, -2], value: [70, 71], sigma: [1, 1] }, /z in row 2 must be > −1/);
    bad({ z: [0, 1], value: [70, 71] }, /needs sigma/);
    bad({ z: [], value: [], sigma: [] }, /no rows/);
  });
});
