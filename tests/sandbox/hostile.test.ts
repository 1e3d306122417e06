/**
 * Hostile scripts: each case asserts the exact status and message a member would see. Expected messages
 * are the product's own wording (common practice: no outside source defines them); QuickJS's own error
 * texts ("cannot read property…", "invalid redefinition…") are those of the QuickJS engine.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import { createSandbox } from '../../server/sandbox/index';
import type { RunJob, RunResult, Sandbox } from '../../server/sandbox/types';
import { DEFAULT_LIMITS, type SandboxLimits } from '../../shared/schemas/limits';
import { makeTestApp, DEMO, type TestApp } from '../helpers/testApp';

let sandbox: Sandbox;
beforeAll(() => {
  sandbox = createSandbox({ threads: 2 });
});
afterAll(async () => {
  await sandbox.close();
});

function job(source: string, limits: Partial<SandboxLimits> = {}, extra: Partial<RunJob> = {}): RunJob {
  return {
    source,
    language: 'js',
    params: {},
    seed: 7,
    limits: { ...DEFAULT_LIMITS, wallTimeMs: 800, ...limits },
    datasets: {},
    recipes: {},
    ...extra,
  };
}

interface Case {
  name: string;
  source: string;
  language?: 'ts' | 'js';
  limits?: Partial<SandboxLimits>;
  status: RunResult['status'];
  message: string;
  limit?: string;
  line?: number;
  column?: number;
  /** Extra check on the result. */
  check?: (r: RunResult) => void;
}

const U = 'const u = universe({H0: 70, omegaM: 0.3});\n';

