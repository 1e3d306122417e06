/**
 * Worker-thread entry (piscina): runs one script — or, for a sweep, a chunk of points one after the
 * other — and answers with the results. Each run starts from the prepared context's image (prepared.ts):
 * the same bytes a fresh QuickJS runtime and context with the API evaluated would have. The WASM module
 * is loaded once per worker and thrown away after any abort (out of memory, stack overflow, a trap),
 * because QuickJS may be left inconsistent by one, and its image with it.
 */
import { newQuickJSWASMModule, newVariant, RELEASE_SYNC, type QuickJSWASMModule } from 'quickjs-emscripten';
import { readFile } from 'node:fs/promises';
import { createRequire } from 'node:module';
import { ContextBridge, RunState, describeGuestError, limitStop, mapPosition } from './bridge';
import { PreparedContext } from './prepared';
import { stackPointerStart } from './wasm-stack';
import { SCRIPT_FILENAME } from './protocol';
import {
  CONTROL_CANCEL,
  CONTROL_CURRENT,
  CONTROL_STARTED,
  type CompiledScript,
  type DatasetTable,
  type RunResult,
  type RunResultError,
  type WorkerBatchTask,
  type WorkerTask,
} from './types';
import type { SandboxLimits } from '../../shared/schemas/limits';

const PAGE = 64 * 1024;
/** Pages the QuickJS build asks for at start (its INITIAL_MEMORY, 16 MB). */
const INITIAL_PAGES = 256;

interface WasmCode {
  module: WebAssembly.Module;
  /** Where its C stack starts, when the binary says (wasm-stack.ts). */
  stackTop: number | undefined;
}
let compiled: Promise<WasmCode> | undefined;
/** The WASM code, compiled once per worker; instances are cheap (a few ms) once it is. */
function wasmCode(): Promise<WasmCode> {
  compiled ??= readFile(createRequire(import.meta.url).resolve('@jitl/quickjs-wasmfile-release-sync/wasm')).then(async (b) => ({
    module: await WebAssembly.compile(b),
    stackTop: stackPointerStart(b),
  }));
  return compiled;
}

interface Instance {
  mod: QuickJSWASMModule;
  memory: WebAssembly.Memory;
  /** The memoryMb it was sized for. */
  memoryMb: number;
  /** Its one runtime and context with the API evaluated, made on the first run (prepared.ts). */
  prepared?: PreparedContext;
  stackTop: number | undefined;
}
let current: Promise<Instance> | undefined;

/**
 * A QuickJS module whose WASM memory cannot grow past its start plus the run's memory limit: QuickJS's
 * own setMemoryLimit counts allocations rather than bytes in this build (no malloc_usable_size), so the
 * memory's maximum is what makes the limit hard, even inside one huge native call. One instance per
 * worker is reused while the limit stays the same.
 */
function getInstance(memoryMb: number): Promise<Instance> {
  if (current) {
    const c = current;
    current = c.then((i) => (i.memoryMb === memoryMb ? i : create(memoryMb)));
  } else {
    current = create(memoryMb);
  }
  current.catch(() => {
    current = undefined;
  });
  return current;
}

async function create(memoryMb: number): Promise<Instance> {
  const memory = new WebAssembly.Memory({ initial: INITIAL_PAGES, maximum: maxHeapBytes(memoryMb) / PAGE });
  const code = await wasmCode();
  const variant = newVariant(RELEASE_SYNC, {
    wasmModule: code.module,
    wasmMemory: memory,
    // An abort is handled (the instance is thrown away); its message is no news for the server log.
    emscriptenModule: { printErr: () => undefined } as unknown as Parameters<typeof newVariant>[1]['emscriptenModule'],
  });
  return { mod: await newQuickJSWASMModule(variant), memory, memoryMb, stackTop: code.stackTop };
}

function discardModule(): void {
  current = undefined;
}

/**
 * After a run that grew the heap past this, the instance is replaced, so the next run starts with
 * close to its whole allowance and a worker's memory returns to the system after a big run.
 */
const HEAP_SLACK_BYTES = 8 * 1024 * 1024;

const OOM = /out of memory/i;
/** Within this of its maximum, a WASM heap counts as full (QuickJS grows it in 64 kB pages). */
const HEAP_FULL_MARGIN = 1024 * 1024;
const maxHeapBytes = (memoryMb: number) => (INITIAL_PAGES + Math.ceil((memoryMb * 1024 * 1024) / PAGE)) * PAGE;
const STACK = /stack overflow|Maximum call stack size exceeded/i;

/** What one point needs; a single run and each point of a batch share it. */
interface PointInput {
  script: CompiledScript;
  recipes: Record<string, CompiledScript>;
  params: Record<string, number>;
  seed: number;
  limits: SandboxLimits;
  datasets: Record<string, DatasetTable>;
}

export default function runTask(task: WorkerTask | WorkerBatchTask): Promise<RunResult | number> {
  return task.kind === 'batch' ? runBatch(task) : runPoint(task, new Int32Array(task.control));
}

/**
 * A chunk of sweep points in one task: the datasets cross once, each point starts from the prepared
 * context's image with its own deadline and limits, and its result is posted as soon as it is known.
 * Answers with the number of points run; it stops early (between points) when the cancel flag is set.
 */
async function runBatch(task: WorkerBatchTask): Promise<number> {
  const control = new Int32Array(task.control);
  let done = 0;
  try {
    for (let j = 0; j < task.paramsList.length; j++) {
      if (Atomics.load(control, CONTROL_CANCEL) === 1) break;
      Atomics.store(control, CONTROL_CURRENT, j);
      const result = await runPoint({ ...task, params: task.paramsList[j] ?? {} }, control);
      task.port.postMessage({ j, result });
      done++;
    }
  } finally {
    task.port.close();
  }
  return done;
}

