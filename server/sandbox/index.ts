/**
 * The sandbox: a piscina pool of worker threads, each running one script at a time in a QuickJS context
 * put back to its freshly prepared state (prepared.ts). The event loop only compiles TypeScript (async esbuild, cached by source) and waits; a script
 * that ignores its interrupt deadline gets its worker terminated (piscina replaces it). Sweeps go
 * through runBatch, which hands each worker a chunk of points in one task.
 */
import { availableParallelism } from 'node:os';
import { MessageChannel } from 'node:worker_threads';
import { pathToFileURL } from 'node:url';
import { Piscina } from 'piscina';
import { describeLimit } from '../../shared/schemas/limits';
import { workerFile } from './build';
import { compileScript } from './transpile';
import {
  CONTROL_CANCEL,
  CONTROL_CURRENT,
  CONTROL_STARTED,
  type BatchJob,
  type CompiledScript,
  type RunJob,
  type RunResult,
  type Sandbox,
  type WorkerBatchTask,
  type WorkerTask,
} from './types';

export type { BatchJob, RunJob, RunResult, Sandbox, DatasetTable, RecipeSource, RunResultError } from './types';

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

/**
 * Most points a sweep sends to a worker in one task: enough to spread the task's fixed cost (message,
 * datasets cloned) thin, few enough that the two workers stay evenly loaded near a sweep's end.
 */
const BATCH_CHUNK = 16;

class HardStop extends Error {
  constructor(readonly reason: 'wallTimeMs' | 'cancelled') {
    super(reason);
  }
}

const empty = (status: RunResult['status'], error: RunResult['error']): RunResult => ({
  status, outputs: [], logs: [], error, durationMs: 0, cpuMs: 0, kernelCalls: 0, declaredParams: [],
});
const cancelledResult = (): RunResult => empty('cancelled', { message: 'Cancelled' });

type Prepared = { ok: true; script: CompiledScript; recipes: Record<string, CompiledScript> } | { ok: false; result: RunResult };

/** The script and the recipes it may call, through TypeScript (cached); a failure is the run's result. */
async function prepare(job: Pick<RunJob, 'source' | 'language' | 'recipes'>): Promise<Prepared> {
  const compiled = await compileScript(job.source, job.language);
  if (!compiled.ok) return { ok: false, result: empty('error', compiled.error) };
  const recipes: Record<string, CompiledScript> = {};
  for (const [name, r] of Object.entries(job.recipes ?? {})) {
    const c = await compileScript(r.source, r.language);
    if (!c.ok) {
      const where = c.error.line ? ` at its line ${c.error.line}, column ${c.error.column}` : '';
      return { ok: false, result: empty('error', { message: `recipe "${name}" cannot be compiled${where}: ${c.error.message}` }) };
    }
    recipes[name] = c.script;
  }
  return { ok: true, script: compiled.script, recipes };
}

