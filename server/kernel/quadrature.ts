/**
 * Gauss–Legendre nodes and weights on [−1, 1] (Newton iteration on P_n from the Chebyshev-like
 * first guess cos(π(i − ¼)/(n + ½)); Abramowitz & Stegun 25.4.29), cached per order.
 */
export interface GaussRule {
  readonly x: Float64Array;
  readonly w: Float64Array;
}

const cache = new Map<number, GaussRule>();

/** Gauss–Legendre rule of order n (exact for polynomials of degree 2n − 1) on [−1, 1]. */
export function gaussLegendre(n: number): GaussRule {
  const hit = cache.get(n);
  if (hit) return hit;
  const x = new Float64Array(n), w = new Float64Array(n);
  for (let i = 0; i < Math.ceil(n / 2); i++) {
    let t = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let it = 0; it < 100; it++) {
      let p0 = 1, p1 = t;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * t * p1 - (k - 1) * p0) / k;
        p0 = p1; p1 = p2;
      }
      if (n === 1) { p1 = t; p0 = 1; }
      dp = (n * (t * p1 - p0)) / (t * t - 1);
      const dt = p1 / dp;
      t -= dt;
      if (Math.abs(dt) < 1e-16) break;
    }
    // One more evaluation at the converged node for the weight.
    let p0 = 1, p1 = t;
    for (let k = 2; k <= n; k++) {
      const p2 = ((2 * k - 1) * t * p1 - (k - 1) * p0) / k;
      p0 = p1; p1 = p2;
    }
    dp = n === 1 ? 1 : (n * (t * p1 - p0)) / (t * t - 1);
    x[i] = -t; x[n - 1 - i] = t;
    w[i] = w[n - 1 - i] = 2 / ((1 - t * t) * dp * dp);
  }
  if (n % 2 === 1) x[(n - 1) >> 1] = 0;
  const rule = { x, w };
  cache.set(n, rule);
  return rule;
}
