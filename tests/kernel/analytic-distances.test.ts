/**
 * Distances and times of models with closed-form solutions, to 1e-9 relative.
 * Formulas: Einstein–de Sitter, Milne and de Sitter (e.g. Hogg 1999, astro-ph/9905116, and any
 * cosmology text; Peacock, Cosmological Physics §3); the Mattig (1958) relation for Λ = 0; the open
 * matter-only age (Peebles 1993, eq. 13.10, from memory); the flat ΛCDM age
 * t = 2/(3H0√Ω_Λ) asinh(√(Ω_Λ/Ω_m) (1+z)^(−3/2)) (e.g. Carroll, Press & Turner 1992, from memory); the
 * closed de Sitter bounce a = a_b cosh(√Ω_Λ H0 t) (standard, from memory); T ∝ 1 + z (adiabatic
 * black-body expansion).
 */
import { describe, expect, it } from 'vitest';
import { universe, UnreachableRedshiftError } from '../../server/kernel/index';
import { C_KM_S, MPC_KM, GYR_S } from '../../server/kernel/constants';

const H0 = 70;
const DH = C_KM_S / H0; // Mpc
const TH = MPC_KM / (H0 * GYR_S); // Gyr
const zs = [0.001, 0.01, 0.1, 0.5, 1, 2, 3, 10, 100, 1000];
const many = Array.from({ length: 1500 }, (_, i) => 0.0005 + 999.9995 * (i / 1499) ** 3);
const TOL = 1e-9;

function expectRel(got: ArrayLike<number> | number, want: (z: number) => number, z: number[], tol = TOL, label = '') {
  const g = typeof got === 'number' ? [got] : got;
  z.forEach((zi, i) => {
    const w = want(zi);
    expect(Math.abs(g[i] - w) / Math.abs(w), `${label} z=${zi}: ${g[i]} vs ${w}`).toBeLessThan(tol);
  });
}

describe('Einstein–de Sitter (Ω_m = 1, no radiation): a ∝ t^(2/3)', () => {
  const m = universe({ H0, omegaM: 1, Tcmb: 0 });
  it('D_C = 2c/H0 (1 − (1+z)^(−1/2)), D_L, D_A, volume', () => {
    const dc = (z: number) => 2 * DH * (1 - 1 / Math.sqrt(1 + z));
    expectRel(m.comovingDistance(zs), dc, zs, TOL, 'D_C');
    expectRel(m.comovingDistance(many), dc, many, TOL, 'D_C grid');
    expectRel(m.luminosityDistance(zs), (z) => (1 + z) * dc(z), zs, TOL, 'D_L');
    expectRel(m.angularDiameterDistance(zs), (z) => dc(z) / (1 + z), zs, TOL, 'D_A');
    expectRel(m.comovingVolume(zs), (z) => (4 / 3) * Math.PI * dc(z) ** 3, zs, TOL, 'V_C');
    expectRel(m.differentialComovingVolume(zs), (z) => (DH * dc(z) ** 2) / (1 + z) ** 1.5, zs, TOL, 'dV/dz');
  });
  it('t = (2/3H0)(1+z)^(−3/2), H = 2/(3t), lookback, conformal time η = (2/H0)(1+z)^(−1/2)', () => {
    const t = (z: number) => (2 / 3) * TH * (1 + z) ** -1.5;
    expectRel(m.age(zs), t, zs, TOL, 'age');
    expectRel(m.age(many), t, many, TOL, 'age grid');
    expectRel(m.lookbackTime(zs), (z) => t(0) - t(z), zs, TOL, 'lookback');
    expectRel(m.conformalTime(zs), (z) => 2 * TH / Math.sqrt(1 + z), zs, TOL, 'η');
    expectRel(m.particleHorizon(zs), (z) => 2 * DH / Math.sqrt(1 + z), zs, TOL, 'horizon');
    const H = m.H(zs), age = m.age(zs);
    // H [km/s/Mpc] · t [Gyr] in units of H0 t_H: = 2/3.
    zs.forEach((z, i) => expect(Math.abs((H[i] / H0) * (age[i] / TH) - 2 / 3)).toBeLessThan(1e-9));
  });
  it('q = 1/2 and Ω_m(z) = 1', () => {
    for (const q of m.decelerationParameter(zs)) expect(q).toBeCloseTo(0.5, 12);
    for (const o of m.omegaMatter(zs)) expect(o).toBeCloseTo(1, 12);
  });
  it('inverses: z(D_C), z(t), z(t_L) recover the analytic redshifts', () => {
    const z = [0.01, 0.3, 1, 4, 50];
    const dc = z.map((v) => 2 * DH * (1 - 1 / Math.sqrt(1 + v)));
    expectRel(m.redshiftAtComovingDistance(dc), (v) => v, z, 1e-9, 'z(D_C)');
    expectRel(m.redshiftAtAge(z.map((v) => (2 / 3) * TH * (1 + v) ** -1.5)), (v) => v, z, 1e-9, 'z(t)');
    expectRel(m.redshiftAtLookbackTime(z.map((v) => (2 / 3) * TH * (1 - (1 + v) ** -1.5))), (v) => v, z, 1e-9, 'z(t_L)');
    expectRel(m.redshiftAtLuminosityDistance(z.map((v) => 2 * DH * (1 + v) * (1 - 1 / Math.sqrt(1 + v)))), (v) => v, z, 1e-9, 'z(D_L)');
  });
});

