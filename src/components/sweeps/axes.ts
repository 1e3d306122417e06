/**
 * The new-sweep form's model of one input and the checks it makes before anything is sent: the
 * same grid rules as the server (first input slowest; a log axis needs positive ends), and the
 * input's declared range.
 */
import type { ParamDeclaration } from '../../../shared/schemas/recipes';
import type { SweepAxis } from '../../../shared/schemas/sweeps';
import { formatNumber } from '../outputs/format';

export interface InputChoice {
  name: string;
  vary: boolean;
  mode: 'range' | 'list';
  from: number | null;
  to: number | null;
  steps: number | null;
  scale: 'linear' | 'log';
  /** the list, as typed: numbers separated by commas, spaces or semicolons */
  list: string;
  fixed: number | null;
}

export type ChoiceErrors = Partial<Record<'from' | 'to' | 'steps' | 'list' | 'fixed', string>>;

export function defaultChoice(p: ParamDeclaration): InputChoice {
  const span = Math.abs(p.default) > 0 ? Math.abs(p.default) / 2 : 1;
  const from = p.min ?? p.default - span;
  const to = p.max ?? p.default + span;
  return { name: p.name, vary: false, mode: 'range', from, to, steps: 10, scale: 'linear', list: '', fixed: p.default };
}

export function parseList(text: string): number[] | string {
  const parts = text.split(/[\s,;]+/).filter(Boolean);
  if (!parts.length) return 'Give at least one value.';
  const out: number[] = [];
  for (const s of parts) {
    const v = Number(s);
    if (!Number.isFinite(v)) return `“${s}” is not a number.`;
    out.push(v);
  }
  return out;
}

function outside(p: ParamDeclaration, v: number): string {
  const unit = p.unit ? ` ${p.unit}` : '';
  if (p.min !== undefined && v < p.min) return `${formatNumber(v)} is below the allowed range (at least ${formatNumber(p.min)}${unit}).`;
  if (p.max !== undefined && v > p.max) return `${formatNumber(v)} is above the allowed range (at most ${formatNumber(p.max)}${unit}).`;
  return '';
}

export function checkChoice(p: ParamDeclaration, c: InputChoice): ChoiceErrors {
  const e: ChoiceErrors = {};
  if (!c.vary) {
    if (c.fixed === null || !Number.isFinite(c.fixed)) e.fixed = 'Enter a number.';
    else if (outside(p, c.fixed)) e.fixed = outside(p, c.fixed);
    return e;
  }
  if (c.mode === 'list') {
    const l = parseList(c.list);
    if (typeof l === 'string') e.list = l;
    else {
      const bad = l.map((v) => outside(p, v)).find(Boolean);
      if (bad) e.list = bad;
      else if (l.length > 100_000) e.list = 'At most 100 000 values.';
    }
    return e;
  }
  if (c.from === null || !Number.isFinite(c.from)) e.from = 'Enter a number.';
  else if (outside(p, c.from)) e.from = outside(p, c.from);
  else if (c.scale === 'log' && c.from <= 0) e.from = 'A logarithmic axis needs values above zero.';
  if (c.to === null || !Number.isFinite(c.to)) e.to = 'Enter a number.';
  else if (outside(p, c.to)) e.to = outside(p, c.to);
  else if (c.scale === 'log' && c.to <= 0) e.to = 'A logarithmic axis needs values above zero.';
  if (c.steps === null || !Number.isInteger(c.steps) || c.steps < 1) e.steps = 'A whole number, at least 1.';
  else if (c.steps > 100_000) e.steps = 'At most 100 000 steps.';
  return e;
}

/** How many values the axis has, or null when it is not valid yet. */
export function axisLength(c: InputChoice): number | null {
  if (c.mode === 'list') {
    const l = parseList(c.list);
    return typeof l === 'string' ? null : l.length;
  }
  return c.steps !== null && Number.isInteger(c.steps) && c.steps >= 1 ? c.steps : null;
}

export function toAxis(c: InputChoice): SweepAxis {
  if (c.mode === 'list') {
    const l = parseList(c.list);
    return { values: typeof l === 'string' ? [] : l };
  }
  return { from: c.from ?? 0, to: c.to ?? 0, steps: c.steps ?? 1, scale: c.scale };
}

/** Axis values exactly as the server builds them (server/services/sweeps/grid.ts), for plots. */
export function axisValues(axis: SweepAxis): number[] {
  if ('values' in axis) return [...axis.values];
  const { from, to, steps, scale } = axis;
  if (steps === 1) return [from];
  const out: number[] = [];
  for (let i = 0; i < steps; i++) {
    out.push(scale === 'log' ? Math.exp(Math.log(from) + ((Math.log(to) - Math.log(from)) * i) / (steps - 1)) : from + ((to - from) * i) / (steps - 1));
  }
  out[0] = from;
  out[steps - 1] = to;
  return out;
}
