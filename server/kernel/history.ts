/**
 * a(t) for any model: the Friedmann and Raychaudhuri equations integrated in cosmic time,
 *   d ln a / dt = H,   dH/dt = ä/a − H²,
 * (Friedmann 1922; Raychaudhuri 1955; e.g. Weinberg, Cosmology (2008) §1.5) from today into the past
 * and the future. Integrating (ln a, H) rather than the first-order Friedmann equation lets the
 * solution pass smoothly through H = 0, so bounces and turnarounds are ordinary points.
 *
 * Internal time unit: the Hubble time 1/H0. Reported times: Gyr, measured from the big bang or the
 * bounce (from today when the past is eternal, e.g. de Sitter). H: km/s/Mpc.
 */
import type { Background } from './background';
import { hubbleTimeGyr } from './constants';
import { SETTINGS } from './settings';
import { brent, integrateGL, solveOde, type OdeSolution } from './ode';
import type { KernelWarning } from './cautions';

export type PastKind = 'bang' | 'bounce' | 'eternal';

export interface PastLimit {
  /** How the past ends: a big bang (a → 0 a finite time ago), a bounce (H = 0 with ä > 0) or never (a → 0 as t → −∞). */
  kind: PastKind;
  /** Smallest scale factor reached in the past (0 for a bang or an eternal past). */
  aMin: number;
  /** Largest redshift the model reaches, 1/aMin − 1 (Infinity unless it bounces). */
  zMax: number;
}

/** −d ln E / d ln a = 1 − (ä/a)/H² (dimensionless), the local power H ∝ a^(−n). */
function localPower(bg: Background, a: number): number {
  return 1 - bg.accel(a) / bg.E2(a);
}

/**
 * Where the model's past ends (cheap: a scan of E²(a) on a ln-a grid and a Brent refinement of the
 * first zero; E² = H²/H0² vanishing in the past is a bounce, because dH/dt = ä/a there must be ≥ 0).
 * Below `SETTINGS.pastScanAMin` the past is classified from the local power n = −d ln H/d ln a:
 * n > 0 gives a bang a finite time ago (∫ da/(aH) converges), n ≤ 0 an eternal past.
 */
export function pastLimit(bg: Background): PastLimit {
  const lnMin = Math.log(SETTINGS.pastScanAMin);
  // E² > 0 for every a when curvature is open/flat and every density is positive by construction
  // (ρ_i = ρ_i,0 exp(3∫(1+w)d ln a) > 0), so no bounce is possible; user fluids are always scanned.
  const noZero = bg.omegaK >= 0 && bg.components.every((c) => c.kind !== 'fluid' && c.omega0 >= 0);
  if (!noZero) {
    const step = 1 / SETTINGS.scanPerLnA;
    let prev = 0;
    for (let x = -step; x >= lnMin - 1e-12; x -= step) {
      const e2 = bg.E2(Math.exp(x));
      if (!(e2 > 0)) {
        const lnA = brent((y) => bg.E2(Math.exp(y)), x, prev, SETTINGS.rootTolerance);
        const aMin = Math.exp(lnA);
        return { kind: 'bounce', aMin, zMax: 1 / aMin - 1 };
      }
      prev = x;
    }
  }
  const n = localPower(bg, SETTINGS.pastScanAMin);
  return { kind: n > 1e-3 ? 'bang' : 'eternal', aMin: 0, zMax: Infinity };
}

export type HistoryEventKind = 'bang' | 'bounce' | 'today' | 'turnaround' | 'crunch' | 'rip';

export interface HistoryEvent {
  kind: HistoryEventKind;
  /** Time of the event, Gyr since the origin (bang/bounce; today when the past is eternal). */
  tGyr: number;
  /** Scale factor (0 at a bang or crunch, Infinity at a rip). */
  a: number;
  /** Hubble rate, km/s/Mpc (±Infinity at a bang/crunch/rip). */
  H: number;
}

export interface HistorySamples {
  /** Gyr since the origin. */
  t: Float64Array;
  a: Float64Array;
  /** km/s/Mpc. */
  H: Float64Array;
  /** Deceleration parameter q = −ä a/ȧ² (±Infinity where H = 0). */
  q: Float64Array;
}

