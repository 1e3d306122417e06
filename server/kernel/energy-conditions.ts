/**
 * The pointwise energy conditions for perfect fluids (Hawking & Ellis 1973, The Large Scale Structure
 * of Space-Time, §4.3; Visser 1995, Lorentzian Wormholes, ch. 12), with p = w ρ c²:
 *   null      ρ + p ≥ 0
 *   weak      ρ ≥ 0 and ρ + p ≥ 0
 *   strong    ρ + 3p ≥ 0 and ρ + p ≥ 0
 *   dominant  ρ ≥ |p|
 * checked per component and for the total (curvature is geometry, not matter, and is left out),
 * over a redshift range, reporting the sub-ranges where each fails (grid bracketing, then Brent).
 */
import type { Background } from './background';
import { SETTINGS } from './settings';
import { brent } from './ode';
import { pastLimit } from './history';

export type ConditionName = 'null' | 'weak' | 'strong' | 'dominant';
export const CONDITION_NAMES: readonly ConditionName[] = ['null', 'weak', 'strong', 'dominant'];

export interface ConditionResult {
  holds: boolean;
  /** Redshift intervals [zLo, zHi] inside [0, zMax] where the condition fails. */
  failsOn: [number, number][];
}
export type ConditionSet = Record<ConditionName, ConditionResult>;

export interface EnergyConditionsReport {
  zMax: number;
  total: ConditionSet;
  components: Record<string, ConditionSet>;
}

/** Margin of a condition: ≥ 0 where it holds (min over its inequalities), for density ρ and pressure p. */
export function conditionMargin(name: ConditionName, rho: number, p: number): number {
  switch (name) {
    case 'null': return rho + p;
    case 'weak': return Math.min(rho, rho + p);
    case 'strong': return Math.min(rho + 3 * p, rho + p);
    case 'dominant': return rho - Math.abs(p);
  }
}

type RhoP = (a: number) => [number, number];

/** Margin with a relative slack of 1e-12, so that Λ's exact ρ + p = 0 does not flicker. */
function slackMargin(name: ConditionName, rho: number, p: number): number {
  const m = conditionMargin(name, rho, p);
  return m >= -1e-12 * (Math.abs(rho) + Math.abs(p)) ? Math.max(m, Number.MIN_VALUE) : m;
}

function evaluate(rhoP: RhoP, zMax: number): ConditionSet {
  // One grid, uniform in ln(1+z), evaluated once for all four conditions; failure edges between
  // grid points are refined by Brent's method on the (continuous) margin.
  const L = Math.log1p(zMax);
  const nGrid = Math.max(64, Math.ceil(L * SETTINGS.scanPerLnA * 4));
  const zs = new Float64Array(nGrid + 1), rho = new Float64Array(nGrid + 1), p = new Float64Array(nGrid + 1);
  for (let i = 0; i <= nGrid; i++) {
    zs[i] = i === nGrid ? zMax : Math.expm1(L * i / nGrid);
    [rho[i], p[i]] = rhoP(1 / (1 + zs[i]));
  }
  const set = {} as ConditionSet;
  for (const name of CONDITION_NAMES) {
    const g = (z: number) => { const [r, pp] = rhoP(1 / (1 + z)); return slackMargin(name, r, pp); };
    const edge = (z1: number, z2: number) => brent(g, z1, z2, SETTINGS.edgeTolerance * Math.max(1, z2));
    const failsOn: [number, number][] = [];
    let start: number | null = slackMargin(name, rho[0], p[0]) < 0 ? 0 : null;
    let prevF = start !== null;
    for (let i = 1; i <= nGrid; i++) {
      const f = slackMargin(name, rho[i], p[i]) < 0;
      if (f && !prevF) start = edge(zs[i - 1], zs[i]);
      if (!f && prevF && start !== null) { failsOn.push([start, edge(zs[i - 1], zs[i])]); start = null; }
      prevF = f;
    }
    if (start !== null) failsOn.push([start, zMax]);
    set[name] = { holds: failsOn.length === 0, failsOn };
  }
  return set;
}

/**
 * Null, weak, strong and dominant energy conditions over z ∈ [0, zMax] (dimensionless redshift),
 * for each component and the total. zMax is capped at the bounce redshift when the model bounces.
 */
export function energyConditions(bg: Background, opts: { zMax?: number } = {}): EnergyConditionsReport {
  let zMax = opts.zMax ?? 10;
  if (!(zMax > 0) || !Number.isFinite(zMax)) throw new RangeError(`energyConditions: zMax must be a finite number > 0, got ${zMax}`);
  const limit = pastLimit(bg);
  if (zMax > limit.zMax) zMax = limit.zMax;
  const components: Record<string, ConditionSet> = {};
  for (const c of bg.components) {
    components[c.name] = evaluate((a) => { const r = c.density(a); return [r, c.w(a) * r]; }, zMax);
  }
  const total = evaluate((a) => {
    let rho = 0, p = 0;
    for (const c of bg.components) { const r = c.density(a); rho += r; p += c.w(a) * r; }
    return [rho, p];
  }, zMax);
  return { zMax, total, components };
}
