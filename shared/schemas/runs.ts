import { z } from 'zod';
import type { SandboxLimits, LimitName } from './limits';
import type { OutputItem, ParamDeclaration } from './outputs';

export const RUN_STATUSES = ['running', 'done', 'error', 'limit', 'cancelled'] as const;
export type RunStatus = (typeof RUN_STATUSES)[number];

export const ScriptLanguage = z.enum(['ts', 'js']);
export type ScriptLanguage = z.infer<typeof ScriptLanguage>;

/** Largest script accepted, characters (common practice: a script block is a few hundred lines at most). */
export const MAX_SOURCE_CHARS = 200_000;

const ParamsRecord = z.record(
  z.string().min(1).max(100),
  z.number({ error: 'every parameter must be a number' }).finite('parameters must be finite numbers'),
);

/** POST /api/runs */
export const CreateRunSchema = z.strictObject({
  source: z.string({ error: 'source is required' }).max(MAX_SOURCE_CHARS, `source must be at most ${MAX_SOURCE_CHARS} characters`),
  language: ScriptLanguage.optional(),
  params: ParamsRecord.optional(),
  seed: z.number().int('seed must be a whole number').min(0).max(0xffffffff).optional(),
  groupId: z.number().int().positive().optional(),
  notebookId: z.number().int().positive().optional(),
  notebookVersion: z.number().int().positive().optional(),
  blockId: z.string().min(1).max(100).optional(),
});
export type CreateRun = z.infer<typeof CreateRunSchema>;

/** GET /api/runs */
export const ListRunsQuerySchema = z.object({
  groupId: z.coerce.number().int().positive().optional(),
  notebookId: z.coerce.number().int().positive().optional(),
  blockId: z.string().min(1).max(100).optional(),
  recipeId: z.coerce.number().int().positive().optional(),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});
export type ListRunsQuery = z.infer<typeof ListRunsQuerySchema>;

export const RunIdParamsSchema = z.object({ id: z.coerce.number().int().positive() });

export interface RunError {
  message: string;
  /** 1-based line in the user's source. */
  line?: number;
  /** 1-based column in the user's source. */
  column?: number;
  /** Which limit stopped the run (status 'limit'). */
  limit?: LimitName;
}

/** A stored run, as the API returns it. */
export interface Run {
  id: number;
  userId: number;
  groupId: number | null;
  status: RunStatus;
  language: ScriptLanguage;
  source: string;
  /** SHA-256 of the source, hex. */
  sourceHash: string;
  params: Record<string, number>;
  seed: number;
  limits: SandboxLimits;
  kernelVersion: string;
  notebookId: number | null;
  notebookVersion: number | null;
  blockId: string | null;
  recipeId: number | null;
  recipeVersion: number | null;
  outputs: OutputItem[];
  logs: string[];
  error: RunError | null;
  declaredParams: ParamDeclaration[];
  kernelCalls: number;
  /** Wall time of the run inside the sandbox, ms. */
  durationMs: number;
  /** CPU time of the worker thread during the run, ms. */
  cpuMs: number;
  createdAt: string;
  finishedAt: string | null;
}

export interface RunResponse {
  run: Run;
}

/** Runs in a list leave out source and outputs (fetch the run for those). */
export type RunSummary = Omit<Run, 'source' | 'outputs' | 'logs'>;

export interface RunListResponse {
  runs: RunSummary[];
  page: number;
  pageSize: number;
  total: number;
}
