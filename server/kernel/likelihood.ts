/**
 * χ² of a model against a measured table: distance moduli (absolute magnitude marginalised
 * analytically), H(z) and f·σ8, with independent errors σ or a full covariance matrix (Cholesky).
 *
 * Marginalisation over an additive offset M (flat prior) of the distance modulus, with residuals
 * r = μ_obs − μ_model and inverse covariance C⁻¹ (Goliath et al. 2001, A&A 380, 6, eqs. 8–10;
 * Conley et al. 2011, ApJS 192, 1, appendix C):
 *   A = rᵀC⁻¹r,  B = 1ᵀC⁻¹r,  C = 1ᵀC⁻¹1,
 *   χ²_marg = A − B²/C                      (equals the χ² at the best offset M̂ = B/C),
 *   −2 ln L_marg = A − B²/C + ln(C/2π)      (the exact marginal, up to the data's normalisation).
 */

export class LikelihoodInputError extends Error {
  constructor(message: string, public readonly field: string, public readonly row?: number) {
    super(message);
    this.name = 'LikelihoodInputError';
  }
}

export interface MeasurementTable {
  z: ArrayLike<number>;
  value: ArrayLike<number>;
  /** One σ per row (same units as value); or give `cov`. */
  sigma?: ArrayLike<number>;
  /** Full covariance (row-major n×n, or an array of rows). */
  cov?: ArrayLike<number> | ArrayLike<ArrayLike<number>>;
}

export type ObservableKind = 'distanceModulus' | 'hubble' | 'fSigma8';

/** What a model must offer (the universe() object of index.ts does). */
export interface PredictingModel {
  distanceModulus(z: Float64Array): number | Float64Array;
  H(z: Float64Array): number | Float64Array;
  fSigma8(z: Float64Array, sigma8: number): number | Float64Array;
}

export interface Chi2Result {
  chi2: number;
  /** Number of rows. */
  n: number;
  /** Degrees of freedom n − 1 when an offset is marginalised, else n (no model parameters counted). */
  dof: number;
  /** Best-fitting additive offset (mag), distance modulus only. */
  offset?: number;
  /** −2 ln of the likelihood marginalised over the offset, distance modulus only. */
  minusTwoLnMarginal?: number;
  /** The model's prediction at each row. */
  prediction: Float64Array;
}

function finiteArray(x: ArrayLike<number> | undefined, field: string, n?: number): Float64Array {
  if (!x || typeof (x as ArrayLike<number>).length !== 'number') throw new LikelihoodInputError(`${field} must be an array of numbers`, field);
  if (n !== undefined && x.length !== n) throw new LikelihoodInputError(`${field} has ${x.length} rows but z has ${n}`, field);
  const out = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) {
    const v = x[i];
    if (typeof v !== 'number' || !Number.isFinite(v)) throw new LikelihoodInputError(`${field} in row ${i + 1} is not a finite number (${String(v)})`, field, i + 1);
    out[i] = v;
  }
  return out;
}

/**
 * Cholesky factor L (row-major, lower) of a symmetric positive-definite n×n matrix; throws naming
 * the row where positive-definiteness fails (Golub & Van Loan, Matrix Computations, §4.2).
 */
export function cholesky(m: Float64Array, n: number): Float64Array {
  const L = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = m[i * n + j];
      for (let k = 0; k < j; k++) s -= L[i * n + k] * L[j * n + k];
      if (i === j) {
        if (!(s > 0)) throw new LikelihoodInputError(`the covariance matrix is not positive definite (pivot ${s.toPrecision(3)} at row ${i + 1})`, 'cov', i + 1);
        L[i * n + i] = Math.sqrt(s);
      } else L[i * n + j] = s / L[j * n + j];
    }
  }
  return L;
}

/** Solve L x = b (forward substitution), L row-major lower. */
function forward(L: Float64Array, n: number, b: Float64Array): Float64Array {
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let s = b[i];
    for (let k = 0; k < i; k++) s -= L[i * n + k] * x[k];
    x[i] = s / L[i * n + i];
  }
  return x;
}

