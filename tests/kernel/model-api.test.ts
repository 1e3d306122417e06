/**
 * The public model API of server/kernel/index.ts as the kernel issue specifies it: vectorised methods
 * (number → number, number[] / Float64Array → Float64Array), immutable serialisable models, h units,
 * warnings, and the physics modules reachable as lazily cached methods. Values are checked against
 * closed forms where one exists (Einstein–de Sitter growth D = a, f = 1: Peebles 1980 §11, from memory;
 * h-unit conversion by definition).
 */
import { describe, expect, it } from 'vitest';
import { universe, VECTOR_METHODS, INVERSE_METHODS, KERNEL_VERSION, UnreachableRedshiftError } from '../../server/kernel/index';

describe('vectorised methods', () => {
  const m = universe({ H0: 67.7, omegaM: 0.31, mNu: [0.06] });
  it('every listed method maps a number to a number and an array to a Float64Array of the same length', () => {
    for (const name of VECTOR_METHODS) {
      const f = (m as unknown as Record<string, (z: unknown) => unknown>)[name].bind(m);
      const one = f(0.7);
      expect(typeof one, name).toBe('number');
      const arr = f([0.1, 0.7, 2]) as Float64Array;
      expect(arr, name).toBeInstanceOf(Float64Array);
      expect(arr.length).toBe(3);
      const rel = (v: number) => (one === 0 ? Math.abs(v) : Math.abs(v / (one as number) - 1));
      expect(rel(arr[1]), name).toBeLessThan(1e-12);
      const typed = f(new Float64Array([0.7])) as Float64Array;
      expect(rel(typed[0]), name).toBeLessThan(1e-12);
      expect((f([]) as Float64Array).length).toBe(0);
    }
    for (const name of INVERSE_METHODS) {
      const f = (m as unknown as Record<string, (v: unknown) => unknown>)[name].bind(m);
      expect(typeof f(1), name).toBe('number');
      expect(f([1, 2]), name).toBeInstanceOf(Float64Array);
    }
  });
  it('results do not depend on the order or the number of redshifts asked', () => {
    const z = [2, 0.1, 1100, 0.5, 0.5];
    const a = universe({ H0: 67.7, omegaM: 0.31 }).luminosityDistance(z);
    z.forEach((zi, i) => expect(Math.abs(a[i] / universe({ H0: 67.7, omegaM: 0.31 }).luminosityDistance(zi) - 1)).toBeLessThan(1e-12));
  });
  it('angularDiameterDistanceBetween broadcasts a number against an array and refuses unequal lengths', () => {
    const between = m.angularDiameterDistanceBetween(0, [0.5, 1]) as Float64Array;
    const da = m.angularDiameterDistance([0.5, 1]);
    expect(Math.abs(between[1] / da[1] - 1)).toBeLessThan(1e-12); // from z1 = 0 it is D_A (Hogg 1999 eq. 19)
    expect(() => m.angularDiameterDistanceBetween([0, 1], [1, 2, 3])).toThrow(/same length/);
  });
  it('bad redshifts throw clear errors, never NaN', () => {
    expect(() => m.comovingDistance([0.1, Number.NaN])).toThrow(/z\[1\] must be a finite number/);
    expect(() => m.age(-2)).toThrow(UnreachableRedshiftError);
    expect(() => m.luminosityDistance('1' as unknown as number)).toThrow(TypeError);
    expect(() => m.redshiftAtComovingDistance(1e6)).toThrow(/outside what the model reaches/);
    expect(() => m.redshiftAtAge(1e5)).toThrow(/outside what the model reaches/);
    expect(m.redshiftAtAge(100)).toBeLessThan(0); // a time in the future is a negative redshift
  });
});

describe('immutability, serialisation, units', () => {
  it('toJSON/fromJSON give the same model and record the kernel version', () => {
    const m = universe({ H0: 70, omegaM: 0.3, w: '-0.9 + 0.1*(1 - a)' });
    const j = m.toJSON();
    expect(j.kernelVersion).toBe(KERNEL_VERSION);
    const back = universe.fromJSON(j);
    expect(back.comovingDistance(2)).toBe(m.comovingDistance(2));
    expect(() => { (m.params as { H0: number }).H0 = 1; }).toThrow(TypeError);
  });
  it('Mpc ↔ Mpc/h by the definition h = H0/100', () => {
    const m = universe({ H0: 67.5, omegaM: 0.3 });
    expect(m.toMpcPerH(100)).toBeCloseTo(67.5, 12);
    expect(m.fromMpcPerH(67.5)).toBeCloseTo(100, 12);
    expect(m.hubbleDistance).toBeCloseTo(299792.458 / 67.5, 10);
  });
});

describe('physics modules on the model', () => {
  it('growth in Einstein–de Sitter: D = a (normalize early), D(0) = 1 (today), f = 1', () => {
    const m = universe({ H0: 70, omegaM: 1, Tcmb: 0 });
    const z = [0, 1, 9];
    const early = m.growthFactor(z, { normalize: 'early' });
    const today = m.growthFactor(z);
    z.forEach((zi, i) => {
      expect(Math.abs(early[i] * (1 + zi) - 1)).toBeLessThan(1e-8);
      expect(Math.abs(today[i] * (1 + zi) - 1)).toBeLessThan(1e-8);
    });
    for (const f of m.growthRate(z)) expect(Math.abs(f - 1)).toBeLessThan(1e-8);
    expect(Math.abs(m.fSigma8(0, 0.8) - 0.8)).toBeLessThan(1e-8);
  });
  it('history, Raychaudhuri residual, energy conditions, equality, warnings are available and cached', () => {
    const m = universe({ H0: 67.7, omegaM: 0.31, mNu: [0.06], neutrinoModel: 'fitting' });
    expect(m.history()).toBe(m.history());
    expect(Math.abs(m.history().ageGyr / m.age(0) - 1)).toBeLessThan(1e-8); // two independent integrations of the same model
    expect(m.raychaudhuriResidual().maxRelative).toBeLessThan(1e-6);
    expect(m.energyConditions({ zMax: 5 }).total.strong.holds).toBe(false); // Λ violates the strong condition
    expect(m.equalityRedshift()).toBeGreaterThan(3000);
    const codes = m.warnings({ zMax: 100 }).map((w) => w.code);
    expect(codes).toContain('neutrino_fitting_form');
    expect(codes).toContain('growth_massive_neutrinos');
    expect(universe({ H0: 70, omegaM: 0.3, Tcmb: 0 }).warnings()).toEqual([]);
  });
  it('χ² of a model against its own distance moduli is 0 with the offset marginalised', () => {
    const m = universe({ H0: 70, omegaM: 0.3 });
    const z = [0.1, 0.5, 1];
    const mu = Array.from(m.distanceModulus(z)).map((v) => v + 0.3);
    const r = m.chi2('distanceModulus', { z, value: mu, sigma: [0.1, 0.1, 0.1] });
    expect(r.chi2).toBeLessThan(1e-12);
    expect(Math.abs((r.offset as number) - 0.3)).toBeLessThan(1e-9);
  });
});
