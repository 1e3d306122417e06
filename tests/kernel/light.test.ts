import { describe, it, expect } from 'vitest';
import { makeBackground } from './helpers';
import { skyIntensity, euclideanSkyIntensity, L_SUN_W } from '../../server/kernel/light';
import { C_KM_S, MPC_M } from '../../server/kernel/constants';

const toNW = (L_SUN_W / (MPC_M * MPC_M)) * 1e9;

describe('background light', () => {
  it('EdS with constant j: I = (c/H0)(j/4π)(2/5)(1 − (1+Z)^(−5/2)) (closed form of the light-cone integral), to 1e-12', () => {
    const H0 = 70, j = 1e8; // L_sun Mpc⁻³, a typical local luminosity density (order of magnitude, common practice)
    const bg = makeBackground({ H0, omegaM: 1 });
    for (const Z of [0.5, 3, 10, 50]) {
      const r = skyIntensity(bg, j, { zMax: Z });
      const exact = (C_KM_S / H0) * (j / (4 * Math.PI)) * 0.4 * (1 - Math.pow(1 + Z, -2.5)) * toNW;
      expect(Math.abs(r.intensity / exact - 1)).toBeLessThan(1e-12);
    }
    // Order of magnitude: j = 1e8 L_sun/Mpc³ gives tens of nW m⁻² sr⁻¹ (the measured extragalactic
    // background is ~ 50–100 nW m⁻² sr⁻¹; Hauser & Dwek 2001, ARA&A 39, 249).
    const I = skyIntensity(bg, j, { zMax: 10 }).intensity;
    expect(I).toBeGreaterThan(5);
    expect(I).toBeLessThan(200);
  });

  it('formula strings and tables give the same integral as the equivalent function', () => {
    const bg = makeBackground({ omegaM: 0.3, omegaDE: 0.7 });
    const viaFn = skyIntensity(bg, (z) => 1e8 * (1 + z) ** 2 * Math.exp(-z / 2), { zMax: 6 }).intensity;
    const viaFormula = skyIntensity(bg, '1e8 * (1 + z)^2 * exp(-z/2)', { zMax: 6 }).intensity;
    expect(Math.abs(viaFormula / viaFn - 1)).toBeLessThan(1e-14);
    const zs = Array.from({ length: 601 }, (_, i) => i * 0.01);
    const table = { z: zs, j: zs.map((z) => 1e8 * (1 + z) ** 2 * Math.exp(-z / 2)) };
    expect(Math.abs(skyIntensity(bg, table, { zMax: 6 }).intensity / viaFn - 1)).toBeLessThan(1e-5);
    expect(() => skyIntensity(bg, table, { zMax: 7 })).toThrow(/table ends at z = 6/);
    expect(() => skyIntensity(bg, 'import("x")')).toThrow(/emissivity/);
  });

  it('the static Euclidean sum j R/(4π) grows without bound while the expanding sky converges (dark-sky comparison)', () => {
    const j = 1e8;
    expect(euclideanSkyIntensity(j, 1000)).toBeCloseTo((j * 1000 / (4 * Math.PI)) * toNW, 10);
    expect(euclideanSkyIntensity(j, 2e4) / euclideanSkyIntensity(j, 1e4)).toBeCloseTo(2, 14);
    const bg = makeBackground({ omegaM: 0.3, omegaDE: 0.7 });
    const I10 = skyIntensity(bg, j, { zMax: 10 }).intensity, I1000 = skyIntensity(bg, j, { zMax: 1000 }).intensity;
    expect(I1000 / I10 - 1).toBeLessThan(0.01);
    expect(skyIntensity(bg, j).euclideanToHubbleDistance).toBeGreaterThan(I1000);
    expect(() => euclideanSkyIntensity(j, -1)).toThrow(/radius/);
  });
});
