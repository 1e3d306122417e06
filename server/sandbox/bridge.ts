/**
 * Host side of the script API, running in a worker thread next to one QuickJS runtime. Everything the
 * prelude forwards is checked here again (types, ranges, limits), because the prelude lives in the
 * script's own context and a script can replace any of it.
 */
import type { QuickJSContext, QuickJSHandle, QuickJSRuntime } from 'quickjs-emscripten';
import { SourceMap } from 'node:module';
import { universe as makeUniverse } from '../kernel/index';
import { chi2 as kernelChi2, type MeasurementTable, type PredictingModel } from '../kernel/likelihood';
import { KERNEL_VERSION } from '../kernel/index';
import type { SandboxLimits, LimitName } from '../../shared/schemas/limits';
import { describeLimit } from '../../shared/schemas/limits';
import type { OutputItem, ParamDeclaration, PlotSpec } from '../../shared/schemas/outputs';
import type { HostBridge, HostReturn } from './protocol';
import { F64_PLACEHOLDER, HOST_FUNCTIONS, PRELUDE_FILENAME, SCRIPT_FILENAME, UNIVERSE_METHODS, type ArgKind } from './protocol';
import type { CompiledScript, DatasetTable, RunResultError } from './types';
import { convertUnits } from './units';

declare const __COMOVING_PRELUDE__: string;

type KernelModel = ReturnType<typeof makeUniverse>;

const CHI2_KINDS: Record<string, 'distanceModulus' | 'hubble' | 'fSigma8'> = {
  distance_modulus: 'distanceModulus',
  hubble: 'hubble',
  fsigma8: 'fSigma8',
};
const VALUE_COLUMN: Record<string, string> = { distance_modulus: 'mu', hubble: 'h', fsigma8: 'fsigma8' };

const MAX_RECIPE_DEPTH = 4;
const MAX_NAME = 200;

/** An error that ends the run (bad argument or a limit); the script cannot catch its way past it. */
export class RunStop extends Error {
  constructor(message: string, readonly limit?: LimitName) {
    super(message);
  }
}

export function limitStop(limits: SandboxLimits, name: LimitName, detail?: string): RunStop {
  return new RunStop(`Stopped by the ${describeLimit(name, limits[name])}${detail ? `: ${detail}` : ''}`, name);
}

/** State shared by the top-level context and the nested recipe contexts of one run. */
export class RunState {
  readonly logs: string[] = [];
  outputBytes = 0;
  kernelCalls = 0;
  stop?: RunStop;
  stopLocation?: { line: number; column: number; file: string };
  /** Why the interrupt handler stopped the script, when it did. */
  interrupted?: 'wallTimeMs' | 'cancelled';
  readonly deadline: number;

  constructor(
    readonly limits: SandboxLimits,
    readonly datasets: Record<string, DatasetTable>,
    readonly recipes: Record<string, CompiledScript>,
    readonly seed: number,
    readonly control: Int32Array,
    startedAt: number,
    /** Bytes the script's heap has grown by since the run started (see worker.ts). */
    readonly heapGrowth: () => number = () => 0,
  ) {
    this.deadline = startedAt + limits.wallTimeMs;
  }

  /**
   * QuickJS's own memory limit in this build counts allocations, not bytes (no malloc_usable_size in
   * WASM), so it only refuses single huge allocations; the memory limit proper is checked here against
   * the growth of the WASM heap, at every interrupt poll and every host call.
   */
  checkMemory(): void {
    if (!this.stop && this.heapGrowth() > this.limits.memoryMb * 1024 * 1024) {
      this.stop = limitStop(this.limits, 'memoryMb');
    }
  }

  /** The interrupt handler: true stops the script. */
  shouldInterrupt(): boolean {
    this.checkMemory();
    if (this.stop) return true;
    if (Atomics.load(this.control, 0) === 1) {
      this.interrupted = 'cancelled';
      return true;
    }
    if (Date.now() > this.deadline) {
      this.interrupted = 'wallTimeMs';
      return true;
    }
    return false;
  }

  addOutputBytes(n: number): void {
    this.outputBytes += n;
    if (this.outputBytes > this.limits.outputKb * 1024) {
      throw limitStop(this.limits, 'outputKb', 'the run produced more output than that');
    }
  }

  countKernelCall(): void {
    this.kernelCalls += 1;
    if (this.kernelCalls > this.limits.kernelCalls) {
      throw limitStop(this.limits, 'kernelCalls');
    }
  }

  checkLength(fn: string, arg: string, n: number): void {
    if (n > this.limits.arrayLength) {
      throw limitStop(this.limits, 'arrayLength', `${fn} got ${n} elements in ${arg}`);
    }
  }
}