function parseCov(cov: NonNullable<MeasurementTable['cov']>, n: number): Float64Array {
  const m = new Float64Array(n * n);
  const first = (cov as ArrayLike<unknown>)[0];
  if (typeof first === 'object' && first !== null) {
    const rows = cov as ArrayLike<ArrayLike<number>>;
    if (rows.length !== n) throw new LikelihoodInputError(`cov has ${rows.length} rows but the table has ${n}`, 'cov');
    for (let i = 0; i < n; i++) {
      const r = rows[i];
      if (!r || r.length !== n) throw new LikelihoodInputError(`cov row ${i + 1} has ${r ? r.length : 0} entries, expected ${n}`, 'cov', i + 1);
      for (let j = 0; j < n; j++) m[i * n + j] = r[j];
    }
  } else {
    const flat = cov as ArrayLike<number>;
    if (flat.length !== n * n) throw new LikelihoodInputError(`cov has ${flat.length} entries, expected ${n}×${n} = ${n * n}`, 'cov');
    for (let k = 0; k < n * n; k++) m[k] = flat[k];
  }
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const v = m[i * n + j];
      if (typeof v !== 'number' || !Number.isFinite(v)) throw new LikelihoodInputError(`cov[${i + 1}][${j + 1}] is not a finite number`, 'cov', i + 1);
      if (j < i && Math.abs(v - m[j * n + i]) > 1e-12 * (Math.abs(v) + Math.abs(m[j * n + i]))) {
        throw new LikelihoodInputError(`cov is not symmetric: entry (${i + 1}, ${j + 1}) = ${v} but (${j + 1}, ${i + 1}) = ${m[j * n + i]}`, 'cov', i + 1);
      }
    }
  }
  return m;
}

/** Validated table: z > −1, finite values, σ > 0 or a symmetric positive-definite covariance. */
export function validateTable(t: MeasurementTable): { z: Float64Array; value: Float64Array; whiten: (r: Float64Array) => Float64Array } {
  const z = finiteArray(t.z, 'z');
  const n = z.length;
  if (n === 0) throw new LikelihoodInputError('the table has no rows', 'z');
  for (let i = 0; i < n; i++) if (!(z[i] > -1)) throw new LikelihoodInputError(`z in row ${i + 1} must be > −1 (got ${z[i]})`, 'z', i + 1);
  const value = finiteArray(t.value, 'value', n);
  if (t.cov !== undefined && t.sigma !== undefined) throw new LikelihoodInputError('give either sigma or cov, not both', 'cov');
  if (t.cov !== undefined) {
    const L = cholesky(parseCov(t.cov, n), n);
    return { z, value, whiten: (r) => forward(L, n, r) };
  }
  if (t.sigma === undefined) throw new LikelihoodInputError('the table needs sigma (one per row) or cov', 'sigma');
  const sigma = finiteArray(t.sigma, 'sigma', n);
  for (let i = 0; i < n; i++) if (!(sigma[i] > 0)) throw new LikelihoodInputError(`sigma in row ${i + 1} must be > 0 (got ${sigma[i]})`, 'sigma', i + 1);
  return { z, value, whiten: (r) => r.map((v, i) => v / sigma[i]) };
}

/**
 * χ² of predictions against a validated table; with `marginalizeOffset`, the analytic marginalisation
 * over an additive constant described in the module comment.
 */
export function chi2Prediction(table: MeasurementTable, predict: (z: Float64Array) => Float64Array, marginalizeOffset: boolean): Chi2Result {
  const { z, value, whiten } = validateTable(table);
  const n = z.length;
  const pred = predict(z);
  const r = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    if (!Number.isFinite(pred[i])) throw new LikelihoodInputError(`the model gives no finite prediction at z = ${z[i]} (row ${i + 1})`, 'z', i + 1);
    r[i] = value[i] - pred[i];
  }
  const wr = whiten(r);
  let A = 0;
  for (let i = 0; i < n; i++) A += wr[i] * wr[i];
  if (!marginalizeOffset) return { chi2: A, n, dof: n, prediction: pred };
  const w1 = whiten(new Float64Array(n).fill(1));
  let B = 0, C = 0;
  for (let i = 0; i < n; i++) { B += w1[i] * wr[i]; C += w1[i] * w1[i]; }
  const chi2 = A - (B * B) / C;
  return { chi2, n, dof: n - 1, offset: B / C, minusTwoLnMarginal: chi2 + Math.log(C / (2 * Math.PI)), prediction: pred };
}

const asF64 = (x: number | Float64Array, n: number): Float64Array => (typeof x === 'number' ? new Float64Array(n).fill(x) : x);

/**
 * χ² of a model against a table of distance moduli (mag; offset M marginalised), H(z) (km/s/Mpc) or
 * f·σ8 (needs `sigma8`).
 */
export function chi2(model: PredictingModel, kind: ObservableKind, table: MeasurementTable, opts: { sigma8?: number } = {}): Chi2Result {
  switch (kind) {
    case 'distanceModulus':
      return chi2Prediction(table, (z) => asF64(model.distanceModulus(z), z.length), true);
    case 'hubble':
      return chi2Prediction(table, (z) => asF64(model.H(z), z.length), false);
    case 'fSigma8': {
      const s8 = opts.sigma8;
      if (typeof s8 !== 'number' || !(s8 > 0) || !Number.isFinite(s8)) throw new LikelihoodInputError(`fSigma8 needs sigma8, a finite number > 0 (got ${String(s8)})`, 'sigma8');
      return chi2Prediction(table, (z) => asF64(model.fSigma8(z, s8), z.length), false);
    }
    default:
      throw new LikelihoodInputError(`unknown observable '${String(kind)}' (use distanceModulus, hubble or fSigma8)`, 'kind');
  }
}
