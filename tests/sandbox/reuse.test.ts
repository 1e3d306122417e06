/**
 * One worker serves run after run from one prepared QuickJS context whose memory is put back to the
 * image taken after the prelude (server/sandbox/prepared.ts). Whatever a run does to its world — built-ins
 * replaced, the API deleted, promise jobs left queued, a nested recipe context, a deep recursion under a
 * small stack limit — the next run must start as if from a fresh context. The expected values are the
 * language's own (ECMAScript: an untouched prototype has no extra properties, jobs run in FIFO order) or
 * worked out here; the messages are the product's own wording (common practice).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { createSandbox } from '../../server/sandbox/index';
import type { RunJob, RunResult, Sandbox } from '../../server/sandbox/types';
import { DEFAULT_LIMITS, type SandboxLimits } from '../../shared/schemas/limits';
import { universe } from '../../server/kernel/index';

let sandbox: Sandbox;
beforeAll(() => {
  // One thread: every run below lands on the same worker, so on the same prepared context.
  sandbox = createSandbox({ threads: 1 });
});
afterAll(async () => {
  await sandbox.close();
});

function run(source: string, extra: Partial<RunJob> = {}, limits: Partial<SandboxLimits> = {}): Promise<RunResult> {
  return sandbox.run({
    source,
    language: 'js',
    params: {},
    seed: 99,
    limits: { ...DEFAULT_LIMITS, wallTimeMs: 5_000, ...limits },
    datasets: {},
    recipes: {},
    ...extra,
  });
}

function values(r: RunResult): Record<string, number | null> {
  expect(r.error).toBeUndefined();
  return Object.fromEntries(r.outputs.flatMap((o) => (o.kind === 'value' ? [[o.name, o.value]] : [])));
}

const PRISTINE = `
show.value('noPollution', Object.prototype.polluted === undefined && Array.prototype.extra === undefined ? 1 : 0);
show.value('mapWorks', [1, 2, 3].map((x) => x * 2).join() === '2,4,6' ? 1 : 0);
show.value('jsonWorks', JSON.stringify({ a: 1 }) === '{"a":1}' ? 1 : 0);
show.value('noLeak', typeof leaked === 'undefined' ? 1 : 0);
show.value('age', universe({ H0: 70, omegaM: 0.3 }).age(0));
show.value('now', Date.now());
show.value('r', Math.random());
`;

describe('a reused sandbox context', () => {
  it('starts every run from the same world, whatever the run before did to it', async () => {
    const clean = values(await run(PRISTINE));
    expect(clean.noPollution).toBe(1);
    expect(clean.mapWorks).toBe(1);
    expect(clean.jsonWorks).toBe(1);
    expect(clean.noLeak).toBe(1);
    expect(clean.age).toBe(universe({ H0: 70, omegaM: 0.3 }).age(0));
    // The fixed clock: J2000.0, 2000-01-01T12:00:00Z (IAU), in ms since 1970.
    expect(clean.now).toBe(946_728_000_000);

    const vandal = await run(`
      print('vandalised');
      Object.prototype.polluted = 1;
      Array.prototype.extra = 2;
      Array.prototype.map = function () { return []; };
      JSON.stringify = () => 'broken';
      globalThis.leaked = true;
      Math.random = () => 0.5;
      Date.now = () => 0;
      universe = () => { throw new Error('replaced'); };
      delete globalThis.show;
    `);
    expect(vandal.status).toBe('done');
    expect(vandal.logs).toEqual(['vandalised']);

    const after = values(await run(PRISTINE));
    expect(after).toEqual(clean);
  });

  it('drops the promise jobs a failed run left queued', async () => {
    const failed = await run("Promise.resolve().then(() => { globalThis.late = 1; }); throw new Error('stop here');");
    expect(failed.status).toBe('error');
    expect(failed.error?.message).toBe('Error: stop here');
    // Jobs run first-in first-out, so a job left over from the failed run would run before this one's.
    const next = values(await run("Promise.resolve().then(() => show.value('late', typeof late === 'undefined' ? 0 : 1));"));
    expect(next.late).toBe(0);
  });

  it('gives the same seed the same random stream in consecutive runs, and another seed another', async () => {
    const src = 'let s = 0; for (let i = 0; i < 5; i++) s = s * 10 + Math.floor(Math.random() * 10); show.value("digits", s);';
    const a = values(await run(src, { seed: 2024 }));
    const b = values(await run(src, { seed: 2024 }));
    const c = values(await run(src, { seed: 2025 }));
    expect(b.digits).toBe(a.digits);
    expect(c.digits).not.toBe(a.digits);
  });

  it('keeps answering after hundreds of runs that each open nested recipe contexts', async () => {
    const recipes = { twice: { language: 'js' as const, source: "show.value('y', 2 * param('x', { default: 1 }));" } };
    for (let i = 0; i < 200; i++) {
      const v = values(await run(`const r = recipe('twice', { x: ${i} }); show.value('y', r.y);`, { recipes }));
      expect(v.y).toBe(2 * i);
    }
    expect(values(await run(PRISTINE)).noLeak).toBe(1);
  });

  it('applies each run its own stack limit', async () => {
    const deep = 'function f(n) { return n === 0 ? 0 : 1 + f(n - 1); } show.value("depth", f(3000));';
    const small = await run(deep, {}, { stackKb: 64 });
    expect(small.status).toBe('limit');
    expect(small.error?.limit).toBe('stackKb');
    expect(values(await run(deep, {}, { stackKb: 4096 })).depth).toBe(3000);
    expect((await run(deep, {}, { stackKb: 64 })).status).toBe('limit');
  });

  it('starts clean after a run that used the C stack to its limit (the stack is not copied back)', async () => {
    const before = values(await run(PRISTINE));
    // The script catches its own overflow, so the run ends normally and the worker keeps its module.
    const deepest = await run('let d = 0; function f() { d++; f(); } try { f(); } catch (e) { show.value("depth", d); }', {}, { stackKb: 4096 });
    expect(values(deepest).depth).toBeGreaterThan(10_000);
    const regex = await run('show.value("m", /^(a+)+$/.test("a".repeat(20) + "b") ? 1 : 0);', {}, { stackKb: 4096, wallTimeMs: 5_000 });
    expect(['done', 'limit']).toContain(regex.status);
    expect(values(await run(PRISTINE))).toEqual(before);
  });

  it('gives a run after a large allocation its whole memory again', async () => {
    const big = await run('const a = new Float64Array(3_000_000); a[1] = 1; show.value("n", a.length);', {}, { memoryMb: 64 });
    expect(values(big).n).toBe(3_000_000);
    expect(values(await run('const a = new Float64Array(6_000_000); show.value("n", a.length);', {}, { memoryMb: 64 })).n).toBe(6_000_000);
    expect(values(await run(PRISTINE)).noLeak).toBe(1);
  });
});