/** One QuickJS context: its own outputs, models and parameters (a recipe call gets a fresh one). */
export class ContextBridge {
  readonly outputs: OutputItem[] = [];
  readonly declared: ParamDeclaration[] = [];
  private readonly models = new Map<number, { model: KernelModel; params: unknown }>();
  private nextId = 1;
  private pending: ArrayBuffer[] = [];
  private impl?: HostBridge;

  constructor(
    readonly run: RunState,
    readonly rt: QuickJSRuntime,
    readonly ctx: QuickJSContext,
    readonly params: Record<string, number>,
    readonly depth: number,
    readonly label: string,
  ) {}

  /** Put `__host` into the context and evaluate the prelude; throws if that fails. */
  install(): void {
    installApi(this.ctx, () => this).dispose();
  }

  /** One call from the prelude, answered by this bridge's host functions. */
  hostCall(name: keyof HostBridge, handles: QuickJSHandle[]) {
    this.impl ??= this.hostImpl();
    return this.invoke(name, this.impl[name] as (...args: unknown[]) => unknown, handles);
  }

  /** Turn guest handles into host values, call, turn the answer back; errors stop the run. */
  private invoke(name: string, fn: (...args: unknown[]) => unknown, handles: QuickJSHandle[]) {
    const { ctx } = this;
    try {
      this.run.checkMemory();
      if (this.run.stop) throw this.run.stop;
      const args = handles.map((h) => this.fromGuest(h));
      const out = fn.apply(this, args) as HostReturn | boolean | undefined;
      return this.toGuest(out);
    } catch (e) {
      const text = e instanceof Error ? e.message : String(e);
      const stop = e instanceof RunStop ? e
        : /out of memory|Cannot enlarge memory|Array buffer allocation failed/i.test(text) ? limitStop(this.run.limits, 'memoryMb')
        : new RunStop(text);
      if (!this.run.stop) this.run.stop = stop;
      return { error: ctx.newError({ name: 'Error', message: stop.message }) };
    }
  }

  private fromGuest(h: QuickJSHandle): unknown {
    const { ctx } = this;
    const t = ctx.typeof(h);
    if (t === 'number') return ctx.getNumber(h);
    if (t === 'string') return ctx.getString(h);
    if (t === 'object') {
      const lifetime = ctx.getArrayBuffer(h);
      try {
        // The view points into QuickJS memory, which may move on the next allocation: copy it out now.
        return lifetime.value.slice().buffer;
      } finally {
        lifetime.dispose();
      }
    }
    return undefined;
  }

  private toGuest(v: HostReturn | boolean | undefined): QuickJSHandle {
    const { ctx } = this;
    if (v === undefined) return ctx.undefined;
    if (v === null) return ctx.null;
    if (typeof v === 'boolean') return v ? ctx.true : ctx.false;
    if (typeof v === 'number') return ctx.newNumber(v);
    if (typeof v === 'string') return ctx.newString(v);
    return ctx.newArrayBuffer(v);
  }

  /** JSON with placeholders for the Float64Arrays in `value`; the buffers wait in `pending`. */
  private encode(value: unknown): string {
    const pending: ArrayBuffer[] = [];
    const json = JSON.stringify(value, (_k, v: unknown) => {
      if (v instanceof Float64Array) {
        pending.push(toBuffer(v));
        return { [F64_PLACEHOLDER]: pending.length - 1 };
      }
      if (ArrayBuffer.isView(v)) return Array.from(v as unknown as ArrayLike<number>);
      if (typeof v === 'number' && !Number.isFinite(v)) return null;
      return v;
    });
    this.pending = pending;
    return json ?? 'null';
  }

  private model(fn: string, id: unknown): { model: KernelModel; params: unknown } {
    const m = typeof id === 'number' ? this.models.get(id) : undefined;
    if (!m) throw new RunStop(`${fn}: model must be a universe made with universe(...)`);
    return m;
  }

  private kernelArg(method: string, arg: string, kind: ArgKind, v: unknown): unknown {
    if (kind === 'n') {
      if (typeof v === 'number') {
        if (!Number.isFinite(v)) throw new RunStop(`${method}: ${arg} must be a finite number, got ${v}`);
        return v;
      }
      if (v instanceof ArrayBuffer) {
        const a = new Float64Array(v);
        this.run.checkLength(method, arg, a.length);
        for (let i = 0; i < a.length; i++) {
          if (!Number.isFinite(a[i])) throw new RunStop(`${method}: ${arg}[${i}] must be a finite number, got ${a[i]}`);
        }
        return a;
      }
      if (v === 'null') return undefined;
      throw new RunStop(`${method}: ${arg} must be a number or an array of numbers`);
    }
    if (typeof v !== 'string') throw new RunStop(`${method}: ${arg} must be ${kind === 'o' ? 'an object' : 'a number, a formula or a table'}`);
    const o: unknown = JSON.parse(v, reviveGuest);
    if (o === null) return undefined;
    if (kind === 'o' && (typeof o !== 'object' || Array.isArray(o))) throw new RunStop(`${method}: ${arg} must be an object`);
    return o;
  }

