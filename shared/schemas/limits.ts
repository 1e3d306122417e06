import { z } from 'zod';

/**
 * Sandbox limits: what one run may take. Each field has a range the admin may choose from, a default,
 * and a one-line explanation shown beside the field in the admin form.
 */
export const LIMIT_FIELDS = {
  wallTimeMs: {
    min: 100, max: 600_000, default: 5_000, unit: 'ms',
    label: 'Wall time',
    explanation: 'How long one run may take from start to finish before it is stopped.',
  },
  memoryMb: {
    min: 8, max: 1_024, default: 64, unit: 'MB',
    label: 'Memory',
    explanation: 'Memory the script itself may allocate inside the sandbox (arrays, strings, objects).',
  },
  stackKb: {
    min: 64, max: 4_096, default: 512, unit: 'kB',
    label: 'Stack depth',
    explanation: 'Stack the script may use; bounds how deeply functions may call themselves.',
  },
  outputKb: {
    min: 1, max: 65_536, default: 2_048, unit: 'kB',
    label: 'Output size',
    explanation: 'Total size of values, tables, plots and printed log lines one run may produce.',
  },
  kernelCalls: {
    min: 1, max: 10_000_000, default: 100_000, unit: 'calls',
    label: 'Kernel calls',
    explanation: 'How many times one run may call the cosmology kernel (each universe method call counts once).',
  },
  arrayLength: {
    min: 1, max: 10_000_000, default: 1_000_000, unit: 'elements',
    label: 'Array length per call',
    explanation: 'Longest array one kernel call, grid or output column may take or make.',
  },
  concurrentRuns: {
    min: 1, max: 64, default: 2, unit: 'runs',
    label: 'Concurrent runs per user',
    explanation: 'How many runs one member may have going at the same time; further requests are refused.',
  },
  sweepPoints: {
    min: 1, max: 1_000_000, default: 10_000, unit: 'points',
    label: 'Sweep points',
    explanation: 'Most parameter points one sweep may contain.',
  },
} as const;

export type LimitName = keyof typeof LIMIT_FIELDS;
export const LIMIT_NAMES = Object.keys(LIMIT_FIELDS) as LimitName[];

function field(name: LimitName) {
  const f = LIMIT_FIELDS[name];
  return z
    .number({ error: `${name} must be a number (${f.unit})` })
    .int({ error: `${name} must be a whole number of ${f.unit}` })
    .min(f.min, { error: `${name} must be at least ${f.min} ${f.unit}` })
    .max(f.max, { error: `${name} must be at most ${f.max} ${f.unit}` });
}

type LimitShape<T> = { [K in LimitName]: T };
const limitShape = <T>(make: (name: LimitName) => T): LimitShape<T> =>
  Object.fromEntries(LIMIT_NAMES.map((n) => [n, make(n)])) as LimitShape<T>;

export const SandboxLimitsSchema = z.strictObject(limitShape(field));
export type SandboxLimits = z.infer<typeof SandboxLimitsSchema>;

export const DEFAULT_LIMITS: SandboxLimits = limitShape((n) => LIMIT_FIELDS[n].default);

/** PUT /api/admin/limits: any subset of the fields. */
export const UpdateLimitsSchema = SandboxLimitsSchema.partial();
export type UpdateLimits = z.infer<typeof UpdateLimitsSchema>;

/** PUT /api/admin/groups/:groupId/limits: a field set to null clears that group's override. */
export const GroupLimitOverridesSchema = z.strictObject(limitShape((n) => field(n).nullable().optional()));
export type GroupLimitOverrides = z.infer<typeof GroupLimitOverridesSchema>;

export interface LimitFieldInfo {
  min: number;
  max: number;
  default: number;
  unit: string;
  label: string;
  explanation: string;
}

/** GET /api/admin/limits */
export interface LimitsResponse {
  limits: SandboxLimits;
  defaults: SandboxLimits;
  fields: Record<LimitName, LimitFieldInfo>;
}

/** GET /api/admin/groups/:groupId/limits */
export interface GroupLimitsResponse {
  groupId: number;
  /** Only the fields this group overrides. */
  overrides: Partial<SandboxLimits>;
  /** Site-wide limits with this group's overrides applied: what the group's next run gets. */
  effective: SandboxLimits;
  fields: Record<LimitName, LimitFieldInfo>;
}

/** Human wording of a limit, used in the messages a user sees when a run is stopped. */
export function describeLimit(name: LimitName, value: number): string {
  const f = LIMIT_FIELDS[name];
  return `${f.label.toLowerCase()} limit of ${value} ${f.unit}`;
}
