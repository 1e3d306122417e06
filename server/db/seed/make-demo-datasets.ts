/**
 * Writes the invented demo datasets to examples/datasets/*.csv (committed; the seed reads them).
 * Each is the fiducial model of demo-datasets-manifest.ts evaluated by the kernel, plus Gaussian noise
 * from a fixed seed, so rerunning this script reproduces the files byte for byte.
 *
 *   npx tsx server/db/seed/make-demo-datasets.ts
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { universe } from '../../kernel/index';
import { DEMO_DATASETS, FIDUCIAL, FIDUCIAL_SIGMA8, NOISE_SEED } from './demo-datasets-manifest';

const OUT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../examples/datasets');

/** mulberry32: a small, well-known 32-bit generator; enough for reproducible demo noise. */
function mulberry32(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal deviates by the Box–Muller transform (Box & Muller 1958). */
function gaussian(rand: () => number): () => number {
  return () => {
    const u1 = 1 - rand(); // in (0, 1], so the log is finite
    const u2 = rand();
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  };
}

const fixed = (v: number, digits: number) => v.toFixed(digits);

function header(name: string, lines: string[]): string {
  return [
    `# ${name}: SYNTHETIC data, invented for the Comoving demo. Not a measurement.`,
    ...lines.map((l) => `# ${l}`),
    `# Fiducial model: flat ΛCDM, H0 = ${FIDUCIAL.H0} km/s/Mpc, Ωm = ${FIDUCIAL.omegaM}, with the kernel's default`,
    `# radiation (Tcmb = 2.7255 K, Neff = 3.046, massless neutrinos). Noise: Gaussian with standard deviation`,
    `# sigma, seed ${NOISE_SEED} (mulberry32 + Box–Muller). Made by server/db/seed/make-demo-datasets.ts.`,
  ].join('\n');
}

export function makeDemoDatasets(): Record<string, string> {
  const u = universe({ ...FIDUCIAL });
  const files: Record<string, string> = {};
  // One stream per dataset so that changing one table never reshuffles the others.
  const streams = DEMO_DATASETS.map((_, i) => mulberry32(NOISE_SEED + i));

  {
    const rand = streams[0];
    const normal = gaussian(rand);
    const n = 500;
    // More objects at low z than a uniform draw would give, like a magnitude-limited survey.
    const z = Array.from({ length: n }, () => 0.02 + (1.5 - 0.02) * Math.pow(rand(), 1.4)).sort((a, b) => a - b);
    const rows = z.map((zi) => {
      const zr = Number(fixed(zi, 4));
      const sigma = Number(fixed(0.1 + 0.08 * zr, 3));
      const mu = u.distanceModulus(zr) + sigma * normal();
      return `${fixed(zr, 4)},${fixed(mu, 4)},${fixed(sigma, 3)}`;
    });
    files['aurora-sn-synthetic.csv'] =
      header('aurora-sn-synthetic', ['Fictional Aurora Deep Field: 500 supernova distance moduli, z 0.02–1.5.']) + '\nz,mu [mag],sigma [mag]\n' + rows.join('\n') + '\n';
  }

  {
    const normal = gaussian(streams[1]);
    const n = 30;
    const rows = Array.from({ length: n }, (_, i) => {
      const zr = Number(fixed(0.07 + ((2.0 - 0.07) * i) / (n - 1), 3));
      const H = u.H(zr);
      const sigma = Number(fixed(2 + 0.06 * H, 2));
      return `${fixed(zr, 3)},${fixed(H + sigma * normal(), 2)},${fixed(sigma, 2)}`;
    });
    files['aurora-hz-synthetic.csv'] =
      header('aurora-hz-synthetic', ['Fictional Aurora Deep Field: 30 expansion-rate points H(z), z 0.07–2.0.']) + '\nz,H [km/s/Mpc],sigma [km/s/Mpc]\n' + rows.join('\n') + '\n';
  }

  {
    const normal = gaussian(streams[2]);
    const n = 12;
    const rows = Array.from({ length: n }, (_, i) => {
      const zr = Number(fixed(0.1 + ((1.5 - 0.1) * i) / (n - 1), 3));
      const fs8 = u.fSigma8(zr, FIDUCIAL_SIGMA8);
      const sigma = Number(fixed(0.03 + 0.02 * zr, 3));
      return `${fixed(zr, 3)},${fixed(fs8 + sigma * normal(), 4)},${fixed(sigma, 3)}`;
    });
    files['aurora-fs8-synthetic.csv'] =
      header('aurora-fs8-synthetic', [`Fictional Aurora Deep Field: 12 growth-rate points f·σ8(z), z 0.1–1.5, σ8 = ${FIDUCIAL_SIGMA8} today.`]) +
      '\nz,fsigma8,sigma\n' +
      rows.join('\n') +
      '\n';
  }
  return files;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  mkdirSync(OUT, { recursive: true });
  for (const [file, text] of Object.entries(makeDemoDatasets())) {
    writeFileSync(path.join(OUT, file), text);
    console.log(`wrote examples/datasets/${file} (${text.split('\n').length - 1} lines)`);
  }
}