  private hostImpl(): HostBridge {
    const self = this;
    const run = this.run;
    const limits = run.limits;
    return {
      universe(paramsJson: string): number {
        run.countKernelCall();
        const params: unknown = JSON.parse(String(paramsJson), reviveGuest);
        let model: KernelModel;
        try {
          model = makeUniverse(params as Parameters<typeof makeUniverse>[0]);
        } catch (e) {
          throw new RunStop(`universe: ${errorText(e)}`);
        }
        const id = self.nextId++;
        self.models.set(id, { model, params });
        return id;
      },
      universeParams(id: number): string {
        const m = self.model('params', id);
        return self.encode((m.model as { params?: unknown }).params ?? m.params);
      },
      call(id: number, method: string, ...args: unknown[]): HostReturn {
        const { model } = self.model(String(method), id);
        const spec = Object.prototype.hasOwnProperty.call(UNIVERSE_METHODS, method)
          ? UNIVERSE_METHODS[method as keyof typeof UNIVERSE_METHODS]
          : undefined;
        if (!spec) throw new RunStop(`universe: there is no method "${String(method)}"`);
        const names = spec.args;
        if (args.length > names.length) {
          throw new RunStop(`${method}: takes at most ${names.length} argument${names.length === 1 ? '' : 's'}, got ${args.length}`);
        }
        const kargs = args.map((a, i) => self.kernelArg(method, names[i][0], names[i][1], a));
        const first = names[0];
        if (first && first[1] !== 'o' && kargs[0] === undefined) throw new RunStop(`${method}: ${first[0]} is required`);
        run.countKernelCall();
        let out: unknown;
        try {
          out = callKernel(model, method, kargs);
        } catch (e) {
          if (e instanceof RunStop) throw e;
          throw new RunStop(`${method}: ${errorText(e)}`);
        }
        if (typeof out === 'number') return out;
        if (out === null || out === undefined) return null;
        if (out instanceof Float64Array) return toBuffer(out);
        return self.encode(out);
      },
      chi2(id: number, datasetName: string, optionsJson: string): HostReturn {
        const { model } = self.model('chi2', id);
        const d = self.datasetTable('chi2', datasetName);
        const kind = CHI2_KINDS[d.kind];
        if (!kind) throw new RunStop(`chi2: dataset "${d.name}" is a plain table; χ² needs a distance_modulus, hubble or fsigma8 dataset`);
        const m = measurement(d);
        const opts = (JSON.parse(String(optionsJson ?? '{}'), reviveGuest) ?? {}) as { sigma8?: unknown };
        if (opts.sigma8 !== undefined && (typeof opts.sigma8 !== 'number' || !Number.isFinite(opts.sigma8))) {
          throw new RunStop(`chi2: options.sigma8 must be a finite number, got ${typeName(opts.sigma8)}`);
        }
        run.countKernelCall();
        let out: unknown;
        try {
          const table: MeasurementTable = d.cov ? { z: m.z, value: m.value, cov: d.cov } : { z: m.z, value: m.value, sigma: m.sigma };
          out = kernelChi2(model as unknown as PredictingModel, kind, table, { sigma8: opts.sigma8 as number | undefined });
        } catch (e) {
          throw new RunStop(`chi2: ${errorText(e)}`);
        }
        return self.encode(out);
      },
      dataset(name: string): string {
        const d = self.datasetTable('dataset', name);
        const columns: Record<string, Float64Array> = {};
        const units: Record<string, string> = {};
        for (const c of d.columns) {
          columns[c.name] = Float64Array.from(c.values);
          if (c.unit) units[c.name] = c.unit;
        }
        const out: Record<string, unknown> = { name: d.name, kind: d.kind, columns, units };
        if (CHI2_KINDS[d.kind]) Object.assign(out, measurement(d));
        if (d.cov) out.cov = d.cov.map((row) => Float64Array.from(row));
        return self.encode(out);
      },
      buffer(i: number): ArrayBuffer {
        const b = self.pending[i];
        if (!b) throw new RunStop('internal: no such buffer');
        return b;
      },
      linspace(start: number, stop: number, n: number): ArrayBuffer {
        const count = gridCount(run, 'linspace', start, stop, n);
        const out = new Float64Array(count);
        const step = count > 1 ? (stop - start) / (count - 1) : 0;
        for (let i = 0; i < count; i++) out[i] = start + i * step;
        if (count > 1) out[count - 1] = stop;
        return out.buffer;
      },
      logspace(startExp: number, stopExp: number, n: number): ArrayBuffer {
        const count = gridCount(run, 'logspace', startExp, stopExp, n);
        const out = new Float64Array(count);
        const step = count > 1 ? (stopExp - startExp) / (count - 1) : 0;
        for (let i = 0; i < count; i++) out[i] = 10 ** (startExp + i * step);
        if (count > 1) out[count - 1] = 10 ** stopExp;
        return out.buffer;
      },
      convert(value: number, from: string, to: string): number {
        if (typeof value !== 'number' || !Number.isFinite(value)) throw new RunStop(`convert: value must be a finite number, got ${value}`);
        try {
          return convertUnits(value, String(from), String(to));
        } catch (e) {
          throw new RunStop(errorText(e));
        }
      },
      param(name: string, optionsJson: string): number {
        return self.declareParam(String(name), JSON.parse(String(optionsJson), reviveGuest));
      },
      recipe(name: string, inputsJson: string): string {
        return JSON.stringify(self.callRecipe(String(name), JSON.parse(String(inputsJson), reviveGuest)));
      },
      show(kind: string, json: string, ...buffers: unknown[]): void {
        const payload: unknown = JSON.parse(String(json), (k, v) => reviveOutput(k, v, buffers));
        const item = buildOutput(run, kind, payload);
        run.addOutputBytes(JSON.stringify(item).length);
        self.outputs.push(item);
      },
      print(text: string): void {
        const line = self.depth > 0 ? `[${self.label}] ${String(text)}` : String(text);
        run.addOutputBytes(line.length + 1);
        run.logs.push(line);
      },
      fail(message: string): never {
        throw new RunStop(String(message));
      },
      locate(stack: string): void {
        if (run.stopLocation) return;
        const loc = userFrame(String(stack));
        if (loc) run.stopLocation = { ...loc, file: self.label };
      },
      stopped(): boolean {
        return run.stop !== undefined;
      },
      seed(): number {
        return run.seed >>> 0;
      },
      clock(): number {
        return FIXED_CLOCK_MS;
      },
    };
  }

