/**
 * Sandbox.runBatch, the sweep entry point: every point gets the same answer as a single run, its own
 * wall-time deadline and limits, exactly one result, and a cancelled batch reports what it did not run.
 * Expected messages are the product's own wording (common practice: no outside source defines them).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createSandbox } from '../../server/sandbox/index';
import type { BatchJob, RunResult, Sandbox } from '../../server/sandbox/types';
import { DEFAULT_LIMITS, type SandboxLimits } from '../../shared/schemas/limits';

let sandbox: Sandbox;
beforeAll(() => {
  sandbox = createSandbox({ threads: 2 });
});
afterAll(async () => {
  await sandbox.close();
});

function base(source: string, limits: Partial<SandboxLimits> = {}, language: 'ts' | 'js' = 'js'): BatchJob {
  return { source, language, seed: 7, limits: { ...DEFAULT_LIMITS, wallTimeMs: 800, ...limits }, datasets: {}, recipes: {} };
}

async function batch(b: BatchJob, paramsList: Record<string, number>[], signal?: AbortSignal): Promise<RunResult[]> {
  const results: (RunResult | undefined)[] = new Array(paramsList.length);
  const calls = new Array<number>(paramsList.length).fill(0);
  await sandbox.runBatch!(b, paramsList, signal, (i, r) => {
    calls[i]! += 1;
    results[i] = r;
  });
  // Exactly one result per point, whatever happened.
  expect(calls).toEqual(new Array(paramsList.length).fill(1));
  return results as RunResult[];
}

const SQUARE = "const a: number = param('a', { default: 0, min: -100, max: 100 }); show.value('y', a * a + 1); print('a=' + a);";

describe('Sandbox.runBatch', () => {
  it('gives every point the result a single run gives', async () => {
    const paramsList = Array.from({ length: 37 }, (_v, i) => ({ a: i - 18 }));
    const results = await batch(base(SQUARE, {}, 'ts'), paramsList);
    for (let i = 0; i < paramsList.length; i++) {
      const a = paramsList[i]!.a;
      expect(results[i]!.status).toBe('done');
      // a² + 1 worked out here, outside the sandbox.
      expect(results[i]!.outputs).toEqual([{ kind: 'value', name: 'y', value: a * a + 1 }]);
      expect(results[i]!.logs).toEqual([`a=${a}`]);
      expect(results[i]!.declaredParams).toEqual([{ name: 'a', default: 0, min: -100, max: 100 }]);
    }
    const single = await sandbox.run({ ...base(SQUARE, {}, 'ts'), params: paramsList[5]! });
    expect({ ...results[5]!, durationMs: 0, cpuMs: 0 }).toEqual({ ...single, durationMs: 0, cpuMs: 0 });
  });

  it('gives each point a fresh context: globals do not leak from one point to the next', async () => {
    const src = "if (typeof leaked !== 'undefined') throw new Error('leak'); globalThis.leaked = 1; var v = 2; show.value('ok', v);";
    const results = await batch(base(src), Array.from({ length: 10 }, () => ({})));
    expect(results.map((r) => r.status)).toEqual(new Array(10).fill('done'));
  });

  it('stops a runaway point by its own wall time and runs the others normally', async () => {
    const src = "const k = param('k', { default: 0 }); if (k === 2) { while (true) {} } show.value('k', k);";
    const results = await batch(base(src, { wallTimeMs: 300 }), [0, 1, 2, 3, 4].map((k) => ({ k })));
    expect(results[2]).toMatchObject({ status: 'limit', error: { message: 'Stopped by the wall time limit of 300 ms', limit: 'wallTimeMs' } });
    for (const k of [0, 1, 3, 4]) expect(results[k]!.outputs).toEqual([{ kind: 'value', name: 'k', value: k }]);
  });

  it('recovers after a point that runs out of memory or stack (the module is replaced)', async () => {
    const src = [
      "const k = param('k', { default: 0 });",
      'if (k === 1) { const a = []; for (;;) a.push(new Float64Array(100000)); }',
      'if (k === 3) { const f = (n) => f(n + 1) + 1; f(0); }',
      "show.value('k', k);",
    ].join('\n');
    const results = await batch(base(src, { memoryMb: 16, wallTimeMs: 5000 }), [0, 1, 2, 3, 4].map((k) => ({ k })));
    expect(results[1]).toMatchObject({ status: 'limit', error: { limit: 'memoryMb' } });
    expect(results[3]).toMatchObject({ status: 'limit', error: { limit: 'stackKb' } });
    for (const k of [0, 2, 4]) expect(results[k]).toMatchObject({ status: 'done', outputs: [{ kind: 'value', name: 'k', value: k }] });
  });

  it('reports a compile error for every point without running any', async () => {
    const results = await batch(base('const x: = 1;', {}, 'ts'), [{}, {}, {}]);
    const single = await sandbox.run({ ...base('const x: = 1;', {}, 'ts'), params: {} });
    expect(single.status).toBe('error');
    expect(single.error?.line).toBe(1);
    for (const r of results) expect(r).toEqual(single);
  });

  it('on cancel, stops soon and reports the points it did not finish as cancelled', async () => {
    const src = "const k = param('k', { default: 0 }); const until = 20 + k * 0; let n = 0; for (let i = 0; i < 3e5; i++) n += i; show.value('k', k + until * 0);";
    const ac = new AbortController();
    const paramsList = Array.from({ length: 400 }, (_v, k) => ({ k }));
    const t0 = Date.now();
    setTimeout(() => ac.abort(), 150);
    const results = await batch(base(src, { wallTimeMs: 5000 }), paramsList, ac.signal);
    expect(Date.now() - t0).toBeLessThan(3000);
    const statuses = new Set(results.map((r) => r.status));
    expect([...statuses].every((s) => s === 'done' || s === 'cancelled')).toBe(true);
    expect(results.filter((r) => r.status === 'cancelled').length).toBeGreaterThan(0);
    for (const [k, r] of results.entries()) if (r.status === 'done') expect(r.outputs).toEqual([{ kind: 'value', name: 'k', value: k }]);
  });
});