export interface History {
  origin: PastKind;
  /** Time from the origin to today, Gyr (NaN when the past is eternal). */
  ageGyr: number;
  /** How the future ends: 'crunch', 'rip', or 'open' (still expanding when the integration stops). */
  fate: 'crunch' | 'rip' | 'open';
  events: HistoryEvent[];
  /** Time range covered by the solution, Gyr since the origin. */
  tRange: [number, number];
  /** Where redshift stops being a coordinate along the past light cone and the future. */
  redshiftCoordinate: { zMax: number; zMinFuture: number; note: string };
  warnings: KernelWarning[];
  /** a at a time in Gyr since the origin. */
  scaleFactorAt(tGyr: number): number;
  /** H (km/s/Mpc) at a time in Gyr since the origin. */
  hubbleAt(tGyr: number): number;
  /** n samples uniform in t over the solved life, with every event time included. */
  samples(n?: number): HistorySamples;
  /** The raw solutions (time unit 1/H0, t = 0 today, state [ln a, H/H0]) for residual checks. */
  readonly raw: { past: OdeSolution; future: OdeSolution; tOrigin: number };
}

/**
 * ∫_0^{aStop} da/(a|E(a)|) in Hubble times (the time from a bang to aStop, or from aStop to a
 * crunch), by Gauss–Legendre in u with a = aStop·u^p, p = 2/n: for H ∝ a^(−n) the integrand becomes
 * p·u, smooth at u = 0.
 */
function tailTime(bg: Background, aStop: number, upTo = aStop): number {
  const n = localPower(bg, aStop);
  const p = 2 / Math.max(n, 0.05);
  const uMax = Math.pow(upTo / aStop, 1 / p);
  return integrateGL((u) => {
    if (u === 0) return 0;
    const a = aStop * Math.pow(u, p);
    return p / (u * Math.sqrt(bg.E2(a)));
  }, 0, uMax, 4, 20);
}

/** ∫_A^∞ da/(aE) for a phantom future (H ∝ a^m, m > 0): a = A u^(−2/m) makes the integrand smooth. */
function ripTail(bg: Background, A: number): number {
  const m = -localPower(bg, A);
  const p = 2 / m;
  return integrateGL((u) => {
    if (u === 0) return 0;
    const a = A * Math.pow(u, -p);
    return p / (u * Math.sqrt(bg.E2(a)));
  }, 0, 1, 4, 20);
}

/**
 * Solve a(t) over the model's whole life (Dormand–Prince 5(4), tolerances `SETTINGS.historyRtol/Atol`).
 * Events: big bang or bounce in the past, turnaround (H = 0, ä < 0), crunch (a → 0 after a turnaround),
 * big rip (a → ∞ a finite time ahead). Units in the returned object: Gyr, km/s/Mpc.
 */