  private datasetTable(fn: string, name: unknown): DatasetTable {
    if (typeof name !== 'string') throw new RunStop(`${fn}: dataset name must be a string`);
    const d = Object.prototype.hasOwnProperty.call(this.run.datasets, name) ? this.run.datasets[name] : undefined;
    if (!d) {
      const known = Object.keys(this.run.datasets);
      throw new RunStop(
        `${fn}: the group has no dataset named "${name}"` + (known.length ? ` (known: ${known.join(', ')})` : ''),
      );
    }
    return d;
  }

  private declareParam(name: string, options: unknown): number {
    if (!name || name.length > MAX_NAME) throw new RunStop(`param: name must be 1 to ${MAX_NAME} characters`);
    if (options === null || typeof options !== 'object') throw new RunStop(`param: options for "${name}" must be an object`);
    const o = options as Record<string, unknown>;
    const num = (k: string, required: boolean): number | undefined => {
      const v = o[k];
      if (v === undefined || v === null && !required) return undefined;
      if (typeof v !== 'number' || !Number.isFinite(v)) throw new RunStop(`param: ${k} of "${name}" must be a finite number`);
      return v;
    };
    const str = (k: string): string | undefined => {
      const v = o[k];
      if (v === undefined || v === null) return undefined;
      if (typeof v !== 'string' || v.length > MAX_NAME) throw new RunStop(`param: ${k} of "${name}" must be a string of at most ${MAX_NAME} characters`);
      return v;
    };
    if (o.default === undefined) throw new RunStop(`param: "${name}" needs a default`);
    const decl: ParamDeclaration = { name, default: num('default', true) as number };
    const min = num('min', false);
    const max = num('max', false);
    const unit = str('unit');
    const label = str('label');
    if (min !== undefined) decl.min = min;
    if (max !== undefined) decl.max = max;
    if (unit !== undefined) decl.unit = unit;
    if (label !== undefined) decl.label = label;
    if (min !== undefined && max !== undefined && min > max) throw new RunStop(`param: min of "${name}" (${min}) is above its max (${max})`);
    if (min !== undefined && decl.default < min || max !== undefined && decl.default > max) {
      throw new RunStop(`param: default of "${name}" (${decl.default}) is outside [${min ?? '−∞'}, ${max ?? '∞'}]`);
    }
    if (!this.declared.some((d) => d.name === name)) this.declared.push(decl);
    const given = Object.prototype.hasOwnProperty.call(this.params, name) ? this.params[name] : undefined;
    if (given === undefined) return decl.default;
    if (typeof given !== 'number' || !Number.isFinite(given)) throw new RunStop(`param: the value given for "${name}" must be a finite number`);
    if (min !== undefined && given < min) throw new RunStop(`param: "${name}" = ${given} is below its minimum ${min}`);
    if (max !== undefined && given > max) throw new RunStop(`param: "${name}" = ${given} is above its maximum ${max}`);
    return given;
  }