const cases: Case[] = [
  // Endless loops
  { name: 'plain endless loop', source: 'while (true) {}', status: 'limit', message: 'Stopped by the wall time limit of 800 ms', limit: 'wallTimeMs' },
  { name: 'endless loop in a callback', source: '[1, 2, 3].forEach(function () { for (;;) {} });', status: 'limit', message: 'Stopped by the wall time limit of 800 ms', limit: 'wallTimeMs' },
  { name: 'endless generator', source: 'function* g() { while (true) yield 1; }\nfor (const x of g()) {}', status: 'limit', message: 'Stopped by the wall time limit of 800 ms', limit: 'wallTimeMs' },
  { name: 'endless loop in a promise job', source: 'Promise.resolve().then(() => { while (true) {} });', status: 'limit', message: 'Stopped by the wall time limit of 800 ms', limit: 'wallTimeMs' },
  // The chain also keeps every promise alive, so it races the wall time against the memory limit:
  // with room to spare the deadline stops it, with 8 MB the heap fills first (QuickJS then throws null).
  {
    name: 'endless chain of promise jobs', source: 'const f = () => Promise.resolve().then(f);\nf();',
    limits: { memoryMb: 512 }, status: 'limit', message: 'Stopped by the wall time limit of 800 ms', limit: 'wallTimeMs',
  },
  {
    name: 'endless chain of promise jobs in a small heap', source: 'const f = () => Promise.resolve().then(f);\nf();',
    limits: { memoryMb: 8, wallTimeMs: 10_000 }, status: 'limit', message: 'Stopped by the memory limit of 8 MB', limit: 'memoryMb',
  },
  { name: 'endless await loop', source: '(async () => { for (;;) await null; })();', status: 'limit', message: 'Stopped by the wall time limit of 800 ms', limit: 'wallTimeMs' },
  { name: 'endless loop that catches the interrupt', source: 'for (;;) { try { while (true) {} } catch (e) {} }', status: 'limit', message: 'Stopped by the wall time limit of 800 ms', limit: 'wallTimeMs' },
  // Memory bombs
  {
    name: 'array memory bomb', source: 'const a = []; for (let i = 0; ; i++) a.push(new Array(10000).fill(i));',
    limits: { memoryMb: 8, wallTimeMs: 10_000 }, status: 'limit', message: 'Stopped by the memory limit of 8 MB', limit: 'memoryMb',
  },
  {
    name: 'growing typed arrays', source: 'const a = []; for (let i = 0; ; i++) a.push(new Float64Array(10000));',
    limits: { memoryMb: 8, wallTimeMs: 10_000 }, status: 'limit', message: 'Stopped by the memory limit of 8 MB', limit: 'memoryMb',
  },
  {
    name: 'memory bomb inside one built-in call', source: 'const a = new Array(20000000).fill(1.5);',
    limits: { memoryMb: 8, wallTimeMs: 10_000 }, status: 'limit', message: 'Stopped by the memory limit of 8 MB', limit: 'memoryMb',
  },
  {
    name: 'one huge typed array', source: 'const big = new Float64Array(50000000);',
    limits: { memoryMb: 8, wallTimeMs: 10_000 }, status: 'limit', message: 'Stopped by the memory limit of 8 MB', limit: 'memoryMb',
  },
  {
    name: 'object memory bomb', source: 'const o = {}; for (let i = 0; ; i++) o["key" + i] = [i, i, i, i];',
    limits: { memoryMb: 8, wallTimeMs: 10_000 }, status: 'limit', message: 'Stopped by the memory limit of 8 MB', limit: 'memoryMb',
  },
  { name: 'doubling string', source: 'let s = "x";\nwhile (true) s += s;', status: 'error', message: 'InternalError: string too long', line: 2, column: 16 },
  // Deep recursion
  { name: 'deep recursion', source: 'function f(n) { return f(n + 1) + 1; }\nf(0);', status: 'limit', message: 'Stopped by the stack depth limit of 512 kB', limit: 'stackKb' },
  { name: 'deep recursion at the largest stack', source: 'const f = (n) => f(n + 1) + 1;\nf(0);', limits: { stackKb: 4096 }, status: 'limit', message: 'Stopped by the stack depth limit of 4096 kB', limit: 'stackKb' },
  { name: 'deeply nested JSON', source: 'JSON.parse("[".repeat(200000));', status: 'limit', message: 'Stopped by the stack depth limit of 512 kB', limit: 'stackKb' },
  // Huge outputs
  {
    name: 'log flood', source: 'for (let i = 0; i < 1e6; i++) print("line " + i);', limits: { outputKb: 64 },
    status: 'limit', message: 'Stopped by the output size limit of 64 kB: the run produced more output than that', limit: 'outputKb', line: 1, column: 36,
  },
  {
    name: 'giant table', source: 'const x = linspace(0, 1, 200000);\nshow.table("t", [{name: "x", values: x}]);', limits: { outputKb: 256 },
    status: 'limit', message: 'Stopped by the output size limit of 256 kB: the run produced more output than that', limit: 'outputKb', line: 2, column: 11,
  },
  // Kernel abuse
  {
    name: 'giant array to the kernel', source: `${U}u.H(new Float64Array(2000000));`, status: 'limit',
    message: 'Stopped by the array length per call limit of 1000000 elements: H got 2000000 elements in z', limit: 'arrayLength', line: 2, column: 4,
  },
  {
    name: 'giant grid', source: 'linspace(0, 1, 1e9);', status: 'limit',
    message: 'Stopped by the array length per call limit of 1000000 elements: linspace got 1000000000 elements in n', limit: 'arrayLength', line: 1, column: 9,
  },
  {
    name: 'too many kernel calls', source: `${U}for (let i = 0; i < 1000; i++) u.E(0.5);`, limits: { kernelCalls: 100 },
    status: 'limit', message: 'Stopped by the kernel calls limit of 100 calls', limit: 'kernelCalls', line: 2, column: 35,
  },
  // Wrong types where numbers belong
  { name: 'NaN redshift', source: `${U}u.comovingDistance(NaN);`, status: 'error', message: 'comovingDistance: z must be a finite number, got NaN', line: 2, column: 19 },
  { name: 'Infinity redshift', source: `${U}u.E(Infinity);`, status: 'error', message: 'E: z must be a finite number, got Infinity', line: 2, column: 4 },
  { name: 'NaN inside an array', source: `${U}u.H([0.1, NaN, 0.3]);`, status: 'error', message: 'H: z[1] must be a finite number, got NaN', line: 2, column: 4 },
  { name: 'string where a number belongs', source: `${U}u.H("1");`, status: 'error', message: 'H: z must be a number or an array of numbers, got a string', line: 2, column: 4 },
  { name: 'string inside an array', source: `${U}u.H([1, "2", 3]);`, status: 'error', message: 'H: z[1] must be a number, got a string', line: 2, column: 4 },
  { name: 'object where a number belongs', source: `${U}u.luminosityDistance({z: 1});`, status: 'error', message: 'luminosityDistance: z must be a number or an array of numbers, got an object', line: 2, column: 21 },
  { name: 'string parameter to universe', source: 'universe({H0: "70", omegaM: 0.3});', status: 'error', message: 'universe: H0 must be a finite number (got "70")', line: 1, column: 9 },
  { name: 'no parameters to universe', source: 'universe(null);', status: 'error', message: 'universe: params must be an object like {H0: 67.7, omegaM: 0.31}, got null', line: 1, column: 9 },
  { name: 'NaN shown as a value', source: 'show.value("x", 0 / 0);', status: 'error', message: 'show.value: value of "x" must be a finite number, got NaN', line: 1, column: 11 },
  { name: 'number as a unit', source: 'show.value("x", 1, 5);', status: 'error', message: 'show.value: unit must be a string, got number', line: 1, column: 11 },
  { name: 'unknown plot type', source: 'show.plot({type: "pie", x: [1], series: []});', status: 'error', message: 'show.plot: spec.type must be one of line, scatter, band, heatmap, got a string', line: 1, column: 10 },
  { name: 'ragged table', source: 'show.table("t", [{name: "a", values: [1, 2]}, {name: "b", values: [1]}]);', status: 'error', message: 'show.table: columns[1] ("b") has 1 values but columns[0] has 2', line: 1, column: 11 },
  { name: 'bad grid size', source: 'linspace(0, 1, 2.5);', status: 'error', message: 'linspace: n must be a whole number ≥ 1, got 2.5', line: 1, column: 9 },
  { name: 'units that do not match', source: 'convert(1, "eV", "Mpc");', status: 'error', message: 'convert: cannot convert eV to Mpc: the units measure different things', line: 1, column: 8 },
  { name: 'unknown unit', source: 'convert(1, "Mpc", "furlong_per_fortnight");', status: 'error', message: 'convert: unknown unit "furlong_per_fortnight" (to)', line: 1, column: 8 },
  { name: 'method that does not exist', source: `${U}u.warpDrive(1);`, status: 'error', message: 'TypeError: not a function', line: 2, column: 12 },
  {
    name: 'catching a bad-argument error does not save the run', source: 'try { linspace(0, 1, "ten"); } catch (e) {}\nshow.value("after", 1);',
    status: 'error', message: 'linspace: n must be a number, got a string', line: 1, column: 15,
    check: (r) => expect(r.outputs).toEqual([]),
  },
  // Prototype tampering and reaching for the host
  {
    name: 'tampered JSON does not confuse the API', source: 'JSON.stringify = () => "null"; JSON.parse = () => null;\nshow.value("a", 1);',
    status: 'done', message: '', check: (r) => expect(r.outputs).toEqual([{ kind: 'value', name: 'a', value: 1 }]),
  },
  {
    name: 'tampered Float64Array does not reach the host', source: `Float64Array.prototype.slice = null; globalThis.Float64Array = function () {};\n${U}show.value("E", u.E(1));`,
    status: 'done', message: '', check: (r) => expect(r.outputs[0]).toMatchObject({ kind: 'value', name: 'E' }),
  },
  {
    name: 'constructor.constructor reaches only the sandbox', source: 'const F = (() => {}).constructor.constructor;\nprint(F("return [typeof process, typeof require, typeof __host, typeof globalThis.fetch].join(\',\')")());',
    status: 'done', message: '', check: (r) => expect(r.logs).toEqual(['undefined,undefined,undefined,undefined']),
  },
  {
    name: 'no host objects, timers or clock', source: 'print([typeof setTimeout, typeof setInterval, typeof console, typeof WebAssembly, typeof std, typeof os, typeof SharedArrayBuffer === "function" ? "sab" : "nosab"].join(","));\nprint(Date.now(), new Date().toISOString());',
    status: 'done', message: '',
    check: (r) => expect(r.logs).toEqual(['undefined,undefined,undefined,undefined,undefined,undefined,sab', '946728000000 2000-01-01T12:00:00.000Z']),
  },
  // Throwing non-Errors
  { name: 'throwing a number', source: 'throw 42;', status: 'error', message: 'The script threw a value that is not an Error: 42' },
  { name: 'throwing null', source: 'throw null;', status: 'error', message: 'The script threw a value that is not an Error: null' },
  { name: 'throwing an object', source: 'throw {reason: "nope"};', status: 'error', message: 'The script threw a value that is not an Error: {"reason":"nope"}' },
  { name: 'rejected async main', source: 'async function main() { await null; throw new RangeError("late"); }\nmain();', status: 'error', message: 'RangeError: late', line: 1, column: 57 },
  // Syntax errors
  { name: 'TypeScript syntax error', source: 'const a: number = 1;\nlet b = ;', language: 'ts', status: 'error', message: 'SyntaxError: Unexpected ";"', line: 2, column: 9 },
  { name: 'JavaScript syntax error', source: 'let x = 1;\nlet x = 2;', status: 'error', message: 'SyntaxError: invalid redefinition of lexical identifier', line: 2, column: 7 },
  { name: 'TypeScript runtime error maps to the TS line', source: 'interface P { a: number }\n\nconst p: P | null = null;\nconst v: number = (p as any).a;', language: 'ts', status: 'error', message: "TypeError: cannot read property 'a' of null", line: 4, column: 20 },
  // Unicode tricks in names
  {
    name: 'Unicode names are kept exactly', source: 'show.value("Ω\\u202Egnp", 1);\nshow.value("名前", 2);\nconst ℌ = 3; show.value("h\\u0301", ℌ);',
    status: 'done', message: '',
    check: (r) => expect(r.outputs.map((o) => (o.kind === 'value' ? o.name : ''))).toEqual(['Ω\u202Egnp', '名前', 'h\u0301']),
  },
  { name: 'empty name', source: 'show.value("", 3);', status: 'error', message: 'show.value: name must be a non-empty string, got an empty string', line: 1, column: 11 },
  { name: 'unknown dataset', source: 'dataset("nowhere");', status: 'error', message: 'dataset: the group has no dataset named "nowhere"', line: 1, column: 8 },
];

