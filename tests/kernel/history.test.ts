import { describe, it, expect } from 'vitest';
import { makeBackground } from './helpers';
import { solveHistory, pastLimit } from '../../server/kernel/history';
import { hubbleTimeGyr } from '../../server/kernel/constants';

const H0 = 70;
const tH = hubbleTimeGyr(H0);
const rel = (x: number, y: number) => Math.abs(x / y - 1);

describe('history: a(t) from the Friedmann and Raychaudhuri equations', () => {
  it('Einstein–de Sitter: a = (t/t0)^(2/3), H = 2/(3t), t0 = 2/(3H0) (analytic, e.g. Weinberg 2008 §1.5), to 1e-9', () => {
    const h = solveHistory(makeBackground({ H0, omegaM: 1 }));
    expect(h.origin).toBe('bang');
    expect(h.fate).toBe('open');
    const t0 = (2 / 3) * tH;
    expect(rel(h.ageGyr, t0)).toBeLessThan(1e-9);
    for (const frac of [1e-9, 1e-6, 1e-3, 0.05, 0.3, 1, 3, 20]) { // 1e-9: a = 1e-6, inside the quadrature tail
      const t = frac * t0;
      expect(rel(h.scaleFactorAt(t), Math.pow(frac, 2 / 3))).toBeLessThan(1e-9);
      expect(rel(h.hubbleAt(t), (2 / (3 * t)) * tH * H0)).toBeLessThan(1e-9);
    }
    const s = h.samples(64);
    for (let i = 0; i < s.t.length; i++) expect(Math.abs(s.q[i] - 0.5)).toBeLessThan(1e-9); // q = 1/2 in EdS (analytic)
  });

  it('de Sitter: a = exp(H0 t), H = H0, no beginning (analytic), to 1e-9', () => {
    const h = solveHistory(makeBackground({ H0, omegaDE: 1 }));
    expect(h.origin).toBe('eternal');
    expect(pastLimit(makeBackground({ H0, omegaDE: 1 })).kind).toBe('eternal');
    expect(Number.isNaN(h.ageGyr)).toBe(true);
    for (const t of [-5, -1, 0, 2, 6]) {
      expect(rel(h.scaleFactorAt(t * tH), Math.exp(t))).toBeLessThan(1e-9);
      expect(rel(h.hubbleAt(t * tH), H0)).toBeLessThan(1e-9);
    }
  });

  it('flat ΛCDM age t0 = 2/(3H0√Ω_Λ) asinh(√(Ω_Λ/Ω_m)) (closed form, e.g. Weinberg 2008 eq. 1.5.42), to 1e-9', () => {
    const om = 0.3, ol = 0.7;
    const h = solveHistory(makeBackground({ H0, omegaM: om, omegaDE: ol }));
    const t0 = (2 / (3 * Math.sqrt(ol))) * Math.asinh(Math.sqrt(ol / om)) * tH;
    expect(rel(h.ageGyr, t0)).toBeLessThan(1e-9);
  });

  it('closed matter universe: turnaround, crunch from the cycloid (t_crunch = πΩ_m/(H0(Ω_m−1)^(3/2)), a_max = Ω_m/(Ω_m−1); e.g. Peebles 1993 §13), to 1e-9', () => {
    for (const om of [1.2, 2, 5]) {
      const h = solveHistory(makeBackground({ H0, omegaM: om }));
      const tc = (Math.PI * om) / Math.pow(om - 1, 1.5) * tH;
      const turn = h.events.find((e) => e.kind === 'turnaround')!;
      const crunch = h.events.find((e) => e.kind === 'crunch')!;
      expect(h.fate).toBe('crunch');
      expect(rel(turn.tGyr, tc / 2)).toBeLessThan(1e-9);
      expect(rel(turn.a, om / (om - 1))).toBeLessThan(1e-9);
      expect(rel(crunch.tGyr, tc)).toBeLessThan(1e-9);
      // Age from the cycloid: θ0 with cos θ0 = 1 − 2(Ω−1)/Ω, t = Ω/(2(Ω−1)^(3/2)) (θ − sin θ)/H0.
      const th = Math.acos(1 - 2 * (om - 1) / om);
      expect(rel(h.ageGyr, om / (2 * Math.pow(om - 1, 1.5)) * (th - Math.sin(th)) * tH)).toBeLessThan(1e-9);
      expect(h.redshiftCoordinate.zMinFuture).toBeCloseTo(1 / (om / (om - 1)) - 1, 9);
      // Symmetric about the turnaround (time-reversal symmetry of a(t)).
      expect(rel(h.scaleFactorAt(tc / 2 - 0.1 * tc), h.scaleFactorAt(tc / 2 + 0.1 * tc))).toBeLessThan(1e-9);
    }
  });

  it('closed de Sitter bounces: a = a_min cosh(√Ω_Λ H0 t), a_min = √(−Ω_k/Ω_Λ) (analytic), to 1e-9', () => {
    const ol = 1.1, ok = -0.1;
    const bg = makeBackground({ H0, omegaDE: ol, omegaK: ok });
    const amin = Math.sqrt(-ok / ol);
    const lim = pastLimit(bg);
    expect(lim.kind).toBe('bounce');
    expect(rel(lim.aMin, amin)).toBeLessThan(1e-12);
    expect(rel(lim.zMax, 1 / amin - 1)).toBeLessThan(1e-12);
    const h = solveHistory(bg);
    expect(h.origin).toBe('bounce');
    const t0 = Math.acosh(1 / amin) / Math.sqrt(ol);
    expect(rel(h.ageGyr, t0 * tH)).toBeLessThan(1e-9);
    for (const t of [0.01, 0.5, 2]) expect(rel(h.scaleFactorAt(t * tH), amin * Math.cosh(Math.sqrt(ol) * t))).toBeLessThan(1e-9);
    expect(h.events[0]).toMatchObject({ kind: 'bounce', tGyr: 0 });
    expect(h.redshiftCoordinate.zMax).toBeCloseTo(1 / amin - 1, 9);
  });

  it('closed model with matter and a large Λ bounces (E² = 0 with ä > 0) and pastLimit agrees with the solved history', () => {
    const bg = makeBackground({ H0, omegaM: 0.01, omegaDE: 1.6, omegaK: -0.61 });
    const lim = pastLimit(bg);
    expect(lim.kind).toBe('bounce');
    expect(Math.abs(bg.E2(lim.aMin))).toBeLessThan(1e-12);
    expect(bg.accel(lim.aMin)).toBeGreaterThan(0);
    const h = solveHistory(bg);
    expect(h.origin).toBe('bounce');
    expect(rel(h.scaleFactorAt(0), lim.aMin)).toBeLessThan(1e-9);
  });

  it('flat w = const < −1 ends in a big rip at t0 + 2/(3|1+w|H0) (analytic for a single fluid), to 1e-9', () => {
    const w = -1.5;
    const h = solveHistory(makeBackground({ H0, omegaDE: 1, w0: w }));
    const rip = h.events.find((e) => e.kind === 'rip')!;
    expect(h.fate).toBe('rip');
    const today = h.events.find((e) => e.kind === 'today')!;
    expect(rel(rip.tGyr - today.tGyr, (2 / (3 * Math.abs(1 + w))) * tH)).toBeLessThan(1e-9);
  });

  it('pastLimit: matter + Λ ends in a bang (no bounce)', () => {
    expect(pastLimit(makeBackground({ omegaM: 0.3, omegaDE: 0.7 }))).toEqual({ kind: 'bang', aMin: 0, zMax: Infinity });
  });
});