  private callRecipe(name: string, inputs: unknown): Record<string, number | null> {
    const script = Object.prototype.hasOwnProperty.call(this.run.recipes, name) ? this.run.recipes[name] : undefined;
    if (!script) {
      const known = Object.keys(this.run.recipes);
      throw new RunStop(`recipe: the group has no recipe named "${name}"` + (known.length ? ` (known: ${known.join(', ')})` : ''));
    }
    if (this.depth + 1 >= MAX_RECIPE_DEPTH) throw new RunStop(`recipe: "${name}" nests recipes more than ${MAX_RECIPE_DEPTH - 1} deep`);
    const params: Record<string, number> = {};
    if (inputs !== null && typeof inputs === 'object') {
      for (const [k, v] of Object.entries(inputs as Record<string, unknown>)) {
        if (typeof v !== 'number' || !Number.isFinite(v)) throw new RunStop(`recipe: input "${k}" of "${name}" must be a finite number`);
        params[k] = v;
      }
    }
    const ctx = this.rt.newContext();
    try {
      const nested = new ContextBridge(this.run, this.rt, ctx, params, this.depth + 1, `recipe ${name}`);
      nested.install();
      const r = ctx.evalCode(script.code, `${SCRIPT_FILENAME}`, { type: 'global' });
      if (r.error) {
        const dumped: unknown = ctx.dump(r.error);
        r.error.dispose();
        if (this.run.stop || this.run.interrupted) throw this.run.stop ?? new RunStop('interrupted');
        const info = describeGuestError(dumped, script.map);
        throw new RunStop(`recipe "${name}" failed: ${info.message}${info.line ? ` (its line ${info.line})` : ''}`);
      }
      r.value.dispose();
      const values: Record<string, number | null> = {};
      for (const o of nested.outputs) if (o.kind === 'value') values[o.name] = o.value;
      return values;
    } finally {
      ctx.dispose();
    }
  }
}

/**
 * Put `__host` into `ctx` and evaluate the prelude; throws if that fails. Each call goes to the bridge
 * `target()` returns at that moment, so a prepared context (prepared.ts) can serve one run after
 * another. Returns the host object's handle: while it is alive, so are the host functions.
 */
export function installApi(ctx: QuickJSContext, target: () => ContextBridge): QuickJSHandle {
  const hostObj = ctx.newObject();
  for (const name of HOST_FUNCTIONS) {
    const h = ctx.newFunction(name, (...args: QuickJSHandle[]) => target().hostCall(name, args));
    ctx.setProp(hostObj, name, h);
    h.dispose();
  }
  ctx.setProp(ctx.global, '__host', hostObj);
  const r = ctx.evalCode(__COMOVING_PRELUDE__, PRELUDE_FILENAME, { type: 'global', strict: true });
  if (r.error) {
    const e: unknown = ctx.dump(r.error);
    r.error.dispose();
    hostObj.dispose();
    throw new Error(`sandbox prelude failed: ${JSON.stringify(e)}`);
  }
  r.value.dispose();
  return hostObj;
}

/** The one clock a script sees: 2000-01-01T12:00:00Z (J2000.0), so runs repeat exactly. */
export const FIXED_CLOCK_MS = Date.UTC(2000, 0, 1, 12, 0, 0);

/** Largest number of history samples one call may ask for (common practice: enough for any plot). */
const MAX_HISTORY_SAMPLES = 100_000;

/**
 * Call a model method by name. Most are the kernel's own; the history is reduced to plain data (its
 * solver objects stay here), and a(t), H(t) are vectorised over that history.
 */
function callKernel(model: KernelModel, method: string, args: unknown[]): unknown {
  const m = model as unknown as Record<string, unknown>;
  if (method === 'history' || method === 'scaleFactorAtTime' || method === 'hubbleAtTime') {
    if (typeof m.history !== 'function') throw new RunStop(`${method}: not available in kernel ${KERNEL_VERSION}`);
    const h = (m.history as () => KernelHistory).call(model);
    if (method === 'history') {
      const opts = (args[0] ?? {}) as { samples?: unknown };
      const n = opts.samples === undefined ? 200 : opts.samples;
      if (typeof n !== 'number' || !Number.isInteger(n) || n < 2 || n > MAX_HISTORY_SAMPLES) {
        throw new RunStop(`history: options.samples must be a whole number from 2 to ${MAX_HISTORY_SAMPLES}`);
      }
      return {
        origin: h.origin, ageGyr: h.ageGyr, fate: h.fate, events: h.events, tRange: h.tRange,
        redshiftCoordinate: h.redshiftCoordinate, warnings: h.warnings, samples: h.samples(n),
      };
    }
    const f = method === 'scaleFactorAtTime' ? h.scaleFactorAt.bind(h) : h.hubbleAt.bind(h);
    const t = args[0];
    if (typeof t === 'number') return f(t);
    const ts = t as Float64Array;
    const out = new Float64Array(ts.length);
    for (let i = 0; i < ts.length; i++) out[i] = f(ts[i]);
    return out;
  }
  const f = m[method];
  if (typeof f !== 'function') throw new RunStop(`${method}: not available in kernel ${KERNEL_VERSION}`);
  return (f as (...a: unknown[]) => unknown).apply(model, args);
}

