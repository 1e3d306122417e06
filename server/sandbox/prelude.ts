/**
 * The script API as it lives inside QuickJS. Bundled by esbuild into one IIFE and evaluated once in
 * each worker's prepared context (prepared.ts) and in every nested recipe context, before any user
 * script. It only reshapes arguments and forwards them to the host (protocol.ts); every rule that
 * matters is checked again on the host, so a script that tampers with these functions only breaks its
 * own run.
 *
 * The object `api` below is type-checked against shared/script-api.d.ts: the declaration the editor
 * shows is the implementation's contract.
 */
import type * as Api from '../../shared/script-api';
import type { HostArg, HostBridge, HostReturn, MethodSpec, UNIVERSE_METHODS } from './protocol';
import { F64_PLACEHOLDER } from './protocol';

/** protocol.ts's UNIVERSE_METHODS as JSON (build.ts): QuickJS parses JSON much faster than an object literal. */
declare const __COMOVING_METHODS__: string;

type G = typeof globalThis & { __host?: HostBridge };
const g = globalThis as G;
const host = g.__host as HostBridge;
delete g.__host;

// Built-ins captured before the script runs, so a script that replaces them cannot confuse the API's own
// messages (it can still break its own code, which is its business).
const stringify = JSON.stringify;
const parse = JSON.parse;
const isArray = Array.isArray;
const F64 = Float64Array;
const objectKeys = Object.keys;
const defineProperty = Object.defineProperty;
const isView = ArrayBuffer.isView;
const METHODS = parse(__COMOVING_METHODS__) as typeof UNIVERSE_METHODS;

function describe(v: unknown): string {
  if (v === null) return 'null';
  if (isArray(v)) return 'an array';
  if (v instanceof F64) return 'a Float64Array';
  if (typeof v === 'number') return Number.isNaN(v) ? 'NaN' : String(v);
  if (typeof v === 'string') return 'a string';
  return typeof v === 'object' ? 'an object' : typeof v;
}

function fail(message: string): never {
  host.locate(new Error(message).stack ?? '');
  return host.fail(message);
}

/** Run an API function; if the host stopped the run inside it, tell the host where the user called it. */
function guard<F extends (...args: never[]) => unknown>(fn: F): F {
  return function (this: unknown, ...args: Parameters<F>) {
    try {
      return fn.apply(this, args);
    } catch (e) {
      if (host.stopped()) host.locate(new Error('located').stack ?? '');
      throw e;
    }
  } as unknown as F;
}

/** A number or a numeric array as a host argument; plain arrays are copied into a Float64Array. */
function numbersArg(fn: string, arg: string, v: unknown): number | ArrayBuffer {
  if (typeof v === 'number') return v;
  if (v instanceof F64) {
    return v.byteOffset === 0 && v.byteLength === v.buffer.byteLength ? (v.buffer as ArrayBuffer) : new F64(v).buffer;
  }
  if (isArray(v)) {
    for (let i = 0; i < v.length; i++) {
      if (typeof v[i] !== 'number') fail(`${fn}: ${arg}[${i}] must be a number, got ${describe(v[i])}`);
    }
    return new F64(v as number[]).buffer;
  }
  return fail(`${fn}: ${arg} must be a number or an array of numbers, got ${describe(v)}`);
}

function numberArg(fn: string, arg: string, v: unknown): number {
  if (typeof v !== 'number') fail(`${fn}: ${arg} must be a number, got ${describe(v)}`);
  return v as number;
}

function stringArg(fn: string, arg: string, v: unknown): string {
  if (typeof v !== 'string') fail(`${fn}: ${arg} must be a string, got ${describe(v)}`);
  return v as string;
}

/** JSON with every Float64Array replaced by a placeholder; the buffers go beside it. */
function encode(value: unknown): { json: string; buffers: ArrayBuffer[] } {
  const buffers: ArrayBuffer[] = [];
  const json = stringify(value, function (_key, v: unknown) {
    if (v instanceof F64) {
      buffers.push(new F64(v).buffer);
      return { [F64_PLACEHOLDER]: buffers.length - 1 };
    }
    if (isView(v)) return Array.from(v as unknown as ArrayLike<number>);
    if (typeof v === 'number' && !Number.isFinite(v)) return { $nonFinite: String(v) };
    if (typeof v === 'function' || typeof v === 'symbol' || typeof v === 'bigint') return { $invalid: typeof v };
    return v;
  });
  return { json: json ?? 'null', buffers };
}

