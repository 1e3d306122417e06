/** Number formatting shared by every output, so a value reads the same in a table, a tooltip and a CSV. */

/** Six significant digits, scientific outside [1e-3, 1e6): enough to check a distance to 1 part in 1e5. */
export function formatNumber(v: unknown): string {
  if (v === null || v === undefined) return '—';
  if (typeof v === 'boolean') return v ? 'true' : 'false';
  if (typeof v !== 'number') return String(v);
  if (Number.isNaN(v)) return 'NaN';
  if (!Number.isFinite(v)) return v > 0 ? '∞' : '−∞';
  if (v === 0) return '0';
  const a = Math.abs(v);
  if (Number.isInteger(v) && a < 1e15) return String(v);
  if (a >= 1e-3 && a < 1e6) return String(Number(v.toPrecision(6)));
  return v.toExponential(4).replace('e+', 'e');
}

/** Full precision for files: a CSV is for further work, not for reading. */
export function csvNumber(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return Number.isFinite(v) ? String(v) : Number.isNaN(v) ? 'NaN' : v > 0 ? 'Infinity' : '-Infinity';
  const s = String(v);
  return /[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export function columnTitle(name: string, unit?: string): string {
  return unit ? `${name} [${unit}]` : name;
}