interface KernelHistory {
  origin: unknown; ageGyr: unknown; fate: unknown; events: unknown; tRange: unknown; redshiftCoordinate: unknown; warnings: unknown;
  samples(n?: number): unknown;
  scaleFactorAt(t: number): number;
  hubbleAt(t: number): number;
}

function toBuffer(a: Float64Array): ArrayBuffer {
  return a.byteOffset === 0 && a.byteLength === a.buffer.byteLength && a.buffer instanceof ArrayBuffer
    ? a.buffer
    : (a.slice().buffer as ArrayBuffer);
}

function errorText(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}

/** JSON reviver for values that came from the guest's encode(): non-finite numbers and invalid values. */
function reviveGuest(_k: string, v: unknown): unknown {
  if (v !== null && typeof v === 'object' && !Array.isArray(v)) {
    const o = v as Record<string, unknown>;
    if (typeof o.$nonFinite === 'string') return Number(o.$nonFinite);
    if (typeof o.$invalid === 'string') return `[${o.$invalid}]`;
  }
  return v;
}

function reviveOutput(k: string, v: unknown, buffers: unknown[]): unknown {
  if (v !== null && typeof v === 'object' && !Array.isArray(v)) {
    const o = v as Record<string, unknown>;
    if (typeof o[F64_PLACEHOLDER] === 'number') {
      const b = buffers[o[F64_PLACEHOLDER] as number];
      if (!(b instanceof ArrayBuffer)) throw new RunStop('internal: missing output buffer');
      return new Float64Array(b);
    }
  }
  return reviveGuest(k, v);
}

function gridCount(run: RunState, fn: string, start: unknown, stop: unknown, n: unknown): number {
  if (typeof start !== 'number' || !Number.isFinite(start)) throw new RunStop(`${fn}: ${fn === 'logspace' ? 'startExp' : 'start'} must be a finite number, got ${String(start)}`);
  if (typeof stop !== 'number' || !Number.isFinite(stop)) throw new RunStop(`${fn}: ${fn === 'logspace' ? 'stopExp' : 'stop'} must be a finite number, got ${String(stop)}`);
  if (typeof n !== 'number' || !Number.isInteger(n) || n < 1) throw new RunStop(`${fn}: n must be a whole number ≥ 1, got ${String(n)}`);
  run.checkLength(fn, 'n', n);
  return n;
}

/**
 * The typed columns of a dataset, made once per dataset object: a sweep's points share one copy of the
 * datasets per chunk, and nothing writes into these arrays (QuickJS gets copies, the kernel only reads).
 */
const measured = new WeakMap<DatasetTable, { z: Float64Array; value: Float64Array; sigma: Float64Array }>();

function measurement(d: DatasetTable): { z: Float64Array; value: Float64Array; sigma: Float64Array } {
  let m = measured.get(d);
  if (!m) {
    m = readMeasurement(d);
    measured.set(d, m);
  }
  return m;
}

function readMeasurement(d: DatasetTable): { z: Float64Array; value: Float64Array; sigma: Float64Array } {
  const find = (want: string) => d.columns.find((c) => c.name.toLowerCase().replace(/\s*\[.*\]$/, '') === want);
  const z = find('z');
  const value = find(VALUE_COLUMN[d.kind]);
  const sigma = find('sigma');
  if (!z || !value || !sigma) throw new RunStop(`dataset "${d.name}" lacks the columns z, ${VALUE_COLUMN[d.kind]}, sigma`);
  return { z: Float64Array.from(z.values), value: Float64Array.from(value.values), sigma: Float64Array.from(sigma.values) };
}

/** First stack frame in the user's script: `at f (script:3:7)` or `at script:3:7`. */
export function userFrame(stack: string): { line: number; column: number } | undefined {
  const re = new RegExp(`[( ]${SCRIPT_FILENAME}:(\\d+)(?::(\\d+))?\\)?\\s*$`);
  for (const raw of stack.split('\n')) {
    const m = re.exec(raw);
    if (m) return { line: Number(m[1]), column: m[2] ? Number(m[2]) : 1 };
  }
  return undefined;
}