describe('Milne (empty, Ω_k = 1): E = 1 + z', () => {
  const m = universe({ H0, omegaM: 0, omegaK: 1, Tcmb: 0 });
  it('D_C = (c/H0) ln(1+z), D_L = (c/H0) z (1 + z/2), t = 1/(H0(1+z))', () => {
    expectRel(m.E(zs), (z) => 1 + z, zs, 1e-12, 'E');
    expectRel(m.comovingDistance(zs), (z) => DH * Math.log1p(z), zs, TOL, 'D_C');
    expectRel(m.luminosityDistance(zs), (z) => DH * z * (1 + z / 2), zs, TOL, 'D_L');
    expectRel(m.luminosityDistance(many), (z) => DH * z * (1 + z / 2), many, TOL, 'D_L grid');
    expectRel(m.age(zs), (z) => TH / (1 + z), zs, TOL, 'age');
    expectRel(m.lookbackTime(zs), (z) => (TH * z) / (1 + z), zs, TOL, 'lookback');
    expect(m.conformalTime(1)).toBe(Infinity); // ∫ dt/a diverges at the bang of an empty model
    for (const q of m.decelerationParameter(zs)) expect(Math.abs(q)).toBeLessThan(1e-12);
  });
  it('inverse of D_L: z = √(1 + 2 D H0/c) − 1', () => {
    const d = [10, 300, 5000, 40000];
    const got = m.redshiftAtLuminosityDistance(d);
    d.forEach((v, i) => expect(Math.abs(got[i] / (Math.sqrt(1 + (2 * v) / DH) - 1) - 1)).toBeLessThan(1e-9));
  });
});

describe('de Sitter (Ω_Λ = 1): E = 1', () => {
  const m = universe({ H0, omegaM: 0, Tcmb: 0 });
  it('D_C = cz/H0, D_L = cz(1+z)/H0, t_L = ln(1+z)/H0, infinite age, q = −1', () => {
    expectRel(m.comovingDistance(zs), (z) => DH * z, zs, TOL, 'D_C');
    expectRel(m.luminosityDistance(zs), (z) => DH * z * (1 + z), zs, TOL, 'D_L');
    expectRel(m.lookbackTime(zs), (z) => TH * Math.log1p(z), zs, TOL, 'lookback');
    expectRel(m.lookbackTime(many), (z) => TH * Math.log1p(z), many, TOL, 'lookback grid');
    expect(m.age(0)).toBe(Infinity);
    for (const q of m.decelerationParameter(zs)) expect(q).toBeCloseTo(-1, 12);
    const t = [0.5, 5, 30];
    expectRel(m.redshiftAtLookbackTime(t), (tl) => Math.expm1(tl / TH), t, 1e-9, 'z(t_L)');
  });
});

describe('Mattig (1958) relation for Λ = 0: D_L = 2c/(H0 Ω²) [Ω z + (Ω − 2)(√(1 + Ω z) − 1)]', () => {
  for (const om of [0.05, 0.3, 1, 2, 4]) {
    it(`Ω_m = ${om}${om > 1 ? ' (closed)' : om < 1 ? ' (open)' : ''}`, () => {
      const m = universe({ H0, omegaM: om, omegaDE: 0, Tcmb: 0 });
      const mattig = (z: number) => ((2 * DH) / (om * om)) * (om * z + (om - 2) * (Math.sqrt(1 + om * z) - 1));
      // A closed model's D_L keeps the sign of sin χ: compare where χ < π/√|Ω_k| (all z here).
      expectRel(m.luminosityDistance(zs), mattig, zs, TOL, 'D_L');
      expectRel(m.luminosityDistance(many), mattig, many, TOL, 'D_L grid');
    });
  }
  it('open matter-only age t0 = (1/H0)[1/(1−Ω) − Ω/(2(1−Ω)^(3/2)) arccosh(2/Ω − 1)]', () => {
    const om = 0.3;
    const m = universe({ H0, omegaM: om, omegaDE: 0, Tcmb: 0 });
    const t0 = TH * (1 / (1 - om) - (om / (2 * (1 - om) ** 1.5)) * Math.acosh(2 / om - 1));
    expect(Math.abs(m.age(0) / t0 - 1)).toBeLessThan(TOL);
  });
});

describe('flat ΛCDM without radiation: t(z) = 2/(3H0√Ω_Λ) asinh(√(Ω_Λ/Ω_m)(1+z)^(−3/2))', () => {
  it('age at many redshifts, both evaluation paths', () => {
    const om = 0.3, ol = 0.7;
    const m = universe({ H0, omegaM: om, Tcmb: 0 });
    const t = (z: number) => ((2 * TH) / (3 * Math.sqrt(ol))) * Math.asinh(Math.sqrt(ol / om) * (1 + z) ** -1.5);
    expectRel(m.age(zs), t, zs, TOL, 'age');
    expectRel(m.age(many), t, many, TOL, 'age grid');
    const ages = [0.5, 3, 9, 13];
    expectRel(m.redshiftAtAge(ages.map((v) => t(v))), (v) => v, ages, 1e-9, 'z(t)');
  });
});

