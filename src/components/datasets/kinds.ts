import type { DatasetKind } from '../../../shared/schemas/datasets';

export interface KindInfo {
  label: string;
  short: string;
  /** The columns the file must have, in the server's canonical spelling. */
  columns: readonly string[];
  /** Which column is plotted against z, and which holds its 1σ error. */
  y?: string;
  sigma?: string;
  /** Units to show when the file's header gave none. */
  units: Record<string, string>;
  example: string;
}

// Keyed by the schema's kinds: a new kind on the server is a type error here until it is described.
export const KINDS: Record<DatasetKind, KindInfo> = {
  distance_modulus: {
    label: 'Distance moduli — z, μ, σ',
    short: 'distance moduli',
    columns: ['z', 'mu', 'sigma'],
    y: 'mu',
    sigma: 'sigma',
    units: { mu: 'mag', sigma: 'mag' },
    example: 'z,mu,sigma\n0.05,36.70,0.12',
  },
  hubble: {
    label: 'H(z) — z, H, σ',
    short: 'H(z)',
    columns: ['z', 'H', 'sigma'],
    y: 'H',
    sigma: 'sigma',
    units: { H: 'km/s/Mpc', sigma: 'km/s/Mpc' },
    example: 'z,H,sigma\n0.40,88.1,4.6',
  },
  fsigma8: {
    label: 'Growth rate f·σ8 — z, fsigma8, σ',
    short: 'f·σ8',
    columns: ['z', 'fsigma8', 'sigma'],
    y: 'fsigma8',
    sigma: 'sigma',
    units: {},
    example: 'z,fsigma8,sigma\n0.38,0.497,0.045',
  },
  table: {
    label: 'Generic table — any numeric columns',
    short: 'table',
    columns: [],
    units: {},
    example: 'x[Mpc],y\n1.0,2.5',
  },
};

export function kindInfo(kind: string): KindInfo {
  return (KINDS as Record<string, KindInfo>)[kind] ?? KINDS.table;
}

/** Column labels as people write them. */
export function columnLabel(name: string): string {
  if (name === 'mu') return 'μ';
  if (name === 'sigma') return 'σ';
  if (name === 'fsigma8') return 'f·σ8';
  return name;
}
