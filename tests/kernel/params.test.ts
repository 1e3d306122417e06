/**
 * Every validation rule of universe() parameters (server/kernel/params.ts): each bad or inconsistent
 * parameter throws a KernelParamError naming the parameter and the rule. The rules are the kernel's own
 * contract (common practice for the ranges); the sum rule is the Friedmann equation at a = 1.
 */
import { describe, expect, it } from 'vitest';
import { universe, KernelParamError, type UniverseParams } from '../../server/kernel/index';

const ok = { H0: 70, omegaM: 0.3 };

function rejects(p: unknown, param: string, rule: RegExp) {
  let err: unknown;
  try {
    universe(p as UniverseParams);
  } catch (e) {
    err = e;
  }
  expect(err, `expected ${JSON.stringify(p)} to be rejected`).toBeInstanceOf(KernelParamError);
  const e = err as KernelParamError;
  expect(e.param).toBe(param);
  expect(e.rule).toMatch(rule);
  expect(e.message).toContain(param);
}

describe('universe() parameter validation', () => {
  it('accepts a minimal flat model and fills the defaults', () => {
    const m = universe(ok);
    expect(m.params).toMatchObject({ w0: -1, wa: 0, Tcmb: 2.7255, Neff: 3.046, mNu: [], neutrinoModel: 'exact', omegaK: null, omegaDE: null });
    expect(m.omegaK0).toBe(0);
  });
  it('params must be an object', () => {
    rejects(null, 'params', /object/);
    rejects([1, 2], 'params', /object/);
    rejects(70, 'params', /object/);
  });
  it('unknown parameters are refused (catches typos such as Om0)', () => rejects({ ...ok, Om0: 0.3 }, 'Om0', /unknown/));
  it('H0: required, finite, > 0, ≤ 10000', () => {
    rejects({ omegaM: 0.3 }, 'H0', /required/);
    rejects({ ...ok, H0: '70' }, 'H0', /finite number/);
    rejects({ ...ok, H0: Number.NaN }, 'H0', /finite number/);
    rejects({ ...ok, H0: Infinity }, 'H0', /finite number/);
    rejects({ ...ok, H0: 0 }, 'H0', /> 0/);
    rejects({ ...ok, H0: -70 }, 'H0', /> 0/);
    rejects({ ...ok, H0: 2e4 }, 'H0', /at most/);
  });
  it('omegaM: required, finite, ≥ 0', () => {
    rejects({ H0: 70 }, 'omegaM', /required/);
    rejects({ H0: 70, omegaM: -0.1 }, 'omegaM', /≥ 0/);
    rejects({ H0: 70, omegaM: null }, 'omegaM', /finite/);
  });
  it('omegaB: ≥ 0 and part of omegaM', () => {
    rejects({ ...ok, omegaB: -0.01 }, 'omegaB', /≥ 0/);
    rejects({ ...ok, omegaB: 0.4 }, 'omegaB', /not exceed omegaM/);
    expect(universe({ ...ok, omegaB: 0.05 }).params.omegaB).toBe(0.05);
  });
  it('omegaK and omegaDE: at most one; the other follows from the sum rule', () => {
    rejects({ ...ok, omegaK: 0.1, omegaDE: 0.6 }, 'omegaK', /at most one/);
    const m = universe({ ...ok, omegaDE: 0.6, Tcmb: 0 });
    expect(m.omegaK0).toBeCloseTo(0.1, 14);
    const k = universe({ ...ok, omegaK: -0.05, Tcmb: 0 });
    expect(k.background.omegaDE0).toBeCloseTo(0.75, 14);
    rejects({ ...ok, omegaK: 'flat' }, 'omegaK', /finite/);
  });
  it('w0, wa finite; w (custom) excludes w0/wa and is a formula or table', () => {
    rejects({ ...ok, w0: Number.NaN }, 'w0', /finite/);
    rejects({ ...ok, wa: Infinity }, 'wa', /finite/);
    rejects({ ...ok, w: '-0.9', w0: -1 }, 'w', /not both/);
    rejects({ ...ok, w: -0.9 }, 'w', /w0/);
    rejects({ ...ok, w: '  ' }, 'w', /empty/);
    rejects({ ...ok, w: 'a'.repeat(2001) }, 'w', /2000/);
    rejects({ ...ok, w: 'import("fs")' }, 'w', /.+/);
    rejects({ ...ok, w: 'q * a' }, 'w', /unknown symbol 'q'/);
  });
  it('tables: exactly one axis, equal lengths, ≥ 2 rows, finite, increasing, a > 0 / z > −1', () => {
    rejects({ ...ok, w: { values: [1, 2] } }, 'w', /exactly one of a and z/);
    rejects({ ...ok, w: { a: [0.5, 1], z: [0, 1], values: [1, 2] } }, 'w', /exactly one of a and z/);
    rejects({ ...ok, w: { a: [0.5, 1], values: [-1] } }, 'w', /same length/);
    rejects({ ...ok, w: { a: [1], values: [-1] } }, 'w', /at least 2 rows/);
    rejects({ ...ok, w: { a: 'x', values: [-1] } }, 'w.a', /array/);
    rejects({ ...ok, w: { a: [0.5, 1], values: 'y' } }, 'w.values', /array/);
    rejects({ ...ok, w: { a: [0.5, Number.NaN], values: [-1, -1] } }, 'w.a[1]', /finite/);
    rejects({ ...ok, w: { a: [0, 1], values: [-1, -1] } }, 'w.a[0]', /> 0/);
    rejects({ ...ok, w: { z: [-1, 1], values: [-1, -1] } }, 'w.z[0]', /> −1/);
    rejects({ ...ok, w: { a: [1, 0.5], values: [-1, -1] } }, 'w.a', /increasing/);
    rejects({ ...ok, w: { a: [0.5, 1], values: [-1, -1], extra: 1 } }, 'w.extra', /unknown table key/);
    expect(() => universe({ ...ok, w: { z: [0, 1, 3], values: [-1, -0.9, -0.8] } })).not.toThrow();
  });
  it('Tcmb: finite, ≥ 0, ≤ 1000 K', () => {
    rejects({ ...ok, Tcmb: -1 }, 'Tcmb', /≥ 0/);
    rejects({ ...ok, Tcmb: 5000 }, 'Tcmb', /at most/);
  });
  it('Neff: finite, ≥ 0, ≤ 30', () => {
    rejects({ ...ok, Neff: -1 }, 'Neff', /≥ 0/);
    rejects({ ...ok, Neff: 100 }, 'Neff', /at most/);
  });
  it('mNu: at most three masses ≥ 0 and ≤ 100 eV; needs Tcmb > 0 and Neff > 0', () => {
    rejects({ ...ok, mNu: 'light' }, 'mNu', /array/);
    rejects({ ...ok, mNu: [0.1, 0.1, 0.1, 0.1] }, 'mNu', /at most three/);
    rejects({ ...ok, mNu: [0.06, -0.01] }, 'mNu[1]', /≥ 0/);
    rejects({ ...ok, mNu: [1000] }, 'mNu[0]', /at most 100/);
    rejects({ ...ok, mNu: [0.06, Number.NaN] }, 'mNu[1]', /finite/);
    rejects({ ...ok, mNu: [0.06], Tcmb: 0 }, 'mNu', /Tcmb > 0/);
    rejects({ ...ok, mNu: [0.06], Neff: 0 }, 'mNu', /Neff > 0/);
    expect(universe({ ...ok, mNu: 0.06 }).params.mNu).toEqual([0.06]);
    expect(universe({ ...ok, mNu: [0.06, 0, 0] }).params.mNu).toEqual([0.06]); // zero masses are massless species
  });
  it("neutrinoModel: 'exact' or 'fitting'", () => rejects({ ...ok, neutrinoModel: 'approx' }, 'neutrinoModel', /'exact' or 'fitting'/));
  it('fluids: an array (≤ 16) of {omega, w | density, name}', () => {
    rejects({ ...ok, fluids: { omega: 0.1 } }, 'fluids', /array/);
    rejects({ ...ok, fluids: Array.from({ length: 17 }, () => ({ omega: 0 })) }, 'fluids', /at most 16/);
    rejects({ ...ok, fluids: [5] }, 'fluids[0]', /object/);
    rejects({ ...ok, fluids: [{ omega: 0.1, colour: 'red' }] }, 'fluids[0].colour', /unknown fluid key/);
    rejects({ ...ok, fluids: [{ w: 0 }] }, 'fluids[0].omega', /required/);
    rejects({ ...ok, fluids: [{ omega: 0.1, w: 0, density: '1/a^3' }] }, 'fluids[0]', /w or density/);
    rejects({ ...ok, fluids: [{ omega: 0.1, density: 2 }] }, 'fluids[0].density', /formula string or a table/);
    rejects({ ...ok, fluids: [{ omega: 0.1, name: '3d' }] }, 'fluids[0].name', /letters/);
    rejects({ ...ok, fluids: [{ omega: 0.1, name: 'matter' }] }, 'fluids[0].name', /already used/);
    rejects({ ...ok, fluids: [{ omega: 0.1, name: 'x' }, { omega: 0.1, name: 'x' }] }, 'fluids[1].name', /already used/);
    rejects({ ...ok, fluids: [{ omega: 0.1, density: 'a - 1' }] }, 'fluids[0].density', /> 0 at a = 1/);
    rejects({ ...ok, fluids: [{ omega: 0.1, w: 'sin(' }] }, 'fluids[0].w', /parse/);
    const m = universe({ ...ok, Tcmb: 0, fluids: [{ omega: 0.1, w: -1 / 3, name: 'strings' }] });
    expect(m.background.omegaDE0).toBeCloseTo(0.6, 14);
    expect(m.omegaComponent('strings', 0)).toBeCloseTo(0.1, 14);
  });
  it('fromJSON refuses what is not a model description and round-trips what is', () => {
    expect(() => universe.fromJSON({ kind: 'other' } as never)).toThrow(KernelParamError);
    expect(() => universe.fromJSON('{"kind":"comoving.universe"}')).toThrow(KernelParamError);
    const m = universe({ H0: 68, omegaM: 0.3, omegaK: 0.01, w0: -0.9, wa: 0.1, mNu: [0.06], fluids: [{ omega: 0.001, w: '1/3', name: 'dr' }] });
    const back = universe.fromJSON(JSON.stringify(m.toJSON()));
    expect(back.toJSON()).toEqual(m.toJSON());
    expect(back.luminosityDistance(1.3)).toBe(m.luminosityDistance(1.3));
    expect(Object.isFrozen(m.params)).toBe(true);
  });
});