describe('closed model: comoving volume of a geodesic ball in the 3-sphere, V = πR³(2ψ − sin 2ψ), ψ = χ/R', () => {
  it('matches past the equator, where the D_M closed form (Hogg 1999 eq. 29) no longer applies', () => {
    const om = 3; // Ω_k = −2: R = (c/H0)/√2
    const m = universe({ H0, omegaM: om, omegaDE: 0, Tcmb: 0 });
    const R = DH / Math.sqrt(-m.omegaK0);
    const z = [0.5, 2, 10, 100, 1000];
    const chi = m.comovingDistance(z);
    const want = (i: number) => { const psi = chi[i] / R; return Math.PI * R ** 3 * (2 * psi - Math.sin(2 * psi)); };
    const got = m.comovingVolume(z);
    z.forEach((_, i) => expect(Math.abs(got[i] / want(i) - 1), `z=${z[i]} ψ=${chi[i] / R}`).toBeLessThan(TOL));
    expect(chi[4] / R).toBeGreaterThan(Math.PI / 2); // the check does go past the equator
  });
});

describe('radiation-only (an extra fluid with w = 1/3): E = (1+z)²', () => {
  it('t = 1/(2H0(1+z)²), D_C = (c/H0) z/(1+z)', () => {
    const m = universe({ H0, omegaM: 0, Tcmb: 0, fluids: [{ omega: 1, w: 1 / 3 }] });
    expectRel(m.age(zs), (z) => TH / (2 * (1 + z) ** 2), zs, TOL, 'age');
    expectRel(m.comovingDistance(zs), (z) => (DH * z) / (1 + z), zs, TOL, 'D_C');
    expectRel(m.conformalTime(zs), (z) => TH / (1 + z), zs, TOL, 'η');
    for (const q of m.decelerationParameter(zs)) expect(q).toBeCloseTo(1, 12);
  });
});

describe('closed de Sitter bounce (Ω_Λ = 2, Ω_k = −1): a = a_b cosh(√2 H0 t), a_b = 1/√2', () => {
  const m = universe({ H0, omegaM: 0, omegaK: -1, Tcmb: 0 });
  it('time since the bounce t = arccosh(a/a_b)/(√2 H0); D_C = (c/H0)(π/4 − arccos(1/(√2 a)))', () => {
    const z = [0, 0.1, 0.3, 0.4, 0.414];
    const tb = (v: number) => (TH * Math.acosh(Math.SQRT2 / (1 + v))) / Math.SQRT2;
    expectRel(m.age(z), tb, z, TOL, 'age');
    const dc = (v: number) => DH * (Math.PI / 4 - Math.acos((1 + v) / Math.SQRT2));
    expectRel(m.comovingDistance(z.slice(1)), dc, z.slice(1), TOL, 'D_C');
  });
  it('refuses redshifts beyond the bounce (z_b = √2 − 1) with a clear error', () => {
    expect(() => m.comovingDistance(0.5)).toThrow(UnreachableRedshiftError);
    expect(() => m.luminosityDistance([0.1, 0.5])).toThrow(/bounce at z = 0\.414214/);
    expect(() => m.age(1)).toThrow(UnreachableRedshiftError);
    // The physics module's own scan (history.ts) finds the same end of the past.
    const limit = m.pastLimit();
    expect(limit.kind).toBe('bounce');
    expect(Math.abs(limit.zMax - (Math.SQRT2 - 1))).toBeLessThan(1e-9);
  });
});

describe('reachability', () => {
  it('z ≤ −1 is not a redshift', () => {
    const m = universe({ H0, omegaM: 0.3 });
    expect(() => m.comovingDistance(-1)).toThrow(UnreachableRedshiftError);
    expect(() => m.E([0, -1.5])).toThrow(/z must be > −1/);
    expect(() => m.age(Number.NaN)).toThrow(/finite/);
  });
  it('a closed matter-only model turns around at a = Ω/(Ω − 1): z below −1/Ω is never reached', () => {
    const m = universe({ H0, omegaM: 2, omegaDE: 0, Tcmb: 0 });
    expect(() => m.comovingDistance(-0.6)).toThrow(/turns around at z = -0\.5/);
    expect(Number.isFinite(m.comovingDistance(-0.4))).toBe(true);
  });
});

describe('T ∝ 1 + z', () => {
  it('Tcmb(z) = T0 (1+z) and T_ν = (4/11)^(1/3) T', () => {
    const m = universe({ H0, omegaM: 0.3, Tcmb: 2.7255 });
    expectRel(m.Tcmb(zs), (z) => 2.7255 * (1 + z), zs, 1e-14, 'T');
    expectRel(m.Tnu(zs), (z) => Math.cbrt(4 / 11) * 2.7255 * (1 + z), zs, 1e-14, 'Tν');
  });
});
