import type { SandboxLimits, LimitName } from '../../shared/schemas/limits';
import type { OutputItem, ParamDeclaration } from '../../shared/schemas/outputs';

/** A dataset as handed to a run: columns by name with their values, and the covariance if uploaded. */
export interface DatasetTable {
  name: string;
  /** 'distance_modulus' | 'hubble' | 'fsigma8' | 'table' (shared/schemas/datasets.ts). */
  kind: string;
  columns: { name: string; unit?: string; values: number[] }[];
  /** Row-major covariance matrix (n × n), same unit² as the value column. */
  cov?: number[][];
}

export interface RecipeSource {
  source: string;
  language: 'ts' | 'js';
}

export interface RunJob {
  source: string;
  language: 'ts' | 'js';
  params: Record<string, number>;
  /** Unsigned 32-bit seed of random() / Math.random. */
  seed: number;
  limits: SandboxLimits;
  /** Datasets the script may read by name. */
  datasets: Record<string, DatasetTable>;
  /** Recipes the script may call by name with recipe(name, inputs). */
  recipes: Record<string, RecipeSource>;
}

export type RunStatusFinal = 'done' | 'error' | 'limit' | 'cancelled';

export interface RunResultError {
  message: string;
  line?: number;
  column?: number;
  limit?: LimitName;
}

export interface RunResult {
  status: RunStatusFinal;
  outputs: OutputItem[];
  logs: string[];
  error?: RunResultError;
  /** Wall time of the run from the moment a worker started it, ms. */
  durationMs: number;
  /** Time the worker thread spent running the script (the bridge is synchronous, so ≈ CPU time), ms. */
  cpuMs: number;
  kernelCalls: number;
  declaredParams: ParamDeclaration[];
}

/** A script after the TypeScript pass: plain JS plus the source map back to the user's lines. */
export interface CompiledScript {
  code: string;
  /** Source map JSON (TypeScript only). */
  map?: string;
}

/** Message from the pool to a worker. */
export interface WorkerTask {
  kind?: 'run';
  script: CompiledScript;
  recipes: Record<string, CompiledScript>;
  params: Record<string, number>;
  seed: number;
  limits: SandboxLimits;
  datasets: Record<string, DatasetTable>;
  /** Int32Array over a SharedArrayBuffer: [0] cancel flag (1 = cancel), [1] started flag. */
  control: SharedArrayBuffer;
}

/** A chunk of sweep points for one worker: one script, many parameter sets (see Sandbox.runBatch). */
export interface WorkerBatchTask extends Omit<WorkerTask, 'kind' | 'params'> {
  kind: 'batch';
  paramsList: Record<string, number>[];
  /**
   * Int32Array over a SharedArrayBuffer: [0] cancel flag, [1] started flag, [2] index in paramsList of
   * the point now running (-1 before the first).
   */
  control: SharedArrayBuffer;
  /** Each point's result is posted here as `{j, result}` the moment it is known. */
  port: import('node:worker_threads').MessagePort;
}

/** Everything a sweep's points share: a RunJob without its params. */
export type BatchJob = Omit<RunJob, 'params'>;

export interface Sandbox {
  run(job: RunJob, signal?: AbortSignal): Promise<RunResult>;
  /**
   * Run one script for each parameter set in `paramsList` (a sweep): each point starts from a fresh context's state,
   * its own wall-time deadline and the same limits as a run; `onResult(i, result)` is called exactly
   * once per index as points finish, in no particular order. On abort, points not yet finished are
   * reported with status 'cancelled'. Resolves when every index has been reported.
   */
  runBatch?(
    base: BatchJob,
    paramsList: Record<string, number>[],
    signal: AbortSignal | undefined,
    onResult: (i: number, result: RunResult) => void,
  ): Promise<void>;
  close(): Promise<void>;
}

export const CONTROL_CANCEL = 0;
export const CONTROL_STARTED = 1;
export const CONTROL_CURRENT = 2;
