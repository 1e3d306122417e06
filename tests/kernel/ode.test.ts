import { describe, it, expect } from 'vitest';
import { solveOde, gaussLegendre, integrateGL, brent } from '../../server/kernel/ode';

describe('Dormand–Prince 5(4) with dense output', () => {
  it('harmonic oscillator y = (cos t, −sin t) over 10 periods (analytic), dense output between steps', () => {
    const sol = solveOde((_t, y, d) => { d[0] = y[1]; d[1] = -y[0]; }, 0, [1, 0], 20 * Math.PI, { rtol: 1e-12, atol: 1e-14 });
    expect(sol.status).toBe('done');
    for (const t of [0.3, 7.77, 31.4, 62.8]) {
      const y = sol.at(t);
      expect(Math.abs(y[0] - Math.cos(t))).toBeLessThan(1e-9);
      expect(Math.abs(y[1] + Math.sin(t))).toBeLessThan(1e-9);
      expect(Math.abs(sol.derivativeAt(t)[0] + Math.sin(t))).toBeLessThan(1e-8);
    }
  });
  it('integrates backwards and locates events (y = e^t reaches 0.5 at t = −ln 2)', () => {
    const sol = solveOde((_t, y, d) => { d[0] = y[0]; }, 0, [1], -10, {
      rtol: 1e-12, atol: 1e-14, events: [{ fn: (_t, y) => y[0] - 0.5, terminal: true, direction: -1 }],
    });
    expect(sol.status).toBe('event');
    expect(Math.abs(sol.events[0].t + Math.LN2)).toBeLessThan(1e-12);
    expect(() => sol.at(-1)).toThrow(/outside/);
  });
});

describe('quadrature and roots', () => {
  it('Gauss–Legendre n points integrate polynomials of degree 2n−1 exactly (Abramowitz & Stegun 25.4.29)', () => {
    const { x, w } = gaussLegendre(8);
    let s = 0, s14 = 0;
    for (let i = 0; i < 8; i++) { s += w[i]; s14 += w[i] * x[i] ** 14; }
    expect(s).toBeCloseTo(2, 14);
    expect(s14).toBeCloseTo(2 / 15, 14);
    expect(integrateGL(Math.exp, 0, 1)).toBeCloseTo(Math.E - 1, 14);
  });
  it('Brent finds √2', () => {
    expect(brent((x) => x * x - 2, 0, 2)).toBeCloseTo(Math.SQRT2, 14);
    expect(() => brent((x) => x * x + 1, 0, 2)).toThrow(/no sign change/);
  });
});
