/**
 * The script API seen from inside the sandbox, checked against outside references: the kernel called
 * directly in Node (the bridge must carry its numbers bit for bit), NumPy and an independent Python
 * mulberry32, and the IAU definitions of the parsec and the Julian year.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { createSandbox } from '../../server/sandbox/index';
import type { RunJob, RunResult, Sandbox } from '../../server/sandbox/types';
import { DEFAULT_LIMITS } from '../../shared/schemas/limits';
import { universe } from '../../server/kernel/index';
import { chi2 } from '../../server/kernel/likelihood';

let sandbox: Sandbox;
beforeAll(() => {
  sandbox = createSandbox({ threads: 2 });
});
afterAll(async () => {
  await sandbox.close();
});

function run(source: string, extra: Partial<RunJob> = {}): Promise<RunResult> {
  return sandbox.run({
    source,
    language: 'ts',
    params: {},
    seed: 12345,
    limits: { ...DEFAULT_LIMITS, wallTimeMs: 10_000 },
    datasets: {},
    recipes: {},
    ...extra,
  });
}

function values(r: RunResult): Record<string, number | null> {
  expect(r.error).toBeUndefined();
  return Object.fromEntries(r.outputs.flatMap((o) => (o.kind === 'value' ? [[o.name, o.value]] : [])));
}

function python(code: string): unknown {
  const p = spawnSync('/usr/bin/python3', ['-c', code], { encoding: 'utf8' });
  if (p.status !== 0) throw new Error(p.stderr);
  return JSON.parse(p.stdout);
}
const hasNumpy = spawnSync('/usr/bin/python3', ['-c', 'import numpy'], { encoding: 'utf8' }).status === 0;

const PARAMS = { H0: 67.66, omegaM: 0.3111, Tcmb: 2.7255 };

describe('kernel through the bridge', () => {
  it('gives the same numbers as the kernel called directly (scalars and 1000 redshifts)', async () => {
    const r = await run(`
      const u = universe(${JSON.stringify(PARAMS)});
      const z = linspace(0, 3, 1000);
      show.value('dl1', u.luminosityDistance(1));
      show.value('age0', u.age(0));
      show.table('d', [{ name: 'z', values: z }, { name: 'dc', unit: 'Mpc', values: u.comovingDistance(z) }, { name: 'H', values: u.H([0.5, 1, 2]).length === 3 ? u.H(z) : z }]);
    `);
    expect(r.status).toBe('done');
    const direct = universe(PARAMS);
    const v = values(r);
    // Source: the kernel itself, called in Node; the bridge must not change a bit.
    expect(v.dl1).toBe(direct.luminosityDistance(1));
    expect(v.age0).toBe(direct.age(0));
    const table = r.outputs.find((o) => o.kind === 'table');
    if (table?.kind !== 'table') throw new Error('no table');
    const z = table.rows.map((row) => row[0] as number);
    const dc = direct.comovingDistance(Float64Array.from(z));
    const H = direct.H(Float64Array.from(z));
    table.rows.forEach((row, i) => {
      expect(row[1]).toBe(dc[i]);
      expect(row[2]).toBe(H[i]);
    });
    expect(table.columns).toEqual([{ name: 'z' }, { name: 'dc', unit: 'Mpc' }, { name: 'H' }]);
    expect(r.kernelCalls).toBe(1 + 2 + 1 + 1 + 1);
  });

  it('chi2 of a dataset matches the kernel likelihood called directly', async () => {
    const z = [0.1, 0.3, 0.5, 0.8, 1.2];
    const direct = universe(PARAMS);
    const H = direct.H(Float64Array.from(z)) as Float64Array;
    const value = Array.from(H, (h, i) => h * (1 + 0.01 * (i % 2 ? 1 : -1)));
    const sigma = z.map(() => 2.5);
    const datasets = {
      'hz-synthetic': { name: 'hz-synthetic', kind: 'hubble', columns: [{ name: 'z', values: z }, { name: 'H', unit: 'km/s/Mpc', values: value }, { name: 'sigma', unit: 'km/s/Mpc', values: sigma }] },
    };
    const r = await run(`
      const d = dataset('hz-synthetic');
      const c = chi2(universe(${JSON.stringify(PARAMS)}), d);
      show.value('chi2', c.chi2); show.value('n', c.n); show.value('z2', d.z![2]); show.value('len', d.columns.H.length);
      print(d.units.H, d.kind, d.value instanceof Float64Array);
    `, { datasets });
    const v = values(r);
    const ref = chi2(direct, 'hubble', { z, value, sigma });
    expect(v.chi2).toBe(ref.chi2);
    expect(v).toMatchObject({ n: 5, z2: 0.5, len: 5 });
    expect(r.logs).toEqual(['km/s/Mpc hubble true']);
  });

  it('refuses chi2 against a plain table and names the dataset', async () => {
    const r = await run(`chi2(universe({H0: 70, omegaM: 0.3}), dataset('grid'));`, {
      datasets: { grid: { name: 'grid', kind: 'table', columns: [{ name: 'x', values: [1] }] } },
    });
    expect(r.status).toBe('error');
    expect(r.error?.message).toBe('chi2: dataset "grid" is a plain table; χ² needs a distance_modulus, hubble or fsigma8 dataset');
  });

  it('passes the kernel’s own parameter errors through, naming the parameter', async () => {
    const r = await run(`universe({H0: 70, omegaM: 0.3, omegaK: 0.1, omegaDE: 0.6});`);
    expect(r.status).toBe('error');
    expect(r.error?.message).toMatch(/^universe: /);
    expect(r.error?.message).toMatch(/omegaK|omegaDE/);
    expect(r.error?.line).toBe(1);
  });

  it('growth, history, a(t), sky brightness and reports match the kernel called directly', async () => {
    const r = await run(`
      const u = universe(${JSON.stringify(PARAMS)});
      show.value('D1', u.growthFactor(1, {normalize: 'early'}));
      show.value('fs8', u.fSigma8(0.5, 0.81));
      const h = u.history({samples: 50});
      show.value('n', (h.samples as any).t.length);
      show.value('age', h.ageGyr as number);
      show.value('aAt5', u.scaleFactorAtTime(5));
      const a = u.scaleFactorAtTime([1, 5, 10]);
      show.value('aLen', a.length);
      show.value('I', u.skyIntensity('1e8 * (1 + z)^-1', {zMax: 5}).intensity as number);
      show.value('zeq', u.equalityRedshift()!);
      print(h.origin, h.fate, JSON.stringify(u.pastLimit()));
    `);
    expect(r.status).toBe('done');
    const direct = universe(PARAMS);
    const v = values(r);
    // Source: the kernel called directly in Node (its own tests check it against published values).
    expect(v.D1).toBe(direct.growthFactor(1, { normalize: 'early' }));
    expect(v.fs8).toBe(direct.fSigma8(0.5, 0.81));
    expect(v.n).toBe(direct.history().samples(50).t.length);
    expect(v.age).toBe(direct.history().ageGyr);
    expect(v.aAt5).toBe(direct.history().scaleFactorAt(5));
    expect(v.aLen).toBe(3);
    expect(v.I).toBe(direct.skyIntensity('1e8 * (1 + z)^-1', { zMax: 5 }).intensity);
    expect(v.zeq).toBe(direct.equalityRedshift());
    expect(r.logs[0]).toMatch(/^bang open \{"kind":"bang","aMin":0,"zMax":null\}$/);
  });

  it('u.params reports the resolved parameters', async () => {
    const r = await run(`const u = universe({H0: 70, omegaM: 0.3}); show.value('H0', u.params.H0); show.value('Tcmb', u.params.Tcmb!);`);
    // Source: kernel default Tcmb = 2.7255 K (Fixsen 2009), as the kernel resolves it.
    expect(values(r)).toEqual({ H0: 70, Tcmb: universe({ H0: 70, omegaM: 0.3 }).params.Tcmb });
  });
});

describe('grids, units, randomness, clock', () => {
  it.skipIf(!hasNumpy)('linspace and logspace agree with NumPy', async () => {
    const r = await run(`show.table('g', [{name: 'lin', values: linspace(-1, 2.5, 11)}, {name: 'log', values: logspace(-3, 1, 11)}]);`);
    const ref = python('import json, numpy as np; print(json.dumps([np.linspace(-1, 2.5, 11).tolist(), np.logspace(-3, 1, 11).tolist()]))') as number[][];
    const t = r.outputs[0];
    if (t.kind !== 'table') throw new Error('no table');
    t.rows.forEach((row, i) => {
      expect(row[0]).toBeCloseTo(ref[0][i], 14);
      expect(Math.abs((row[1] as number) / ref[1][i] - 1)).toBeLessThan(1e-14);
    });
  });

  it('convert uses the IAU parsec and Julian year', async () => {
    const r = await run(`
      show.value('Mpc_km', convert(1, 'Mpc', 'km'));
      show.value('Gpc_Mpc', convert(1, 'Gpc', 'Mpc'));
      show.value('Gyr_s', convert(1, 'Gyr', 's'));
      show.value('H0_invGyr', convert(100, 'km/s/Mpc', '1/Gyr'));
      show.value('eV_J', convert(1, 'eV', 'J'));
      show.value('K_degC', convert(2.7255, 'K', 'degC'));
    `);
    const v = values(r);
    // IAU 2015 Resolution B2: 1 au = 149 597 870 700 m exactly, 1 pc = 648000/π au.
    const pcKm = (149_597_870_700 * 648_000) / Math.PI / 1000;
    expect(Math.abs((v.Mpc_km as number) / (pcKm * 1e6) - 1)).toBeLessThan(1e-15);
    expect(v.Gpc_Mpc).toBeCloseTo(1000, 10);
    // IAU: Julian year = 365.25 d of 86 400 s.
    expect(v.Gyr_s).toBeCloseTo(1e9 * 365.25 * 86_400, 0);
    // 100 km/s/Mpc in 1/Gyr = 100 · Gyr_s / Mpc_km ≈ 0.10227 (common practice: 1/H0 = 9.778 Gyr/h).
    expect(Math.abs((v.H0_invGyr as number) / ((100 * 1e9 * 365.25 * 86_400) / (pcKm * 1e6)) - 1)).toBeLessThan(1e-14);
    // SI 2019 exact elementary charge (CODATA 2018).
    expect(v.eV_J).toBe(1.602176634e-19);
    expect(v.K_degC).toBeCloseTo(-270.4245, 10);
  });

  it('random() is mulberry32 seeded by the run (checked against a Python implementation) and Math.random is the same stream', async () => {
    const r = await run(`const a = [random(), random(), random()]; const b = Math.random();\nshow.table('r', [{name: 'r', values: [...a, b]}]);`, { seed: 2_654_435_769 });
    const ref = python(`
import json
s = 2654435769
out = []
for _ in range(4):
    s = (s + 0x6D2B79F5) & 0xFFFFFFFF
    t = s
    t = ((t ^ (t >> 15)) * (t | 1)) & 0xFFFFFFFF
    t ^= (t + (((t ^ (t >> 7)) * (t | 61)) & 0xFFFFFFFF)) & 0xFFFFFFFF
    out.append(((t ^ (t >> 14)) & 0xFFFFFFFF) / 4294967296)
print(json.dumps(out))`) as number[];
    const t = r.outputs[0];
    if (t.kind !== 'table') throw new Error('no table');
    expect(t.rows.map((row) => row[0])).toEqual(ref);
  });

  it('the clock is fixed and there are no timers', async () => {
    const r = await run(`print(Date.now(), new Date().getTime(), typeof setTimeout, typeof queueMicrotask)`);
    // 2000-01-01T12:00:00Z (J2000.0) in ms since 1970: 946728000000 (Date.UTC).
    expect(r.logs).toEqual([`${Date.UTC(2000, 0, 1, 12)} ${Date.UTC(2000, 0, 1, 12)} undefined undefined`]);
  });
});

describe('param, recipe, show', () => {
  it('param reads the run’s value, falls back to the default and records the declaration', async () => {
    const src = `const h = param('H0', {default: 70, min: 50, max: 90, unit: 'km/s/Mpc', label: 'Hubble constant'});\nconst om = param('omegaM', {default: 0.3, min: 0, max: 1});\nshow.value('h', h); show.value('om', om);`;
    const r = await run(src, { params: { H0: 67.5 } });
    expect(values(r)).toEqual({ h: 67.5, om: 0.3 });
    expect(r.declaredParams).toEqual([
      { name: 'H0', default: 70, min: 50, max: 90, unit: 'km/s/Mpc', label: 'Hubble constant' },
      { name: 'omegaM', default: 0.3, min: 0, max: 1 },
    ]);
    const out = await run(src, { params: { H0: 120 } });
    expect(out.status).toBe('error');
    expect(out.error).toEqual({ message: 'param: "H0" = 120 is above its maximum 90', line: 1, column: 11 });
  });

  it('recipe runs in a fresh context with its inputs and returns its shown values', async () => {
    const recipes = {
      'age-of': { language: 'ts' as const, source: `const h = param('H0', {default: 70});\nconst leaked = 1;\nshow.value('age', universe({H0: h, omegaM: 0.3}).age(0));\nprint('inside');` },
    };
    const r = await run(`const leaked = 2;\nconst a = recipe('age-of', {H0: 60});\nconst b = recipe('age-of');\nshow.value('a', a.age!); show.value('b', b.age!); show.value('leaked', leaked);`, { recipes });
    const v = values(r);
    expect(v.a).toBe(universe({ H0: 60, omegaM: 0.3 }).age(0));
    expect(v.b).toBe(universe({ H0: 70, omegaM: 0.3 }).age(0));
    expect(v.leaked).toBe(2);
    expect(r.logs).toEqual(['[recipe age-of] inside', '[recipe age-of] inside']);
  });

  it('a recipe that calls itself stops at the nesting limit', async () => {
    const recipes = { loop: { language: 'js' as const, source: `recipe('loop', {});` } };
    const r = await run(`recipe('loop', {});`, { recipes });
    expect(r.status).toBe('error');
    expect(r.error?.message).toBe('recipe: "loop" nests recipes more than 3 deep');
  });

  it('show.plot keeps line, band and heatmap specs; non-finite numbers become null', async () => {
    const r = await run(`
      const x = linspace(0, 1, 3);
      show.plot({type: 'line', title: 'T', x, series: [{name: 'y', values: [1, NaN, 3]}], xLabel: 'z', yLabel: 'H [km/s/Mpc]', yScale: 'log'});
      show.plot({type: 'band', x, series: [{name: 'b', values: x, lower: [0, 0, 0], upper: [2, 2, 2]}]});
      show.plot({type: 'heatmap', x, y: [0, 1], series: [], values: [x, [4, 5, Infinity]]});
    `);
    expect(r.status).toBe('done');
    expect(r.outputs).toEqual([
      { kind: 'plot', spec: { type: 'line', title: 'T', x: [0, 0.5, 1], series: [{ name: 'y', values: [1, null, 3] }], xLabel: 'z', yLabel: 'H [km/s/Mpc]', yScale: 'log' } },
      { kind: 'plot', spec: { type: 'band', x: [0, 0.5, 1], series: [{ name: 'b', values: [0, 0.5, 1], lower: [0, 0, 0], upper: [2, 2, 2] }] } },
      { kind: 'plot', spec: { type: 'heatmap', x: [0, 0.5, 1], y: [0, 1], series: [], values: [[0, 0.5, 1], [4, 5, null]] } },
    ]);
  });
});

describe('determinism', () => {
  it('the same source, parameters and seed give identical outputs and logs', async () => {
    const src = `
      const om = param('omegaM', {default: 0.3});
      const z = new Float64Array(50).map(() => 3 * random());
      const u = universe({H0: 70, omegaM: om});
      show.table('t', [{name: 'z', values: z}, {name: 'mu', values: u.distanceModulus(z)}]);
      show.value('t0', Date.now()); print(Math.random());
    `;
    const a = await run(src, { params: { omegaM: 0.27 }, seed: 99 });
    const b = await run(src, { params: { omegaM: 0.27 }, seed: 99 });
    const c = await run(src, { params: { omegaM: 0.27 }, seed: 100 });
    expect(a.status).toBe('done');
    expect(JSON.stringify(b.outputs)).toBe(JSON.stringify(a.outputs));
    expect(b.logs).toEqual(a.logs);
    expect(JSON.stringify(c.outputs)).not.toBe(JSON.stringify(a.outputs));
  });
});