describe('hostile corpus', () => {
  it('has at least 30 cases', () => {
    expect(cases.length).toBeGreaterThanOrEqual(30);
  });

  it.each(cases)('$name', async (c) => {
    const r = await sandbox.run(job(c.source, c.limits, { language: c.language ?? 'js' }));
    expect(r.status).toBe(c.status);
    if (c.status === 'done') {
      expect(r.error).toBeUndefined();
    } else {
      expect(r.error?.message).toBe(c.message);
      expect(r.error?.limit).toBe(c.limit);
      if (c.line !== undefined) expect({ line: r.error?.line, column: r.error?.column }).toEqual({ line: c.line, column: c.column });
    }
    c.check?.(r);
  });

  it('runs normally right after an out-of-memory and a stack overflow (the module is replaced)', async () => {
    const one = new Array(2).fill(0).map(() => sandbox.run(job('function f(n) { return f(n + 1) + 1; } f(0);')));
    const two = new Array(2).fill(0).map(() => sandbox.run(job('new Float64Array(50000000);', { memoryMb: 8 })));
    const rs = await Promise.all([...one, ...two]);
    expect(rs.map((r) => r.error?.limit)).toEqual(['stackKb', 'stackKb', 'memoryMb', 'memoryMb']);
    const after = await Promise.all([0, 1, 2, 3].map((i) => sandbox.run(job(`show.value("i", ${i}); show.value("sum", [1,2,3].reduce((a, b) => a + b));`))));
    for (const [i, r] of after.entries()) {
      expect(r.status).toBe('done');
      expect(r.outputs).toEqual([{ kind: 'value', name: 'i', value: i }, { kind: 'value', name: 'sum', value: 6 }]);
    }
  });
});

