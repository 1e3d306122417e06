/**
 * Shared by the recipe and dataset API tests: a test app with a sandbox, a χ² recipe, and an independent
 * χ² computed outside the project (astropy distances + numpy, through /usr/bin/python3).
 */
import { execFileSync } from 'node:child_process';
import path from 'node:path';
import { createSandbox } from '../../server/sandbox/index';
import type { TestAppOptions } from '../helpers/testApp';

export const EXAMPLE_DATASETS = path.resolve(import.meta.dirname, '../../examples/datasets');

/** makeTestApp options with a one-thread sandbox (the machine has two cores shared by the team). */
export function RUN_DEPS(): TestAppOptions {
  return { deps: { sandbox: createSandbox({ threads: 1 }) } };
}

/**
 * χ² of flat ΛCDM against a distance-modulus dataset. Tcmb: 0 removes radiation so that the model is
 * exactly the matter + Λ one astropy computes with Tcmb0 = 0.
 */
export function chi2Recipe(datasetName: string): string {
  return `// χ² of flat ΛCDM (no radiation) against ${datasetName}.
const H0 = param('H0', { default: 70, min: 50, max: 90, unit: 'km/s/Mpc', label: 'Hubble constant' });
const omegaM = param('omegaM', { default: 0.3, min: 0.05, max: 0.95, label: 'Matter density' });
const u = universe({ H0, omegaM, Tcmb: 0 });
const r = chi2(u, dataset('${datasetName}'));
show.value('chi2', r.chi2);
show.value('n', r.n);
`;
}

/**
 * χ² of a flat model with constant w0 (ΛCDM by default) against a CSV table, computed outside the project with astropy, numpy and scipy. The
 * CSV is read by plain line splitting, not by the project's parser. Without radiation unless opts.tcmb
 * is given (then photons at that temperature plus N_eff = 3.046 massless neutrinos, in the distances
 * only; the growth equation below is matter + Λ).
 *
 * - 'mu': the absolute-magnitude offset marginalised analytically,
 *     χ²_marg = A − B²/C,  A = rᵀC⁻¹r, B = 1ᵀC⁻¹r, C = 1ᵀC⁻¹1,  r = μ_obs − μ_model
 *   (Goliath et al. 2001, A&A 380, 6, eqs. 8–10, without the constant ln(C/2π) term; Conley et al. 2011,
 *   ApJS 192, 1, appendix C), with C⁻¹ = diag(1/σ²) or the inverse of the given covariance.
 *   μ_model from astropy's FlatwCDM.distmod (quadrature of 1/E(z)).
 * - 'H': Σ ((H_obs − H_model)/σ)², H_model from astropy's FlatwCDM.H.
 * - 'fs8': Σ ((fσ8_obs − fσ8_model)/σ)², with the linear growth equation
 *   D'' + (3/a + E'/E) D' − (3/2) Ωm / (a⁵ E²) D = 0 (Peebles 1980, Large-Scale Structure, §10; Λ only)
 *   integrated by scipy's solve_ivp from a = 1e-3 (D = a) to a = 1; f = d ln D / d ln a,
 *   σ8(z) = σ8 D(z)/D(0).
 */
export function independentChi2(kind: 'mu' | 'H' | 'fs8', csvPath: string, H0: number, omegaM: number, opts: { cov?: string; sigma8?: number; tcmb?: number; w0?: number } = {}): number {
  const py = `
import sys, numpy as np
from astropy.cosmology import FlatwCDM
from scipy.integrate import solve_ivp
kind, path, H0, Om, cov, s8, T, w0 = sys.argv[1], sys.argv[2], float(sys.argv[3]), float(sys.argv[4]), sys.argv[5], float(sys.argv[6]), float(sys.argv[7]), float(sys.argv[8])
rows = [l.strip() for l in open(path) if l.strip() and not l.startswith('#')][1:]
z, y, s = np.array([[float(v) for v in r.split(',')[:3]] for r in rows]).T
c = FlatwCDM(H0=H0, Om0=Om, w0=w0, Tcmb0=T, Neff=3.046, m_nu=0)
if kind == 'mu':
    r = y - c.distmod(z).value
    if cov:
        Ci = np.linalg.inv(np.array([[float(v) for v in l.split(',')] for l in open(cov) if l.strip() and not l.startswith('#')]))
    else:
        Ci = np.diag(1.0 / s**2)
    one = np.ones_like(r)
    A, B, C = r @ Ci @ r, one @ Ci @ r, one @ Ci @ one
    print(repr(float(A - B * B / C)))
elif kind == 'H':
    print(repr(float(np.sum(((y - c.H(z).value) / s) ** 2))))
else:
    E = lambda a: np.sqrt(Om / a**3 + 1 - Om)
    dlnE = lambda a: (-1.5 * Om / a**4) / E(a)**2
    def rhs(a, u):
        D, dD = u
        return [dD, -(3 / a + dlnE(a)) * dD + 1.5 * Om / (a**5 * E(a)**2) * D]
    a0 = 1e-3
    sol = solve_ivp(rhs, [a0, 1.0], [a0, 1.0], rtol=1e-11, atol=1e-14, dense_output=True)
    a = 1 / (1 + z)
    D, dD = sol.sol(a)
    D0 = sol.sol(1.0)[0]
    model = (a * dD / D) * s8 * D / D0
    print(repr(float(np.sum(((y - model) / s) ** 2))))
`;
  const out = execFileSync('/usr/bin/python3', ['-c', py, kind, csvPath, String(H0), String(omegaM), opts.cov ?? '', String(opts.sigma8 ?? 0.8), String(opts.tcmb ?? 0), String(opts.w0 ?? -1)], { encoding: 'utf8' });
  return Number(out.trim());
}

/** The marginalised distance-modulus χ² of an examples/datasets file (see independentChi2). */
export function independentMarginalisedChi2(csvFile: string, H0: number, omegaM: number): number {
  return independentChi2('mu', path.join(EXAMPLE_DATASETS, csvFile), H0, omegaM);
}
