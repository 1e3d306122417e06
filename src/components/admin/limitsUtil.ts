import type { LimitFieldInfo, LimitName } from '../../../shared/schemas/limits';
import { formatInteger } from '../datasets/format';

export type LimitFields = Record<LimitName, LimitFieldInfo>;

export function orderedKeys(fields: LimitFields): LimitName[] {
  return Object.keys(fields) as LimitName[];
}

/** Same check the server's schema makes, done first so a slip is caught beside the field. */
export function checkLimit(f: LimitFieldInfo, v: number | null | undefined): string | null {
  if (v === null || v === undefined || Number.isNaN(v)) return `Enter a whole number of ${f.unit}.`;
  if (!Number.isInteger(v)) return `Use a whole number of ${f.unit}.`;
  if (v < f.min || v > f.max) return `Choose between ${formatInteger(f.min)} and ${formatInteger(f.max)} ${f.unit}.`;
  return null;
}

export function rangeText(f: LimitFieldInfo): string {
  return `${formatInteger(f.min)} – ${formatInteger(f.max)} ${f.unit}`;
}

/** Big limits are read more easily with digit groups (thin spaces); typing may use spaces or commas. */
export function formatLimit(v: number | null): string {
  return v === null || Number.isNaN(v) ? '' : Number.isInteger(v) ? formatInteger(v) : String(v);
}
export function parseLimit(s: string): number | null {
  const t = s.replace(/[\s\u202f,_]/g, '');
  if (t === '') return null;
  const n = Number(t);
  return Number.isNaN(n) ? null : n;
}