function decode(r: HostReturn): unknown {
  if (r === null || typeof r === 'number') return r;
  if (typeof r !== 'string') return new F64(r);
  return parse(r, function (_key, v: unknown) {
    if (v !== null && typeof v === 'object' && F64_PLACEHOLDER in v) {
      return new F64(host.buffer((v as Record<string, number>)[F64_PLACEHOLDER]));
    }
    return v;
  });
}

const handles = new WeakMap<object, number>();

function universe(params: Api.UniverseParams): Api.Universe {
  if (params === null || typeof params !== 'object' || isArray(params)) {
    fail(`universe: params must be an object like {H0: 67.7, omegaM: 0.31}, got ${describe(params)}`);
  }
  const { json } = encode(params);
  const id = host.universe(json);
  let paramsCache: Api.UniverseParams | undefined;

  const method = (name: string, spec: MethodSpec) =>
    guard(function (...args: unknown[]) {
      const hostArgs: HostArg[] = [];
      for (let i = 0; i < args.length; i++) {
        const [argName, kind] = spec.args[i] ?? [`argument ${i + 1}`, 'n'];
        const a = args[i];
        if (kind === 'n') {
          hostArgs.push(a === undefined ? 'null' : numbersArg(name, argName, a));
        } else {
          if (kind === 'o' && a !== undefined && (a === null || typeof a !== 'object' || isArray(a))) {
            fail(`${name}: ${argName} must be an object, got ${describe(a)}`);
          }
          hostArgs.push(a === undefined ? 'null' : encode(a).json);
        }
      }
      return decode(host.call(id, name, ...hostArgs));
    });

  // Every method of Api.Universe, built from the one table the host checks against.
  const u = {
    get params(): Api.UniverseParams {
      paramsCache ??= decode(host.universeParams(id)) as Api.UniverseParams;
      return paramsCache;
    },
  } as Record<string, unknown>;
  for (const name of objectKeys(METHODS) as (keyof typeof METHODS)[]) {
    u[name] = method(name, METHODS[name]);
  }
  handles.set(u, id);
  return u as unknown as Api.Universe;
}

function linspace(start: number, stop: number, n: number): Float64Array {
  return new F64(host.linspace(numberArg('linspace', 'start', start), numberArg('linspace', 'stop', stop), numberArg('linspace', 'n', n)));
}

function logspace(startExp: number, stopExp: number, n: number): Float64Array {
  return new F64(host.logspace(numberArg('logspace', 'startExp', startExp), numberArg('logspace', 'stopExp', stopExp), numberArg('logspace', 'n', n)));
}

function convert(value: number, from: string, to: string): number {
  return host.convert(numberArg('convert', 'value', value), stringArg('convert', 'from', from), stringArg('convert', 'to', to));
}

function param(name: string, options: Api.ParamOptions): number {
  stringArg('param', 'name', name);
  if (options === null || typeof options !== 'object' || isArray(options)) {
    fail(`param: options must be an object like {default: 0.3, min: 0, max: 1}, got ${describe(options)}`);
  }
  return host.param(name, encode(options).json);
}

const datasetCache = new Map<string, Api.Dataset>();
function dataset(name: string): Api.Dataset {
  stringArg('dataset', 'name', name);
  let d = datasetCache.get(name);
  if (!d) {
    d = decode(host.dataset(name)) as Api.Dataset;
    datasetCache.set(name, d);
  }
  return d;
}

function recipe(name: string, inputs?: { readonly [name: string]: number }): { readonly [name: string]: number | null } {
  stringArg('recipe', 'name', name);
  if (inputs !== undefined && (inputs === null || typeof inputs !== 'object' || isArray(inputs))) {
    fail(`recipe: inputs must be an object of numbers like {H0: 70}, got ${describe(inputs)}`);
  }
  return parse(host.recipe(name, encode(inputs ?? {}).json)) as { [name: string]: number | null };
}

