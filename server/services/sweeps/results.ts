import type { SweepResults, SweepSummary } from '../../../shared/schemas/sweeps';
import type { PointRecord } from './store';
import { buildGrid, pointInputs } from './grid';

/** A value reported under one of these names is treated as a χ² (best point, Δχ² contours). */
export function isChi2Name(name: string): boolean {
  return /^(chi2|chisq|chi_?squared|χ²|χ2)(\b|_|$)/i.test(name) || /(^|_)chi2$/i.test(name);
}

/**
 * The one results table of a sweep: a row per grid point in grid order (inputs, then every value
 * any point reported), whether or not the point has run yet, so the table's shape never changes.
 */
export function buildResults(sweep: SweepSummary, points: PointRecord[]): SweepResults {
  const grid = buildGrid(sweep.inputs);
  const valueNames: string[] = [];
  const units: Record<string, string> = {};
  const seen = new Set<string>();
  for (const p of points) {
    for (const name of Object.keys(p.values)) {
      if (!seen.has(name)) {
        seen.add(name);
        valueNames.push(name);
      }
    }
    for (const [name, unit] of Object.entries(p.units)) if (!(name in units)) units[name] = unit;
  }
  const byIndex = new Map(points.map((p) => [p.index, p]));
  const rows: (number | null)[][] = [];
  const status: SweepResults['points'] = [];
  for (let i = 0; i < grid.total; i++) {
    const inputs = pointInputs(grid, i);
    const p = byIndex.get(i);
    rows.push([...grid.names.map((n) => inputs[n]!), ...valueNames.map((v) => p?.values[v] ?? null)]);
    status.push({ index: i, status: p?.status ?? 'pending', error: p?.error ?? null });
  }
  let best: SweepResults['best'] = null;
  const chiName = valueNames.find(isChi2Name);
  if (chiName) {
    const col = grid.names.length + valueNames.indexOf(chiName);
    let bestIndex = -1;
    let bestValue = Infinity;
    rows.forEach((r, i) => {
      const v = r[col];
      if (typeof v === 'number' && Number.isFinite(v) && v < bestValue) {
        bestValue = v;
        bestIndex = i;
      }
    });
    if (bestIndex >= 0) best = { valueName: chiName, index: bestIndex, inputs: pointInputs(grid, bestIndex), value: bestValue };
  }
  return {
    sweep,
    inputNames: grid.names,
    valueNames,
    units,
    columns: [...grid.names, ...valueNames],
    rows,
    points: status,
    best,
  };
}

function csvCell(v: string | number | null): string {
  if (v === null) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : '';
  return /[",\n\r]/.test(v) ? `"${v.replace(/"/g, '""')}"` : v;
}

/** RFC 4180 CSV: a header with units in brackets, then one line per point with its status. */
export function resultsToCsv(r: SweepResults): string {
  const header = [...r.columns.map((c) => (r.units[c] ? `${c} [${r.units[c]}]` : c)), 'status', 'error'];
  const lines = [header.map(csvCell).join(',')];
  r.rows.forEach((row, i) => {
    const p = r.points[i]!;
    lines.push([...row.map(csvCell), csvCell(p.status), csvCell(p.error)].join(','));
  });
  return lines.join('\r\n') + '\r\n';
}