/** Map a generated position back to the user's TypeScript through the esbuild source map. */
export function mapPosition(map: string | undefined, line: number, column: number): { line: number; column: number } {
  if (!map) return { line, column };
  try {
    const sm = new SourceMap(JSON.parse(map));
    const e = sm.findEntry(line - 1, Math.max(0, column - 1)) as { originalLine?: number; originalColumn?: number };
    if (typeof e.originalLine === 'number') return { line: e.originalLine + 1, column: (e.originalColumn ?? 0) + 1 };
  } catch {
    // A broken map only costs the exact position.
  }
  return { line, column };
}

/** What a user should read for an error that escaped their script. */
export function describeGuestError(dumped: unknown, map?: string): RunResultError {
  if (dumped !== null && typeof dumped === 'object' && 'message' in dumped) {
    const o = dumped as { name?: unknown; message?: unknown; stack?: unknown; lineNumber?: unknown };
    const name = typeof o.name === 'string' && o.name ? o.name : 'Error';
    const message = `${name}: ${String(o.message)}`;
    const loc = typeof o.stack === 'string' ? userFrame(o.stack) : undefined;
    if (loc) return { message, ...mapPosition(map, loc.line, loc.column) };
    if (typeof o.lineNumber === 'number') return { message, ...mapPosition(map, o.lineNumber, 1) };
    return { message };
  }
  let shown: string;
  try {
    shown = typeof dumped === 'string' ? JSON.stringify(dumped) : JSON.stringify(dumped) ?? String(dumped);
  } catch {
    shown = String(dumped);
  }
  if (shown.length > 200) shown = `${shown.slice(0, 200)}…`;
  return { message: `The script threw a value that is not an Error: ${shown}` };
}

function buildOutput(run: RunState, kind: string, payload: unknown): OutputItem {
  const p = (payload ?? {}) as Record<string, unknown>;
  if (kind === 'value') {
    const name = outName('show.value', p.name);
    if (p.argCount !== undefined && (p.argCount as number) < 2) throw new RunStop('show.value: value is required (show.value(name, value, unit?))');
    if (typeof p.value !== 'number') throw new RunStop(`show.value: value of "${name}" must be a number, got ${typeName(p.value)}`);
    if (!Number.isFinite(p.value)) throw new RunStop(`show.value: value of "${name}" must be a finite number, got ${p.value}`);
    const item: OutputItem = { kind: 'value', name, value: p.value };
    const unit = optString('show.value', 'unit', p.unit);
    if (unit !== undefined) item.unit = unit;
    return item;
  }
  if (kind === 'table') {
    const name = outName('show.table', p.name);
    if (!Array.isArray(p.columns) || p.columns.length === 0) throw new RunStop(`show.table: columns of "${name}" must be a non-empty array of {name, unit?, values}`);
    const cols = p.columns.map((c: unknown, i: number) => {
      if (c === null || typeof c !== 'object') throw new RunStop(`show.table: columns[${i}] must be an object {name, unit?, values}`);
      const cc = c as Record<string, unknown>;
      const cname = outName(`show.table: columns[${i}].name`, cc.name, true);
      const unit = optString('show.table', `columns[${i}].unit`, cc.unit);
      const values = numericArray(run, 'show.table', `columns[${i}].values`, cc.values);
      return { name: cname, unit, values };
    });
    const n = cols[0].values.length;
    cols.forEach((c, i) => {
      if (c.values.length !== n) throw new RunStop(`show.table: columns[${i}] ("${c.name}") has ${c.values.length} values but columns[0] has ${n}`);
    });
    const rows: (number | null)[][] = [];
    for (let r = 0; r < n; r++) rows.push(cols.map((c) => c.values[r]));
    return {
      kind: 'table',
      name,
      columns: cols.map((c) => (c.unit === undefined ? { name: c.name } : { name: c.name, unit: c.unit })),
      rows,
    };
  }
  if (kind === 'plot') {
    return { kind: 'plot', spec: buildPlot(run, p.spec) };
  }
  throw new RunStop(`show: unknown output kind ${kind}`);
}

const PLOT_TYPES = ['line', 'scatter', 'band', 'heatmap'] as const;