function chi2(model: Api.Universe, data: Api.Dataset, options?: { sigma8?: number }): Api.Chi2Result {
  const id = model !== null && typeof model === 'object' ? handles.get(model) : undefined;
  if (id === undefined) fail(`chi2: model must be a universe made with universe(...), got ${describe(model)}`);
  if (data === null || typeof data !== 'object' || typeof (data as { name?: unknown }).name !== 'string') {
    fail(`chi2: data must be a dataset from dataset('name'), got ${describe(data)}`);
  }
  if (options !== undefined && (options === null || typeof options !== 'object' || isArray(options))) {
    fail(`chi2: options must be an object like {sigma8: 0.81}, got ${describe(options)}`);
  }
  return decode(host.chi2(id as number, data.name, encode(options ?? {}).json)) as Api.Chi2Result;
}

// mulberry32 (Tommy Ettinger, public domain): small, fast, and a well-known 32-bit generator. The seed
// and the clock are asked for on first use, not here: a prepared context (prepared.ts) evaluates this
// prelude once and then serves many runs, each with its own seed.
let state: number | undefined;
function random(): number {
  state = ((state ?? host.seed() >>> 0) + 0x6d2b79f5) >>> 0;
  let t = state;
  t = Math.imul(t ^ (t >>> 15), t | 1);
  t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
  return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
}

function showPayload(kind: 'value' | 'table' | 'plot', payload: unknown): void {
  const { json, buffers } = encode(payload);
  host.show(kind, json, ...buffers);
}

const show: Api.Show = {
  value(name: string, value: number, unit?: string): void {
    showPayload('value', { name, value, unit: unit === undefined ? null : unit, argCount: arguments.length });
  },
  table(name: string, columns: readonly Api.TableColumn[]): void {
    showPayload('table', { name, columns });
  },
  plot(spec: Api.PlotSpec): void {
    showPayload('plot', { spec });
  },
};

function format(v: unknown, depth: number): string {
  if (typeof v === 'string') return depth === 0 ? v : stringify(v);
  if (typeof v === 'number' || typeof v === 'boolean' || v === null || v === undefined || typeof v === 'bigint') return String(v);
  if (typeof v === 'function') return '[function]';
  if (typeof v === 'symbol') return v.toString();
  if (v instanceof Error) return `${v.name}: ${v.message}`;
  if (depth > 3) return '…';
  if (v instanceof F64 || isArray(v)) {
    const arr = v as ArrayLike<unknown>;
    const shown: string[] = [];
    for (let i = 0; i < Math.min(arr.length, 20); i++) shown.push(format(arr[i], depth + 1));
    if (arr.length > 20) shown.push(`… ${arr.length - 20} more`);
    return `[${shown.join(', ')}]`;
  }
  const parts: string[] = [];
  for (const k of objectKeys(v as object).slice(0, 30)) parts.push(`${k}: ${format((v as Record<string, unknown>)[k], depth + 1)}`);
  return `{${parts.join(', ')}}`;
}

function print(...args: unknown[]): void {
  host.print(args.map((a) => format(a, 0)).join(' '));
}

const api: typeof Api = {
  universe: guard(universe),
  linspace: guard(linspace),
  logspace: guard(logspace),
  convert: guard(convert),
  param: guard(param),
  dataset: guard(dataset),
  recipe: guard(recipe),
  chi2: guard(chi2),
  random,
  show: { value: guard(show.value), table: guard(show.table), plot: guard(show.plot) },
  print: guard(print),
};

for (const key of objectKeys(api) as (keyof typeof api)[]) {
  defineProperty(g, key, { value: api[key], writable: true, configurable: true, enumerable: false });
}

// The only clock is a fixed one, and Math.random is the seeded stream, so a run repeats exactly.
let fixedNow: number | undefined;
const now = (): number => (fixedNow ??= host.clock());
const RealDate = Date;
function FixedDate(this: unknown, ...args: unknown[]): unknown {
  if (!new.target) return new RealDate(now()).toString();
  return args.length === 0 ? new RealDate(now()) : new (RealDate as unknown as new (...a: unknown[]) => Date)(...args);
}
FixedDate.prototype = RealDate.prototype;
FixedDate.now = now;
FixedDate.UTC = RealDate.UTC;
FixedDate.parse = RealDate.parse;
Object.defineProperty(RealDate.prototype, 'constructor', { value: FixedDate, writable: true, configurable: true });
Object.defineProperty(g, 'Date', { value: FixedDate, writable: true, configurable: true, enumerable: false });
Math.random = random;
