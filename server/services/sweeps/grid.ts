import type { SweepAxis } from '../../../shared/schemas/sweeps';

/**
 * The points of a sweep: the Cartesian product of its axes, the first axis varying slowest, so a
 * point's index fixes its inputs and a resumed sweep knows exactly which points are still missing.
 */
export interface SweepGrid {
  names: string[];
  axes: Float64Array[];
  total: number;
}

export function axisValues(name: string, axis: SweepAxis): Float64Array {
  if ('values' in axis) return Float64Array.from(axis.values);
  const { from, to, steps, scale } = axis;
  if (scale === 'log' && (from <= 0 || to <= 0)) {
    throw new GridError(`inputs.${name}`, `a logarithmic axis needs from and to above zero (got ${from} to ${to})`);
  }
  const out = new Float64Array(steps);
  if (steps === 1) {
    out[0] = from;
    return out;
  }
  if (scale === 'log') {
    const l0 = Math.log(from);
    const l1 = Math.log(to);
    for (let i = 0; i < steps; i++) out[i] = Math.exp(l0 + ((l1 - l0) * i) / (steps - 1));
    // Pin the ends so that a round trip through exp(log(x)) does not move the user's bounds.
    out[0] = from;
    out[steps - 1] = to;
  } else {
    for (let i = 0; i < steps; i++) out[i] = from + ((to - from) * i) / (steps - 1);
  }
  return out;
}

export class GridError extends Error {
  constructor(
    readonly field: string,
    message: string,
  ) {
    super(message);
  }
}

export function buildGrid(inputs: Record<string, SweepAxis>): SweepGrid {
  const names = Object.keys(inputs);
  const axes = names.map((n) => axisValues(n, inputs[n]!));
  const total = axes.reduce((p, a) => p * a.length, 1);
  return { names, axes, total };
}

/** The inputs of point `index` (0 ≤ index < total). */
export function pointInputs(grid: SweepGrid, index: number): Record<string, number> {
  const out: Record<string, number> = {};
  let rest = index;
  for (let k = grid.axes.length - 1; k >= 0; k--) {
    const axis = grid.axes[k]!;
    out[grid.names[k]!] = axis[rest % axis.length]!;
    rest = Math.floor(rest / axis.length);
  }
  return out;
}
