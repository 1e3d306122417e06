/**
 * Kernel benchmark (`npm run bench:kernel`): µs per redshift for 1e3/1e4/1e5 redshifts (luminosity
 * distance, age, growth factor) on a fresh model each time (so the lazy set-up is included), the cost
 * of building a model, and models/s for a 100-model × 100-redshift luminosity-distance sweep. When
 * Debian's /usr/bin/python3 has astropy, the same work runs there in a child process and the ratio is
 * printed. Timings are the best of several repetitions (both sides), the usual choice on a shared
 * machine where other work only ever adds time.
 */
import { spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { universe, KERNEL_VERSION, type UniverseParams } from '../../server/kernel/index';

const PY = '/usr/bin/python3';
const BASE: UniverseParams = { H0: 67.66, omegaM: 0.3096, Tcmb: 2.7255, Neff: 3.046, mNu: [0.06] };
const FIT: UniverseParams = { ...BASE, neutrinoModel: 'fitting' };
const MASSLESS: UniverseParams = { H0: 67.66, omegaM: 0.3111, Tcmb: 2.7255, Neff: 3.046 };
const NORAD: UniverseParams = { H0: 67.66, omegaM: 0.3111, Tcmb: 0 };

function lcg(seed: number) {
  let s = seed >>> 0;
  return () => ((s = (1664525 * s + 1013904223) >>> 0) / 4294967296);
}
function redshifts(n: number, zMax = 3): Float64Array {
  const r = lcg(12345 + n), out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = 0.001 + zMax * r();
  return out;
}
function time(f: () => void, reps: number): number {
  f(); // warm-up (JIT, the once-per-process neutrino table)
  const t: number[] = [];
  for (let i = 0; i < reps; i++) {
    const s = performance.now();
    f();
    t.push(performance.now() - s);
  }
  return Math.min(...t); // ms
}

const sizes = [1e3, 1e4, 1e5];
type Row = { what: string; n: number; ms: number };
const rows: Row[] = [];
for (const n of sizes) {
  const z = redshifts(n);
  const reps = n >= 1e5 ? 7 : 21;
  rows.push({ what: 'luminosityDistance (exact ν)', n, ms: time(() => void universe(BASE).luminosityDistance(z), reps) });
  rows.push({ what: 'luminosityDistance (fitting ν)', n, ms: time(() => void universe(FIT).luminosityDistance(z), reps) });
  rows.push({ what: 'comovingDistance (massless ν)', n, ms: time(() => void universe(MASSLESS).comovingDistance(z), reps) });
  rows.push({ what: 'age (fitting ν)', n, ms: time(() => void universe(FIT).age(z), reps) });
  rows.push({ what: 'growthFactor (fitting ν)', n, ms: time(() => void universe(FIT).growthFactor(z), reps) });
}

// Build cost: universe() alone, and build + one distance (the lazy path a sweep takes).
const nb = 20000;
const buildMs = time(() => { for (let i = 0; i < nb; i++) universe({ ...FIT, omegaM: 0.3 + i * 1e-6 }); }, 5);
const buildOneMs = time(() => { for (let i = 0; i < nb / 10; i++) universe({ ...FIT, omegaM: 0.3 + i * 1e-6 }).luminosityDistance(1); }, 5);

// Sweep: 100 models × 100 redshifts.
const zs = Array.from({ length: 100 }, (_, i) => 0.01 + (2 * i) / 99);
function sweep(p: UniverseParams) {
  return time(() => {
    for (let i = 0; i < 100; i++) universe({ ...p, omegaM: 0.25 + i * 0.001, H0: 65 + i * 0.05 }).luminosityDistance(zs);
  }, 21);
}
const sweepMassless = sweep(MASSLESS), sweepFit = sweep(FIT), sweepExact = sweep(BASE), sweepNorad = sweep(NORAD);

// astropy, the same work.
type PyOut = { version: string; dl: Record<string, number>; dlMassless: Record<string, number>; age: Record<string, number>; sweepMassless: number; sweepFit: number; sweepNorad: number };
let py: PyOut | null = null;
let pyNote = '';
if (existsSync(PY)) {
  const script = String.raw`
import json, time, numpy as np, astropy
from astropy.cosmology import FlatLambdaCDM
import astropy.units as u
def zs(n, zmax=3.0):
    rng = np.random.default_rng(n)
    return 0.001 + zmax * rng.random(n)
def med(f, reps):
    f(); t = []
    for _ in range(reps):
        s = time.perf_counter(); f(); t.append(time.perf_counter() - s)
    return min(t) * 1e3
fit = lambda **k: FlatLambdaCDM(H0=67.66, Om0=k.get('Om0', 0.3096), Tcmb0=2.7255, Neff=3.046, m_nu=[0.06, 0, 0] * u.eV)
ml = lambda **k: FlatLambdaCDM(H0=k.get('H0', 67.66), Om0=k.get('Om0', 0.3111), Tcmb0=2.7255, Neff=3.046)
out = {"version": astropy.__version__, "dl": {}, "dlMassless": {}, "age": {}}
for n in [1000, 10000, 100000]:
    z = zs(n)
    out["dl"][str(n)] = med(lambda: fit().luminosity_distance(z), 1 if n == 100000 else 3)
    out["dlMassless"][str(n)] = med(lambda: ml().comoving_distance(z), 1 if n == 100000 else 3)
for n in [1000, 10000]:
    z = zs(n)
    out["age"][str(n)] = med(lambda: fit().age(z), 1)
zsw = 0.01 + 2 * np.arange(100) / 99
out["sweepMassless"] = med(lambda: [ml(Om0=0.25 + i * 0.001, H0=65 + i * 0.05).luminosity_distance(zsw) for i in range(100)], 3)
out["sweepFit"] = med(lambda: [FlatLambdaCDM(H0=65 + i * 0.05, Om0=0.25 + i * 0.001, Tcmb0=2.7255, Neff=3.046, m_nu=[0.06, 0, 0] * u.eV).luminosity_distance(zsw) for i in range(100)], 3)
out["sweepNorad"] = med(lambda: [FlatLambdaCDM(H0=65 + i * 0.05, Om0=0.25 + i * 0.001, Tcmb0=0).luminosity_distance(zsw) for i in range(100)], 3)
print(json.dumps(out))
`;
  const r = spawnSync(PY, ['-c', script], { encoding: 'utf8', timeout: 600_000 });
  if (r.status === 0) py = JSON.parse(r.stdout.trim().split('\n').pop() as string) as PyOut;
  else pyNote = `astropy run failed: ${(r.stderr || r.error?.message || '').split('\n').slice(-3).join(' ')}`;
} else pyNote = `${PY} not found: no astropy comparison`;

const fmt = (v: number, d = 3) => v.toPrecision(d).padStart(9);
console.log(`Comoving kernel ${KERNEL_VERSION} benchmark — node ${process.version}${py ? `, astropy ${py.version}` : ''}`);
console.log('model: flat ΛCDM, H0 67.66, Tcmb 2.7255, Neff 3.046, one 0.06 eV neutrino; redshifts uniform in (0, 3], unsorted; fresh model per call\n');
console.log('quantity                          N        total ms   µs/z     astropy ms   ratio');
for (const r of rows) {
  let ap = '', ratio = '';
  if (py) {
    const key = String(r.n);
    const v = r.what.startsWith('luminosityDistance (fitting') ? py.dl[key] : r.what.startsWith('comovingDistance') ? py.dlMassless[key] : r.what.startsWith('age') ? py.age[key] : undefined;
    if (v !== undefined) { ap = fmt(v); ratio = `${(v / r.ms).toFixed(0)}×`; } else if (r.what.startsWith('age')) ap = '  (skipped: ~40 s)';
  }
  console.log(`${r.what.padEnd(32)} ${String(r.n).padStart(6)} ${fmt(r.ms)} ${fmt((r.ms * 1000) / r.n)}   ${ap.padStart(9)}   ${ratio}`);
}
console.log(`\nbuild a model (universe(), nothing integrated):      ${fmt((buildMs * 1000) / nb)} µs`);
console.log(`build + one luminosity distance:                    ${fmt((buildOneMs * 1000) / (nb / 10))} µs`);
console.log('\nsweep 100 models × 100 redshifts (z = 0.01 … 2.01), luminosity distance, Ω_m and H0 varied:');
const sw = (name: string, ms: number, ap?: number) =>
  console.log(`  ${name.padEnd(28)} ${fmt(ms)} ms  ${fmt(100000 / ms, 4)} models/s${ap !== undefined ? `   astropy ${fmt(ap)} ms   ratio ${(ap / ms).toFixed(0)}×` : ''}`);
sw('no radiation (Tcmb 0)', sweepNorad, py?.sweepNorad);
sw('massless ν', sweepMassless, py?.sweepMassless);
sw('one massive ν (fitting)', sweepFit, py?.sweepFit);
sw('one massive ν (exact)', sweepExact, py?.sweepFit);
if (pyNote) console.log(`\n${pyNote}`);
