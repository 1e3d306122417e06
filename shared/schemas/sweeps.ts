import { z } from 'zod';

/**
 * Sweeps: one recipe or script run over a grid (or list) of input values, collected into one table.
 * A sweep varies one to three inputs; the others are fixed.
 */

const finite = (what: string) => z.number({ error: `${what} must be a number` }).refine(Number.isFinite, { error: `${what} must be finite` });

export const RangeAxisSchema = z.strictObject({
  from: finite('from'),
  to: finite('to'),
  steps: z.number({ error: 'steps must be a number' }).int({ error: 'steps must be a whole number' }).min(1, { error: 'steps must be at least 1' }).max(100_000, { error: 'steps must be at most 100000' }),
  scale: z.enum(['linear', 'log'], { error: "scale must be 'linear' or 'log'" }).default('linear'),
});

export const ListAxisSchema = z.strictObject({
  values: z.array(finite('each value'), { error: 'values must be a list of numbers' }).min(1, { error: 'values must hold at least one number' }).max(100_000, { error: 'values may hold at most 100000 numbers' }),
});

/**
 * An axis is a list when it has `values`, a range otherwise; choosing the branch first lets the error
 * name the exact field that is wrong (a plain union would only say that neither shape matched).
 */
export const SweepAxisSchema = z.unknown().transform((v, ctx): z.output<typeof RangeAxisSchema> | z.output<typeof ListAxisSchema> => {
  if (v === null || typeof v !== 'object' || Array.isArray(v)) {
    ctx.addIssue({ code: 'custom', message: 'each input needs either {from, to, steps, scale} or {values}' });
    return z.NEVER;
  }
  const r = ('values' in v ? ListAxisSchema : RangeAxisSchema).safeParse(v);
  if (!r.success) {
    for (const issue of r.error.issues) ctx.addIssue({ code: 'custom', message: issue.message, path: issue.path });
    return z.NEVER;
  }
  return r.data;
});
export type SweepAxis = z.infer<typeof SweepAxisSchema>;

const inputName = z.string().regex(/^[A-Za-z_][A-Za-z0-9_]{0,63}$/, { error: 'input names are identifiers (letters, digits, _)' });

export const CreateSweepSchema = z
  .strictObject({
    groupId: z.number().int().positive(),
    title: z.string().trim().max(200).optional(),
    source: z.string().min(1, { error: 'source must not be empty' }).max(200_000).optional(),
    language: z.enum(['ts', 'js']).default('ts'),
    recipeId: z.number().int().positive().optional(),
    inputs: z
      .record(inputName, SweepAxisSchema)
      .refine((r) => Object.keys(r).length >= 1, { error: 'choose at least one input to vary' })
      .refine((r) => Object.keys(r).length <= 3, { error: 'a sweep varies at most three inputs' }),
    fixed: z.record(inputName, finite('a fixed input')).default({}),
    seed: z.number().int().min(0).max(2 ** 31 - 1).optional(),
    notify: z.boolean().default(false),
  })
  .refine((b) => (b.source === undefined) !== (b.recipeId === undefined), {
    error: 'give exactly one of source or recipeId',
    path: ['source'],
  })
  .refine((b) => Object.keys(b.inputs).every((k) => !(k in b.fixed)), {
    error: 'an input cannot be both varied and fixed',
    path: ['fixed'],
  });
export type CreateSweep = z.infer<typeof CreateSweepSchema>;

export const SweepStatusSchema = z.enum(['queued', 'running', 'done', 'cancelled', 'failed']);
export type SweepStatus = z.infer<typeof SweepStatusSchema>;

export interface SweepSummary {
  id: number;
  groupId: number;
  title: string;
  status: SweepStatus;
  total: number;
  completed: number;
  failed: number;
  recipeId: number | null;
  recipeVersion: number | null;
  inputs: Record<string, SweepAxis>;
  fixed: Record<string, number>;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  createdByName: string;
  notify: boolean;
  error: string | null;
}

/** One streamed progress event (SSE `progress`, then a final `end`). */
export interface SweepProgress {
  id: number;
  status: SweepStatus;
  total: number;
  completed: number;
  failed: number;
  /** Estimated milliseconds left, from the rate so far; null before the first point. */
  etaMs: number | null;
  elapsedMs: number;
}

export const SweepResultsQuerySchema = z.strictObject({
  format: z.enum(['json', 'csv']).default('json'),
});

/** The results table: input columns first, then every value any point reported, then status. */
export interface SweepResults {
  sweep: SweepSummary;
  inputNames: string[];
  valueNames: string[];
  units: Record<string, string>;
  columns: string[];
  /** One row per point in grid order: inputs, values (null where a point did not report one). */
  rows: (number | null)[][];
  /** Per point: 'done' | 'error' | 'limit' | 'cancelled' and the error message if any. */
  points: { index: number; status: string; error: string | null }[];
  /** For a value named like chi2: the best point and the Δχ² levels of the 68.3 % / 95.4 % contours in 2-D. */
  best: { valueName: string; index: number; inputs: Record<string, number>; value: number } | null;
}

export const ListSweepsQuerySchema = z.strictObject({
  limit: z.coerce.number().int().min(1).max(200).default(50),
});

export const SweepDeclarationsSchema = z.strictObject({
  source: z.string().min(1, { error: 'source must not be empty' }).max(200_000),
  language: z.enum(['ts', 'js']).default('ts'),
});
