/**
 * A tiny Background builder for the physics tests: analytic densities from Ω's, independent of the
 * core engineer's components, so that the physics modules are tested on exactly known models.
 */
import type { Background, Component } from '../../server/kernel/background';

export interface SimpleModel {
  H0?: number;
  omegaM?: number;
  /** Radiation (photons + massless neutrinos) as one w = 1/3 component. */
  omegaR?: number;
  omegaDE?: number;
  w0?: number;
  wa?: number;
  /** Extra fluids with constant w. */
  fluids?: { omega: number; w: number }[];
  /** Default: closes the sum rule, Ω_k = 1 − ΣΩ_i. */
  omegaK?: number;
}

function constW(name: string, kind: Component['kind'], omega0: number, w: number): Component {
  return { name, kind, omega0, density: (a) => omega0 * Math.pow(a, -3 * (1 + w)), w: () => w };
}

export function makeBackground(m: SimpleModel): Background {
  const comps: Component[] = [];
  const { omegaM = 0, omegaR = 0, omegaDE = 0, w0 = -1, wa = 0 } = m;
  if (omegaM !== 0) comps.push(constW('matter', 'matter', omegaM, 0));
  if (omegaR !== 0) comps.push(constW('photons', 'photons', omegaR, 1 / 3));
  if (omegaDE !== 0) {
    comps.push({
      name: 'darkEnergy', kind: 'darkEnergy', omega0: omegaDE,
      // CPL: ρ ∝ a^(−3(1+w0+wa)) exp(−3 wa (1−a)) (Linder 2003, PRL 90, 091301).
      density: (a) => omegaDE * Math.pow(a, -3 * (1 + w0 + wa)) * Math.exp(-3 * wa * (1 - a)),
      w: (a) => w0 + wa * (1 - a),
    });
  }
  (m.fluids ?? []).forEach((f, i) => comps.push(constW(`fluid[${i}]`, 'fluid', f.omega, f.w)));
  const sum = comps.reduce((s, c) => s + c.omega0, 0);
  const omegaK = m.omegaK ?? 1 - sum;
  return {
    H0: m.H0 ?? 70,
    omegaK,
    components: comps,
    E2: (a) => comps.reduce((s, c) => s + c.density(a), 0) + omegaK / (a * a),
    accel: (a) => -0.5 * comps.reduce((s, c) => s + c.density(a) * (1 + 3 * c.w(a)), 0),
  };
}
