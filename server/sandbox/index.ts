/**
 * The sandbox: a piscina pool of worker threads, each running one script at a time in a fresh QuickJS
 * runtime. The event loop only compiles TypeScript (async esbuild) and waits; a script that ignores its
 * interrupt deadline gets its worker terminated (piscina replaces it).
 */
import { availableParallelism } from 'node:os';
import { pathToFileURL } from 'node:url';
import { Piscina } from 'piscina';
import { describeLimit } from '../../shared/schemas/limits';
import { workerFile } from './build';
import { compileScript } from './transpile';
import {
  CONTROL_CANCEL,
  CONTROL_STARTED,
  type CompiledScript,
  type RunJob,
  type RunResult,
  type Sandbox,
  type WorkerTask,
} from './types';

export type { RunJob, RunResult, Sandbox, DatasetTable, RecipeSource, RunResultError } from './types';

export interface SandboxOptions {
  /** Worker threads (default: the machine's cores, at most 2). */
  threads?: number;
  /** How long past its wall time a script may ignore the interrupt before its worker is killed, ms. */
  killGraceMs?: number;
  /** How long a cancelled script may take to stop before its worker is killed, ms. */
  cancelGraceMs?: number;
  /** Build the worker and start the pool now rather than at the first run (the server does). */
  prewarm?: boolean;
}

/** V8 stack of each worker: QuickJS's WASM frames live on it, so it must dwarf the largest stackKb. */
const WORKER_STACK_MB = 64;
/** Host heap of each worker (the kernel's arrays; QuickJS's own memory is capped by memoryMb). */
const WORKER_HEAP_MB = 512;
/** A roomy young generation: the kernel's many short-lived arrays otherwise cost frequent scavenges. */
const WORKER_YOUNG_MB = 64;

class HardStop extends Error {
  constructor(readonly reason: 'wallTimeMs' | 'cancelled') {
    super(reason);
  }
}

export function createSandbox(opts: SandboxOptions = {}): Sandbox {
  const threads = opts.threads ?? Math.max(1, Math.min(2, availableParallelism()));
  const killGraceMs = opts.killGraceMs ?? 1500;
  const cancelGraceMs = opts.cancelGraceMs ?? 500;
  let closed = false;

  // The pool starts at the first run (or now with prewarm), so an app that never runs a script, such
  // as most test apps, pays nothing for it.
  let poolReady: Promise<Piscina> | undefined;
  const pool = (): Promise<Piscina> => {
    poolReady ??= workerFile().then(
      (file) =>
        new Piscina({
          filename: pathToFileURL(file).href,
          minThreads: 1,
          maxThreads: threads,
          idleTimeout: 60_000,
          concurrentTasksPerWorker: 1,
          resourceLimits: { stackSizeMb: WORKER_STACK_MB, maxOldGenerationSizeMb: WORKER_HEAP_MB, maxYoungGenerationSizeMb: WORKER_YOUNG_MB },
        }),
    );
    return poolReady;
  };
  // An unhandled rejection here would crash the server before anyone asks for a run.
  if (opts.prewarm) pool().catch(() => undefined);

  async function run(job: RunJob, signal?: AbortSignal): Promise<RunResult> {
    if (closed) throw new Error('sandbox is closed');
    const empty = (status: RunResult['status'], error: RunResult['error']): RunResult => ({
      status, outputs: [], logs: [], error, durationMs: 0, cpuMs: 0, kernelCalls: 0, declaredParams: [],
    });
    if (signal?.aborted) return empty('cancelled', { message: 'Cancelled' });

    const compiled = await compileScript(job.source, job.language);
    if (!compiled.ok) return empty('error', compiled.error);
    const recipes: Record<string, CompiledScript> = {};
    for (const [name, r] of Object.entries(job.recipes ?? {})) {
      const c = await compileScript(r.source, r.language);
      if (!c.ok) {
        const where = c.error.line ? ` at its line ${c.error.line}, column ${c.error.column}` : '';
        return empty('error', { message: `recipe "${name}" cannot be compiled${where}: ${c.error.message}` });
      }
      recipes[name] = c.script;
    }

    const workers = await pool();
    const control = new SharedArrayBuffer(8);
    const flags = new Int32Array(control);
    const task: WorkerTask = {
      script: compiled.script,
      recipes,
      params: job.params ?? {},
      seed: job.seed >>> 0,
      limits: job.limits,
      datasets: job.datasets ?? {},
      control,
    };

    const hard = new AbortController();
    let startedAt: number | undefined;
    let cancelAt: number | undefined;
    const onCancel = () => {
      Atomics.store(flags, CONTROL_CANCEL, 1);
      cancelAt = Date.now();
      // Not started yet: nothing to stop politely, take it out of the queue.
      if (Atomics.load(flags, CONTROL_STARTED) === 0) hard.abort(new HardStop('cancelled'));
    };
    signal?.addEventListener('abort', onCancel, { once: true });
    const watchdog = setInterval(() => {
      const now = Date.now();
      if (startedAt === undefined && Atomics.load(flags, CONTROL_STARTED) === 1) startedAt = now;
      if (startedAt !== undefined && now > startedAt + job.limits.wallTimeMs + killGraceMs) {
        hard.abort(new HardStop('wallTimeMs'));
      } else if (cancelAt !== undefined && now > cancelAt + cancelGraceMs) {
        hard.abort(new HardStop('cancelled'));
      }
    }, 50);

    try {
      return (await workers.run(task, { signal: hard.signal })) as RunResult;
    } catch (e) {
      const reason = hard.signal.reason instanceof HardStop ? hard.signal.reason.reason : undefined;
      const durationMs = startedAt ? Date.now() - startedAt : 0;
      const base = { ...empty('error', undefined), durationMs, cpuMs: durationMs };
      if (reason === 'cancelled') return { ...base, status: 'cancelled', error: { message: 'Cancelled' } };
      if (reason === 'wallTimeMs') {
        return {
          ...base,
          status: 'limit',
          error: { message: `Stopped by the ${describeLimit('wallTimeMs', job.limits.wallTimeMs)}`, limit: 'wallTimeMs' },
        };
      }
      const code = (e as { code?: string }).code;
      if (code === 'ERR_WORKER_OUT_OF_MEMORY') {
        return {
          ...base,
          status: 'limit',
          error: { message: `Stopped by the ${describeLimit('memoryMb', job.limits.memoryMb)}`, limit: 'memoryMb' },
        };
      }
      return { ...base, status: 'error', error: { message: `Sandbox error: ${e instanceof Error ? e.message : String(e)}` } };
    } finally {
      clearInterval(watchdog);
      signal?.removeEventListener('abort', onCancel);
    }
  }

  async function close(): Promise<void> {
    if (closed) return;
    closed = true;
    const p = await poolReady?.catch(() => undefined);
    await p?.destroy();
  }

  return { run, close };
}
