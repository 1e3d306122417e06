/** How a declared input reads in lists and forms: its label with the unit, and its allowed range. */
import type { ParamDeclaration } from '../../../shared/schemas/recipes';
import { formatNumber } from '../outputs/format';

export function paramTitle(p: ParamDeclaration): string {
  return p.label || p.name;
}

export function rangeText(p: Pick<ParamDeclaration, 'min' | 'max'>): string {
  if (p.min !== undefined && p.max !== undefined) return `${formatNumber(p.min)} … ${formatNumber(p.max)}`;
  if (p.min !== undefined) return `≥ ${formatNumber(p.min)}`;
  if (p.max !== undefined) return `≤ ${formatNumber(p.max)}`;
  return 'any number';
}

/** Why a value is refused for this input, or '' when it is fine (the same rule the server applies). */
export function rangeProblem(p: ParamDeclaration, v: number | null | undefined): string {
  if (v === null || v === undefined || !Number.isFinite(v)) return 'Enter a number.';
  const unit = p.unit ? ` ${p.unit}` : '';
  if (p.min !== undefined && v < p.min) return `Below the allowed range: at least ${formatNumber(p.min)}${unit}.`;
  if (p.max !== undefined && v > p.max) return `Above the allowed range: at most ${formatNumber(p.max)}${unit}.`;
  return '';
}
