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
  script: CompiledScript;
  recipes: Record<string, CompiledScript>;
  params: Record<string, number>;
  seed: number;
  limits: SandboxLimits;
  datasets: Record<string, DatasetTable>;
  /** Int32Array over a SharedArrayBuffer: [0] cancel flag (1 = cancel), [1] started flag. */
  control: SharedArrayBuffer;
}

export interface Sandbox {
  run(job: RunJob, signal?: AbortSignal): Promise<RunResult>;
  close(): Promise<void>;
}

export const CONTROL_CANCEL = 0;
export const CONTROL_STARTED = 1;
