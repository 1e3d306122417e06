import type { DatasetKind } from '../../../shared/schemas/datasets';

/**
 * The invented demo datasets: each is the fiducial model below plus Gaussian noise with a fixed seed,
 * written by server/db/seed/make-demo-datasets.ts into examples/datasets/ and seeded into the demo group.
 * "Aurora Deep Field" is a fictional survey.
 */
export interface DemoDataset {
  name: string;
  kind: DatasetKind;
  file: string;
  description: string;
}

/** Fiducial model of every demo dataset (flat ΛCDM, the kernel's default radiation and neutrinos). */
export const FIDUCIAL = { H0: 70, omegaM: 0.3 } as const;
/** σ8 today of the fiducial model, for the f·σ8 table. */
export const FIDUCIAL_SIGMA8 = 0.8;
/** Seed of the noise (mulberry32). */
export const NOISE_SEED = 20260412;

export const DEMO_DATASETS: readonly DemoDataset[] = [
  {
    name: 'aurora-sn-synthetic',
    kind: 'distance_modulus',
    file: 'aurora-sn-synthetic.csv',
    description:
      'SYNTHETIC: 500 invented supernova distance moduli for the fictional Aurora Deep Field, z 0.02–1.5, ' +
      'made from flat ΛCDM (H0 = 70 km/s/Mpc, Ωm = 0.3) plus Gaussian noise (seeded). Not a measurement.',
  },
  {
    name: 'aurora-hz-synthetic',
    kind: 'hubble',
    file: 'aurora-hz-synthetic.csv',
    description:
      'SYNTHETIC: 30 invented expansion-rate points H(z) for the fictional Aurora Deep Field, z 0.07–2.0, ' +
      'from flat ΛCDM (H0 = 70 km/s/Mpc, Ωm = 0.3) plus Gaussian noise (seeded). Not a measurement.',
  },
  {
    name: 'aurora-fs8-synthetic',
    kind: 'fsigma8',
    file: 'aurora-fs8-synthetic.csv',
    description:
      'SYNTHETIC: 12 invented growth-rate points f·σ8(z) for the fictional Aurora Deep Field, z 0.1–1.5, ' +
      'from flat ΛCDM (H0 = 70 km/s/Mpc, Ωm = 0.3, σ8 = 0.8) plus Gaussian noise (seeded). Not a measurement.',
  },
];
