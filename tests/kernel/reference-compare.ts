/**
 * Shared comparison of the kernel against a reference JSON written by tests/reference/make_reference.py
 * (used by reference.test.ts on the committed file and by reference-live.test.ts on a fresh one).
 */
import { universe, type UniverseParams, type Universe } from '../../server/kernel/index';

export interface RefModel {
  name: string;
  params: Record<string, unknown>;
  z: number[];
  astropy: Record<string, (number | null)[]>;
  quad: Record<string, number[]>;
  exact?: { z: number[]; E: number[]; comovingDistance: number[]; age: number[] };
}
export interface RefFile { astropy: string; models: RefModel[]; nuEnergy?: { y: number; F: number }[] }

/** Kernel value of an astropy-named quantity at the model's redshifts. */
export function kernelValues(m: Universe, key: string, z: number[]): Float64Array {
  switch (key) {
    case 'angularDiameterDistanceBetweenHalf':
      return m.angularDiameterDistanceBetween(z.map((v) => v / 2), z) as Float64Array;
    default: {
      const f = (m as unknown as Record<string, (z: number[]) => Float64Array>)[key];
      if (typeof f !== 'function') throw new Error(`no kernel method for ${key}`);
      return f.call(m, z);
    }
  }
}

/** Relative difference, with an absolute floor for quantities that vanish (z = 0, Ω = 0). */
export function relErr(k: number, r: number, floor = 1e-300): number {
  if (r === 0 && k === 0) return 0;
  return Math.abs(k - r) / Math.max(Math.abs(r), floor);
}

export interface Worst { key: string; model: string; z: number; err: number }

/**
 * Max relative error per quantity of the kernel against one section ('astropy' or 'quad') of a reference file.
 * Quantities that are exactly zero in the reference (distances at z = 0, Ω of an absent component) are
 * compared absolutely.
 */
export function compare(ref: RefFile, section: 'astropy' | 'quad', pick?: (m: RefModel) => boolean): Map<string, Worst> {
  const worst = new Map<string, Worst>();
  for (const rm of ref.models) {
    if (pick && !pick(rm)) continue;
    const model = universe(rm.params as unknown as UniverseParams);
    const data = rm[section] as Record<string, (number | null)[]>;
    for (const [key, vals] of Object.entries(data)) {
      const zs: number[] = [], rs: number[] = [];
      // astropy's comoving volume is Hogg's closed form in D_M, which for a closed model turns down past
      // the equator (√|Ω_k| χ > π/2) although the enclosed volume keeps growing; the kernel integrates
      // S_k² (checked against the 3-sphere in analytic-distances.test.ts), so those points are skipped.
      const beyondEquator = (z: number) => {
        if (key !== 'comovingVolume' || !(model.omegaK0 < 0)) return false;
        return (Math.sqrt(-model.omegaK0) * model.comovingDistance(z)) / model.hubbleDistance > Math.PI / 2;
      };
      vals.forEach((v, i) => { if (v !== null && Number.isFinite(v) && !beyondEquator(rm.z[i])) { zs.push(rm.z[i]); rs.push(v); } });
      if (!zs.length) continue;
      const ks = kernelValues(model, key, zs);
      for (let i = 0; i < zs.length; i++) {
        // Ω of an absent component is 0 in both; at z = 0 distances vanish: absolute 1e-12 there.
        const err = rs[i] === 0 ? Math.abs(ks[i]) : relErr(ks[i], rs[i]);
        const w = worst.get(key);
        if (!w || err > w.err || Number.isNaN(err)) worst.set(key, { key, model: rm.name, z: zs[i], err: Number.isNaN(err) ? Infinity : err });
      }
    }
  }
  return worst;
}