function buildPlot(run: RunState, raw: unknown): PlotSpec {
  if (raw === null || typeof raw !== 'object' || Array.isArray(raw)) throw new RunStop(`show.plot: spec must be an object {type, x, series, ...}`);
  const s = raw as Record<string, unknown>;
  if (!PLOT_TYPES.includes(s.type as (typeof PLOT_TYPES)[number])) {
    throw new RunStop(`show.plot: spec.type must be one of ${PLOT_TYPES.join(', ')}, got ${typeName(s.type)}`);
  }
  const type = s.type as PlotSpec['type'];
  const x = numericArray(run, 'show.plot', 'spec.x', s.x);
  const spec: PlotSpec = { type, x, series: [] };
  for (const k of ['title', 'xLabel', 'yLabel'] as const) {
    const v = optString('show.plot', `spec.${k}`, s[k]);
    if (v !== undefined) spec[k] = v;
  }
  for (const k of ['xScale', 'yScale'] as const) {
    if (s[k] === undefined || s[k] === null) continue;
    if (s[k] !== 'linear' && s[k] !== 'log') throw new RunStop(`show.plot: spec.${k} must be 'linear' or 'log'`);
    spec[k] = s[k] as 'linear' | 'log';
  }
  if (type === 'heatmap') {
    spec.y = numericArray(run, 'show.plot', 'spec.y', s.y);
    if (!Array.isArray(s.values)) throw new RunStop('show.plot: a heatmap needs spec.values, one row of numbers per y');
    const rows = s.values.map((row: unknown, i: number) => numericArray(run, 'show.plot', `spec.values[${i}]`, row));
    if (rows.length !== spec.y.length) throw new RunStop(`show.plot: spec.values has ${rows.length} rows but spec.y has ${spec.y.length} values`);
    rows.forEach((row, i) => {
      if (row.length !== x.length) throw new RunStop(`show.plot: spec.values[${i}] has ${row.length} values but spec.x has ${x.length}`);
    });
    spec.values = rows;
    return spec;
  }
  if (!Array.isArray(s.series) || s.series.length === 0) throw new RunStop(`show.plot: spec.series must be a non-empty array of {name, values}`);
  spec.series = s.series.map((ser: unknown, i: number) => {
    if (ser === null || typeof ser !== 'object') throw new RunStop(`show.plot: spec.series[${i}] must be an object {name, values}`);
    const o = ser as Record<string, unknown>;
    const name = outName(`show.plot: spec.series[${i}].name`, o.name, true);
    const values = numericArray(run, 'show.plot', `spec.series[${i}].values`, o.values);
    if (values.length !== x.length) throw new RunStop(`show.plot: spec.series[${i}].values has ${values.length} values but spec.x has ${x.length}`);
    const out: PlotSpec['series'][number] = { name, values };
    for (const edge of ['lower', 'upper'] as const) {
      if (o[edge] === undefined || o[edge] === null) continue;
      const e = numericArray(run, 'show.plot', `spec.series[${i}].${edge}`, o[edge]);
      if (e.length !== x.length) throw new RunStop(`show.plot: spec.series[${i}].${edge} has ${e.length} values but spec.x has ${x.length}`);
      out[edge] = e;
    }
    if (type === 'band' && (!out.lower || !out.upper)) throw new RunStop(`show.plot: a band needs spec.series[${i}].lower and .upper`);
    return out;
  });
  return spec;
}

function outName(where: string, v: unknown, plain = false): string {
  const label = plain ? where : `${where}: name`;
  if (typeof v !== 'string' || v.length === 0) throw new RunStop(`${label} must be a non-empty string, got ${v === '' ? 'an empty string' : typeName(v)}`);
  if (v.length > MAX_NAME) throw new RunStop(`${label} must be at most ${MAX_NAME} characters`);
  return v;
}

function optString(fn: string, field: string, v: unknown): string | undefined {
  if (v === undefined || v === null) return undefined;
  if (typeof v !== 'string') throw new RunStop(`${fn}: ${field} must be a string, got ${typeName(v)}`);
  if (v.length > MAX_NAME) throw new RunStop(`${fn}: ${field} must be at most ${MAX_NAME} characters`);
  return v;
}

/** Numbers for an output: non-finite values become null (JSON has no NaN); anything else is an error. */
function numericArray(run: RunState, fn: string, field: string, v: unknown): (number | null)[] {
  if (v instanceof Float64Array) {
    run.checkLength(fn, field, v.length);
    const out: (number | null)[] = new Array(v.length);
    for (let i = 0; i < v.length; i++) out[i] = Number.isFinite(v[i]) ? v[i] : null;
    return out;
  }
  if (!Array.isArray(v)) throw new RunStop(`${fn}: ${field} must be an array of numbers or a Float64Array, got ${typeName(v)}`);
  run.checkLength(fn, field, v.length);
  return v.map((x: unknown, i: number) => {
    if (typeof x !== 'number') throw new RunStop(`${fn}: ${field}[${i}] must be a number, got ${typeName(x)}`);
    return Number.isFinite(x) ? x : null;
  });
}

function typeName(v: unknown): string {
  if (v === null) return 'null';
  if (v === undefined) return 'nothing';
  if (Array.isArray(v)) return 'an array';
  if (typeof v === 'string') return /^\[(function|symbol|bigint)\]$/.test(v) ? `a ${v.slice(1, -1)}` : 'a string';
  if (typeof v === 'object') return 'an object';
  return typeof v;
}