describe('last resort: the worker is killed', () => {
  it('stops a built-in that never polls the interrupt (a giant sort) and the next run is unaffected', async () => {
    const sb = createSandbox({ threads: 1, killGraceMs: 300 });
    try {
      const r = await sb.run(job('new Array(30000000).fill(1).sort();', { wallTimeMs: 200, memoryMb: 1024 }));
      expect(r.status).toBe('limit');
      expect(r.error).toEqual({ message: 'Stopped by the wall time limit of 200 ms', limit: 'wallTimeMs' });
      const next = await sb.run(job('show.value("next", 1);'));
      expect(next.status).toBe('done');
      expect(next.outputs).toEqual([{ kind: 'value', name: 'next', value: 1 }]);
    } finally {
      await sb.close();
    }
  });

  it('cancels a queued or running script through its AbortSignal', async () => {
    const ac = new AbortController();
    const pending = sandbox.run(job('while (true) {}', { wallTimeMs: 30_000 }), ac.signal);
    setTimeout(() => ac.abort(), 300);
    const r = await pending;
    expect(r.status).toBe('cancelled');
    expect(r.error).toEqual({ message: 'Cancelled' });
  });
});

describe('the server stays responsive while a runaway script is stopped', () => {
  let t: TestApp;
  let server: http.Server;
  let base: string;
  beforeAll(async () => {
    t = await makeTestApp();
    server = await new Promise((resolve) => {
      const s = t.app.listen(0, '127.0.0.1', () => resolve(s));
    });
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  });
  afterAll(async () => {
    await new Promise((r) => server.close(r));
    await t.close();
  });

  it('answers /api/health within 100 ms during the run', async () => {
    const admin = await t.signIn(DEMO.admin.email);
    await admin.put('/api/admin/limits').send({ wallTimeMs: 1500 }).expect(200);
    const member = await t.signIn(DEMO.editor.email);
    // Warm the pool so the measurement covers the runaway script, not the first worker start.
    await member.post('/api/runs').send({ source: 'show.value("warm", 1)', language: 'js' }).expect(201);
    // The first fetch in a process loads its HTTP client; warm it too.
    await fetch(`${base}/api/health`);
    const running = member.post('/api/runs').send({ source: 'while (true) {}', language: 'js' });
    const runDone = running.then((res) => res);
    await new Promise((r) => setTimeout(r, 200));
    const times: number[] = [];
    for (let i = 0; i < 8; i++) {
      const t0 = performance.now();
      const res = await fetch(`${base}/api/health`);
      times.push(performance.now() - t0);
      expect(res.status).toBe(200);
      await new Promise((r) => setTimeout(r, 100));
    }
    const res = await runDone;
    expect(res.status).toBe(201);
    expect(res.body.run.status).toBe('limit');
    expect(res.body.run.error).toEqual({ message: 'Stopped by the wall time limit of 1500 ms', limit: 'wallTimeMs' });
    expect(Math.max(...times)).toBeLessThan(100);
  });
});