export function solveHistory(bg: Background): History {
  const tH = hubbleTimeGyr(bg.H0);
  const warnings: KernelWarning[] = [];
  const lnStop = Math.log(SETTINGS.historyAStop);
  const lnMax = Math.log(SETTINGS.historyAMax);
  const rhs = (_t: number, y: Float64Array, d: Float64Array) => {
    const a = Math.exp(y[0]);
    d[0] = y[1];
    d[1] = bg.accel(a) - y[1] * y[1];
  };
  const opts = { rtol: SETTINGS.historyRtol, atol: SETTINGS.historyAtol, maxSteps: 400000 };
  const Tmax = SETTINGS.historyTMaxHubble;

  // Past: backwards from today. Events: a reaches aStop (bang approach), H reaches 0 (bounce).
  const past = solveOde(rhs, 0, [0, 1], -Tmax, {
    ...opts,
    events: [
      { fn: (_t, y) => y[0] - lnStop, terminal: true, direction: -1 },
      { fn: (_t, y) => y[1], terminal: true, direction: -1 },
    ],
  });
  let origin: PastKind;
  let tOrigin: number;
  let aMinPast: number;
  const hit = past.events[past.events.length - 1];
  if (past.status === 'event' && hit.index === 1) {
    origin = 'bounce';
    tOrigin = hit.t;
    aMinPast = Math.exp(hit.y[0]);
  } else if (Math.exp(past.yEnd[0]) < 0.5 && past.yEnd[1] > 0 && localPower(bg, Math.exp(past.yEnd[0])) > 1e-3
    && localPower(bg, SETTINGS.pastScanAMin) > 1e-3) {
    // Reached aStop (or had to stop early, deep in the past): the rest of the way to a = 0 is the tail.
    origin = 'bang';
    tOrigin = past.tEnd - tailTime(bg, Math.exp(past.yEnd[0]));
    aMinPast = 0;
    if (past.status !== 'event') warnings.push({ code: 'history_past_tail_early', message: `the cosmic-time integration stopped at a = ${Math.exp(past.yEnd[0]).toExponential(2)} (${past.status}); the time from there to the bang was added by quadrature` });
  } else {
    origin = 'eternal';
    tOrigin = 0;
    aMinPast = 0;
    if (past.status !== 'event') warnings.push({ code: 'history_past_truncated', message: `the past was followed for ${Tmax} Hubble times without reaching a bang, a bounce or a = ${SETTINGS.historyAStop}` });
  }

  // Future: forwards from today. Events: turnaround (H falls through 0), bounce during a collapse
  // (H rises through 0), a back down to aStop after a turnaround (crunch), a past aMax.
  const future = solveOde(rhs, 0, [0, 1], Tmax, {
    ...opts,
    events: [
      { fn: (_t, y) => y[1], terminal: false, direction: -1 },
      { fn: (_t, y) => y[1], terminal: false, direction: 1 },
      { fn: (_t, y) => y[0] - lnStop, terminal: true, direction: -1 },
      { fn: (_t, y) => y[0] - lnMax, terminal: true, direction: 1 },
    ],
  });
  const toGyr = (t: number) => (t - tOrigin) * tH;
  const events: HistoryEvent[] = [];
  if (origin === 'bang') events.push({ kind: 'bang', tGyr: 0, a: 0, H: Infinity });
  if (origin === 'bounce') events.push({ kind: 'bounce', tGyr: 0, a: aMinPast, H: 0 });
  events.push({ kind: 'today', tGyr: toGyr(0), a: 1, H: bg.H0 });
  let aMaxFuture = Infinity;
  let fate: History['fate'] = 'open';
  let tEnd = future.tEnd;
  for (const e of future.events) {
    const a = Math.exp(e.y[0]);
    if (e.index === 0) { events.push({ kind: 'turnaround', tGyr: toGyr(e.t), a, H: 0 }); aMaxFuture = Math.min(aMaxFuture, a); }
    else if (e.index === 1) events.push({ kind: 'bounce', tGyr: toGyr(e.t), a, H: 0 });
    else if (e.index === 2) {
      fate = 'crunch';
      tEnd = e.t;
      events.push({ kind: 'crunch', tGyr: toGyr(e.t + tailTime(bg, SETTINGS.historyAStop)), a: 0, H: -Infinity });
    } else if (e.index === 3) {
      tEnd = e.t;
      if (localPower(bg, SETTINGS.historyAMax) < -1e-3) {
        fate = 'rip';
        events.push({ kind: 'rip', tGyr: toGyr(e.t + ripTail(bg, SETTINGS.historyAMax)), a: Infinity, H: Infinity });
      }
    }
  }
  if (future.status === 'maxSteps' || future.status === 'stepTooSmall' || past.status === 'maxSteps' || past.status === 'stepTooSmall') {
    warnings.push({ code: 'history_integration_incomplete', message: `the a(t) integration stopped early (${past.status}/${future.status}); times beyond the solved range are unavailable` });
  }
  events.sort((x, y) => x.tGyr - y.tGyr);

  const tStart = past.tEnd;
  const stateAt = (t: number): Float64Array => (t <= 0 ? past.at(t) : future.at(t));
  const aFromTail = (target: number, aEdge: number): number => {
    // Inside the quadrature tail (a < aEdge): invert the tail integral ∫_0^a da/(a|E|) = target.
    if (target <= 0) return 0;
    const f = (lnA: number) => tailTime(bg, aEdge, Math.exp(lnA)) - target;
    return Math.exp(brent(f, Math.log(aEdge) - 200, Math.log(aEdge), 1e-13));
  };
  const tCrunch = fate === 'crunch' ? tEnd + tailTime(bg, SETTINGS.historyAStop) : NaN;
  const scaleFactorAt = (tGyr: number): number => {
    const tau = tGyr / tH; // since the origin, kept apart from tOrigin so that τ → 0 keeps its precision
    const t = tau + tOrigin;
    if (t >= tStart && t <= tEnd) return Math.exp(stateAt(t)[0]);
    if (origin === 'bang' && t < tStart && tau >= 0) return aFromTail(tau, Math.exp(past.yEnd[0]));
    if (fate === 'crunch' && t > tEnd && t <= tCrunch) return aFromTail((tCrunch - tOrigin) - tau, SETTINGS.historyAStop);
    throw new RangeError(`t = ${tGyr} Gyr is outside the model's solved life [${toGyr(origin === 'bang' ? tOrigin : tStart)}, ${toGyr(fate === 'crunch' ? tCrunch : tEnd)}] Gyr`);
  };
  const hubbleAt = (tGyr: number): number => {
    const t = tGyr / tH + tOrigin;
    if (t >= tStart && t <= tEnd) return stateAt(t)[1] * bg.H0;
    const a = scaleFactorAt(tGyr);
    return (t < tStart ? 1 : -1) * Math.sqrt(bg.E2(a)) * bg.H0;
  };
  const samples = (n = 512): HistorySamples => {
    const lo = tStart, hi = tEnd;
    const ts: number[] = [];
    for (let i = 0; i < n; i++) ts.push(lo + (hi - lo) * i / (n - 1));
    for (const e of events) {
      const t = e.tGyr / tH + tOrigin;
      if (t > lo && t < hi) ts.push(t);
    }
    ts.sort((x, y) => x - y);
    const m = ts.length;
    const out: HistorySamples = { t: new Float64Array(m), a: new Float64Array(m), H: new Float64Array(m), q: new Float64Array(m) };
    for (let i = 0; i < m; i++) {
      const s = stateAt(ts[i]);
      const a = Math.exp(s[0]);
      out.t[i] = toGyr(ts[i]);
      out.a[i] = a;
      out.H[i] = s[1] * bg.H0;
      out.q[i] = s[1] === 0 ? -Math.sign(bg.accel(a)) * Infinity : -bg.accel(a) / (s[1] * s[1]);
    }
    return out;
  };

  const zMax = origin === 'bounce' ? 1 / aMinPast - 1 : Infinity;
  const zMinFuture = Number.isFinite(aMaxFuture) ? 1 / aMaxFuture - 1 : -1;
  const notes: string[] = [];
  if (origin === 'bounce') notes.push(`the past ends in a bounce at a = ${aMinPast.toPrecision(6)}: redshifts above ${zMax.toPrecision(6)} are never reached, and below it each redshift is seen twice (before and after the bounce)`);
  if (Number.isFinite(aMaxFuture)) notes.push(`the model turns around at a = ${aMaxFuture.toPrecision(6)} (z = ${zMinFuture.toPrecision(6)}); after that, a no longer grows with time and z stops labelling times uniquely`);
  if (notes.length === 0) notes.push('a grows monotonically over the whole solved life, so redshift is a good time coordinate');

  return {
    origin,
    ageGyr: origin === 'eternal' ? NaN : -tOrigin * tH,
    fate,
    events,
    tRange: [toGyr(origin === 'bang' ? tOrigin : tStart), toGyr(fate === 'crunch' ? tCrunch : fate === 'rip' ? events[events.length - 1].tGyr / tH + tOrigin : tEnd)],
    redshiftCoordinate: { zMax, zMinFuture, note: notes.join('; ') },
    warnings,
    scaleFactorAt,
    hubbleAt,
    samples,
    raw: { past, future, tOrigin },
  };
}