/** What a run stopped from outside (killed worker, crashed worker) reports. */
function failedResult(e: unknown, reason: HardStop['reason'] | undefined, limits: RunJob['limits'], durationMs: number): RunResult {
  const base = { ...empty('error', undefined), durationMs, cpuMs: durationMs };
  if (reason === 'cancelled') return { ...base, status: 'cancelled', error: { message: 'Cancelled' } };
  if (reason === 'wallTimeMs') {
    return {
      ...base,
      status: 'limit',
      error: { message: `Stopped by the ${describeLimit('wallTimeMs', limits.wallTimeMs)}`, limit: 'wallTimeMs' },
    };
  }
  const code = (e as { code?: string }).code;
  if (code === 'ERR_WORKER_OUT_OF_MEMORY') {
    return {
      ...base,
      status: 'limit',
      error: { message: `Stopped by the ${describeLimit('memoryMb', limits.memoryMb)}`, limit: 'memoryMb' },
    };
  }
  return { ...base, status: 'error', error: { message: `Sandbox error: ${e instanceof Error ? e.message : String(e)}` } };
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
          // A prewarmed pool (the server's) starts every worker now, so the first sweep does not pay
          // for a second worker's start (bundle load, mathjs, QuickJS compile) while it runs.
          minThreads: opts.prewarm ? threads : 1,
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
    if (signal?.aborted) return cancelledResult();

    const prepared = await prepare(job);
    if (!prepared.ok) return prepared.result;

    const workers = await pool();
    const control = new SharedArrayBuffer(8);
    const flags = new Int32Array(control);
    const task: WorkerTask = {
      script: prepared.script,
      recipes: prepared.recipes,
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
      return failedResult(e, reason, job.limits, startedAt ? Date.now() - startedAt : 0);
    } finally {
      clearInterval(watchdog);
      signal?.removeEventListener('abort', onCancel);
    }
  }

  async function runBatch(
    base: BatchJob,
    paramsList: Record<string, number>[],
    signal: AbortSignal | undefined,
    onResult: (i: number, result: RunResult) => void,
  ): Promise<void> {
    if (closed) throw new Error('sandbox is closed');
    const reported = new Uint8Array(paramsList.length);
    const report = (i: number, r: RunResult) => {
      if (reported[i]) return;
      reported[i] = 1;
      onResult(i, r);
    };
    const queue = paramsList.map((_p, i) => i);
    if (signal?.aborted) {
      for (const i of queue) report(i, cancelledResult());
      return;
    }
    const prepared = await prepare(base);
    if (!prepared.ok) {
      for (const i of queue) report(i, prepared.result);
      return;
    }
    const workers = await pool();
    const shared = {
      script: prepared.script,
      recipes: prepared.recipes,
      seed: base.seed >>> 0,
      limits: base.limits,
      datasets: base.datasets ?? {},
    };

    /** Runs one chunk; returns the indices to run again (their worker died under another point). */
    const runChunk = async (chunk: number[]): Promise<number[]> => {
      const control = new SharedArrayBuffer(12);
      const flags = new Int32Array(control);
      Atomics.store(flags, CONTROL_CURRENT, -1);
      const { port1, port2 } = new MessageChannel();
      let received = 0;
      let expected = Infinity;
      let allIn: (() => void) | undefined;
      port1.on('message', (m: { j: number; result: RunResult }) => {
        report(chunk[m.j]!, m.result);
        received++;
        if (received >= expected) allIn?.();
      });
      const task: WorkerBatchTask = { ...shared, kind: 'batch', paramsList: chunk.map((i) => paramsList[i] ?? {}), control, port: port2 };

      const hard = new AbortController();
      let seen = -1;
      let pointStartedAt = 0;
      let cancelAt: number | undefined;
      const onCancel = () => {
        Atomics.store(flags, CONTROL_CANCEL, 1);
        cancelAt = Date.now();
        if (Atomics.load(flags, CONTROL_STARTED) === 0) hard.abort(new HardStop('cancelled'));
      };
      if (signal?.aborted) onCancel();
      else signal?.addEventListener('abort', onCancel, { once: true });
      // Each point has the whole wall time from its own start: a new index restarts the clock.
      const watchdog = setInterval(() => {
        const now = Date.now();
        const cur = Atomics.load(flags, CONTROL_CURRENT);
        if (cur !== seen) {
          seen = cur;
          pointStartedAt = now;
        }
        if (cur >= 0 && now > pointStartedAt + base.limits.wallTimeMs + killGraceMs) {
          hard.abort(new HardStop('wallTimeMs'));
        } else if (cancelAt !== undefined && now > cancelAt + cancelGraceMs) {
          hard.abort(new HardStop('cancelled'));
        }
      }, 50);

      try {
        const count = (await workers.run(task, { signal: hard.signal, transferList: [port2] })) as number;
        // The results travel on their own port: wait for the ones still on the way.
        if (received < count) {
          await new Promise<void>((resolve) => {
            expected = count;
            allIn = resolve;
          });
        }
        // Points the worker left out were skipped because of the cancel flag.
        for (const i of chunk) report(i, cancelledResult());
        return [];
      } catch (e) {
        // Results posted before the worker stopped may still be queued on the port.
        await new Promise((r) => setImmediate(r));
        const reason = hard.signal.reason instanceof HardStop ? hard.signal.reason.reason : undefined;
        const cur = Atomics.load(flags, CONTROL_CURRENT);
        const stuck = cur >= 0 ? chunk[cur] : undefined;
        const failed = failedResult(e, reason, base.limits, stuck !== undefined ? Date.now() - pointStartedAt : 0);
        if (stuck === undefined) {
          for (const i of chunk) report(i, failed);
          return [];
        }
        report(stuck, failed);
        const rest = chunk.filter((i) => !reported[i]);
        if (reason === 'cancelled' || signal?.aborted) {
          for (const i of rest) report(i, cancelledResult());
          return [];
        }
        return rest;
      } finally {
        clearInterval(watchdog);
        signal?.removeEventListener('abort', onCancel);
        port1.close();
      }
    };

    const lane = async (): Promise<void> => {
      while (queue.length > 0) {
        if (signal?.aborted) {
          for (const i of queue.splice(0)) report(i, cancelledResult());
          return;
        }
        const size = Math.max(1, Math.min(BATCH_CHUNK, Math.ceil(queue.length / threads)));
        const retry = await runChunk(queue.splice(0, size));
        queue.unshift(...retry);
      }
    };
    await Promise.all(Array.from({ length: threads }, lane));
  }

  async function close(): Promise<void> {
    if (closed) return;
    closed = true;
    const p = await poolReady?.catch(() => undefined);
    await p?.destroy();
  }

  return { run, runBatch, close };
}
