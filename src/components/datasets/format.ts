const dateFmt = new Intl.DateTimeFormat(undefined, { year: 'numeric', month: 'short', day: 'numeric' });
const dateTimeFmt = new Intl.DateTimeFormat(undefined, { year: 'numeric', month: 'short', day: 'numeric', hour: '2-digit', minute: '2-digit' });

/** SQLite hands out "YYYY-MM-DD HH:MM:SS" in UTC; read it as UTC, not local time. */
function parse(s: string | null | undefined): Date | null {
  if (!s) return null;
  const iso = /^\d{4}-\d{2}-\d{2} \d{2}:\d{2}/.test(s) ? `${s.replace(' ', 'T')}Z` : s;
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? null : d;
}

export function formatDate(s: string | null | undefined): string {
  const d = parse(s);
  return d ? dateFmt.format(d) : '—';
}
export function formatDateTime(s: string | null | undefined): string {
  const d = parse(s);
  return d ? dateTimeFmt.format(d) : '—';
}

/**
 * Numbers for tables: up to 6 significant digits, exponent form outside 1e-4..1e6 so columns of
 * redshifts, moduli and covariances all stay readable.
 */
export function formatNumber(v: number | null | undefined, digits = 6): string {
  if (v === null || v === undefined || Number.isNaN(v)) return '—';
  if (!Number.isFinite(v)) return v > 0 ? '∞' : '−∞';
  if (v === 0) return '0';
  const a = Math.abs(v);
  const s = a >= 1e6 || a < 1e-4 ? v.toExponential(digits - 1).replace(/\.?0+e/, 'e') : String(Number(v.toPrecision(digits)));
  return s.replace('-', '−');
}

export function formatInteger(v: number): string {
  return v.toLocaleString('en-US').replace(/,/g, '\u202f');
}