async function runPoint(task: PointInput, control: Int32Array): Promise<RunResult> {
  const instance = await getInstance(task.limits.memoryMb);
  const { mod, memory } = instance;
  const heapBytes = () => memory.buffer.byteLength;
  Atomics.store(control, CONTROL_STARTED, 1);
  const started = Date.now();
  const t0 = performance.now();
  const heapAtStart = heapBytes();
  const run = new RunState(task.limits, task.datasets, task.recipes, task.seed, control, started, () => heapBytes() - heapAtStart);
  let prepared: PreparedContext;
  try {
    prepared = instance.prepared ??= PreparedContext.create(mod, memory, task.limits.memoryMb * 1024 * 1024, instance.stackTop);
  } catch (e) {
    discardModule();
    return failedStart(e, started, t0);
  }
  const { rt, ctx } = prepared;
  const bridge = new ContextBridge(run, rt, ctx, task.params, 0, 'script');
  prepared.begin(bridge);
  rt.setMaxStackSize(task.limits.stackKb * 1024);

  let error: RunResultError | undefined;
  let status: RunResult['status'] = 'done';
  let abort = false;

  const classify = (dumped: unknown, hostError?: unknown): void => {
    if (run.stop) {
      const loc = run.stopLocation && run.stopLocation.file === 'script'
        ? mapPosition(task.script.map, run.stopLocation.line, run.stopLocation.column)
        : describeGuestError(dumped, task.script.map);
      status = run.stop.limit ? 'limit' : 'error';
      error = { message: run.stop.message };
      if (loc.line !== undefined) Object.assign(error, { line: loc.line, column: loc.column });
      if (run.stop.limit) error.limit = run.stop.limit;
      return;
    }
    if (run.interrupted === 'cancelled') {
      status = 'cancelled';
      error = { message: 'Cancelled' };
      return;
    }
    if (run.interrupted === 'wallTimeMs') {
      status = 'limit';
      error = { message: limitStop(task.limits, 'wallTimeMs').message, limit: 'wallTimeMs' };
      return;
    }
    const text = hostError instanceof Error ? hostError.message
      : dumped !== null && typeof dumped === 'object' && 'message' in dumped ? String((dumped as { message: unknown }).message) : '';
    // When QuickJS cannot even allocate the error it throws null: at a heap that has reached its hard
    // cap that is the memory limit, not the script throwing a non-Error.
    const heapFull = (dumped === null || dumped === undefined) && hostError === undefined && heapBytes() + HEAP_FULL_MARGIN >= maxHeapBytes(task.limits.memoryMb);
    if (OOM.test(text) || heapFull) {
      abort = true;
      status = 'limit';
      error = { message: limitStop(task.limits, 'memoryMb').message, limit: 'memoryMb' };
      return;
    }
    if (STACK.test(text)) {
      abort = true;
      status = 'limit';
      error = { message: limitStop(task.limits, 'stackKb').message, limit: 'stackKb' };
      return;
    }
    status = 'error';
    error = hostError !== undefined ? { message: `Sandbox error: ${text || String(hostError)}` } : describeGuestError(dumped, task.script.map);
  };

  try {
    const r = ctx.evalCode(task.script.code, SCRIPT_FILENAME, { type: 'global' });
    if (r.error) {
      const dumped: unknown = ctx.dump(r.error);
      r.error.dispose();
      classify(dumped);
    } else {
      // Promise jobs the script queued run now, still under the interrupt handler and the limits.
      const jobs = rt.executePendingJobs(-1);
      if (jobs.error) {
        const dumped: unknown = ctx.dump(jobs.error);
        jobs.error.dispose();
        classify(dumped);
      } else if (run.stop || run.interrupted) {
        classify(undefined);
      } else {
        // A script ending in `main()` for an async main: its rejection is the run's error.
        const state = ctx.getPromiseState(r.value);
        if (state.type === 'rejected') {
          const dumped: unknown = ctx.dump(state.error);
          state.error.dispose();
          classify(dumped);
        } else if (state.type === 'fulfilled' && !state.notAPromise) {
          state.value.dispose();
        }
      }
      r.value.dispose();
    }
  } catch (e) {
    // A host-side RangeError (V8 stack) or a WASM trap: QuickJS's state cannot be trusted any more.
    abort = true;
    classify(undefined, e);
  }

  // Jobs a stopped script left queued, and whatever else it made, go with the next restore of the image.
  prepared.end();
  if (abort || run.stop?.limit === 'memoryMb' || heapBytes() - INITIAL_PAGES * PAGE > HEAP_SLACK_BYTES) discardModule();

  const durationMs = Date.now() - started;
  const result: RunResult = {
    status,
    outputs: bridge.outputs,
    logs: run.logs,
    durationMs,
    cpuMs: Math.round((performance.now() - t0) * 1000) / 1000,
    kernelCalls: run.kernelCalls,
    declaredParams: bridge.declared,
  };
  if (error) result.error = error;
  return result;
}

/** The answer when no context could be prepared (the prelude itself failed): a sandbox error. */
function failedStart(e: unknown, started: number, t0: number): RunResult {
  return {
    status: 'error',
    outputs: [],
    logs: [],
    durationMs: Date.now() - started,
    cpuMs: Math.round((performance.now() - t0) * 1000) / 1000,
    kernelCalls: 0,
    declaredParams: [],
    error: { message: `Sandbox error: ${e instanceof Error ? e.message : String(e)}` },
  };
}
