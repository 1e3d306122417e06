/**
 * Sandbox benchmark (`npm run bench:sandbox`): cost of a fresh QuickJS context, a trivial run through
 * the sandbox and end to end through the API, one scalar kernel call from a script, 1e5 redshifts in
 * one call compared with the same call made directly in Node, runs per second on the machine's cores,
 * and the process's memory over 10 000 runs in a row.
 *
 * Times inside a run come from the worker's own clock (cpuMs of a run with the work minus one without),
 * so the pool's messaging does not blur the per-call figures. Medians of several repeats.
 */
import { newQuickJSWASMModule, RELEASE_SYNC } from 'quickjs-emscripten';
import { availableParallelism } from 'node:os';
import { createSandbox } from '../../server/sandbox/index';
import type { RunJob, Sandbox } from '../../server/sandbox/types';
import { DEFAULT_LIMITS } from '../../shared/schemas/limits';
import { universe } from '../../server/kernel/index';
import { DEMO, makeTestApp } from '../helpers/testApp';

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];
const rows: [string, string, string][] = [];
const row = (what: string, value: string, note = '') => {
  rows.push([what, value, note]);
  console.log(`  ${what}: ${value} ${note}`);
};

function job(source: string): RunJob {
  return {
    source, language: 'js', params: {}, seed: 1,
    limits: { ...DEFAULT_LIMITS, wallTimeMs: 60_000, kernelCalls: 10_000_000, memoryMb: 512 },
    datasets: {}, recipes: {},
  };
}

async function cpuOf(sb: Sandbox, source: string, repeats = 7): Promise<number> {
  const xs: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const r = await sb.run(job(source));
    if (r.status !== 'done') throw new Error(`bench script failed: ${JSON.stringify(r.error)}`);
    xs.push(r.cpuMs);
  }
  return median(xs);
}

async function freshContext(): Promise<void> {
  const mod = await newQuickJSWASMModule(RELEASE_SYNC);
  const n = 2000;
  const t0 = performance.now();
  for (let i = 0; i < n; i++) {
    const rt = mod.newRuntime();
    const ctx = rt.newContext();
    ctx.dispose();
    rt.dispose();
  }
  row('fresh QuickJS runtime + context', `${(((performance.now() - t0) / n) * 1000).toFixed(0)} µs`, '(create + dispose, main thread)');
}

async function inSandbox(sb: Sandbox): Promise<void> {
  // Warm the pool: bundle, worker start, WASM module load, mathjs.
  const t0 = performance.now();
  await sb.run(job('show.value("x", 1)'));
  row('first run in a new process', `${(performance.now() - t0).toFixed(0)} ms`, '(bundle the worker, start it, load QuickJS)');

  const trivial: number[] = [];
  for (let i = 0; i < 200; i++) {
    const t = performance.now();
    await sb.run(job('show.value("x", 1)'));
    trivial.push(performance.now() - t);
  }
  row('trivial run via sandbox.run', `${median(trivial).toFixed(2)} ms`, '(median of 200; memory image restored + worker round trip)');

  // One scalar kernel call: per-call cost inside the worker, against the same call in Node.
  const K = 20_000;
  const setup = 'const u = universe({H0: 67.7, omegaM: 0.31}); u.H(0.5);';
  const base = await cpuOf(sb, `${setup} for (let i = 0; i < ${K}; i++) {}`);
  const calls = await cpuOf(sb, `${setup} for (let i = 0; i < ${K}; i++) u.H(0.5);`);
  const perCallUs = ((calls - base) / K) * 1000;
  const u = universe({ H0: 67.7, omegaM: 0.31 });
  u.H(0.5);
  let s = 0;
  const t1 = performance.now();
  for (let i = 0; i < K; i++) s += u.H(0.5);
  const directUs = ((performance.now() - t1) / K) * 1000;
  if (!Number.isFinite(s)) throw new Error('unexpected');
  row('one scalar kernel call from a script', `${perCallUs.toFixed(2)} µs`, `(direct in Node ${directUs.toFixed(2)} µs; overhead ${(perCallUs - directUs).toFixed(2)} µs, target < 20 µs)`);

  // 1e5 redshifts in one call, ten times per run.
  const R = 10;
  const setupZ = 'const u = universe({H0: 67.7, omegaM: 0.31}); const z = linspace(0.001, 3, 100000); u.luminosityDistance(z);';
  const baseZ = await cpuOf(sb, setupZ);
  const withZ = await cpuOf(sb, `${setupZ} for (let i = 0; i < ${R}; i++) u.luminosityDistance(z);`);
  const sandboxMs = (withZ - baseZ) / R;
  const z = new Float64Array(100_000).map((_, i) => 0.001 + (i * (3 - 0.001)) / 99_999);
  const u2 = universe({ H0: 67.7, omegaM: 0.31 });
  u2.luminosityDistance(z);
  const direct: number[] = [];
  for (let k = 0; k < 7; k++) {
    const t = performance.now();
    for (let i = 0; i < R; i++) u2.luminosityDistance(z);
    direct.push((performance.now() - t) / R);
  }
  const directMs = median(direct);
  row('1e5 redshifts, luminosityDistance, from a script', `${sandboxMs.toFixed(2)} ms`, `(direct in Node ${directMs.toFixed(2)} ms; ratio ${(sandboxMs / directMs).toFixed(2)}×, target ≤ 1.5×)`);

  // Throughput on all cores.
  const N = 400;
  const conc = 8;
  let next = 0;
  const t2 = performance.now();
  await Promise.all(
    Array.from({ length: conc }, async () => {
      while (next < N) {
        next++;
        await sb.run(job('const u = universe({H0: 70, omegaM: 0.3}); show.value("age", u.age(0));'));
      }
    }),
  );
  const rps = N / ((performance.now() - t2) / 1000);
  row(`runs per second (${availableParallelism()} cores, small script with a kernel call)`, `${rps.toFixed(0)} /s`);
}

async function memoryFlat(sb: Sandbox): Promise<void> {
  const N = 10_000;
  const src = 'const u = universe({H0: 70, omegaM: 0.3}); const z = linspace(0, 2, 100); show.table("t", [{name: "z", values: z}, {name: "H", values: u.H(z)}]); print("ok");';
  const samples: { at: number; rssMb: number }[] = [];
  let next = 0;
  let done = 0;
  const t0 = performance.now();
  await Promise.all(
    Array.from({ length: 2 }, async () => {
      while (next < N) {
        next++;
        const r = await sb.run(job(src));
        if (r.status !== 'done') throw new Error(JSON.stringify(r.error));
        done++;
        if (done % 1000 === 0) samples.push({ at: done, rssMb: process.memoryUsage().rss / 1048576 });
      }
    }),
  );
  const first = samples[0].rssMb;
  const last = samples[samples.length - 1].rssMb;
  const peak = Math.max(...samples.map((s) => s.rssMb));
  row(
    `${N} runs in a row: process RSS`,
    `${first.toFixed(0)} MB after 1000 → ${last.toFixed(0)} MB after ${N} (peak ${peak.toFixed(0)} MB)`,
    `(${((performance.now() - t0) / 1000).toFixed(1)} s; growth ${(last - first).toFixed(0)} MB)`,
  );
}

async function throughApi(): Promise<void> {
  const t = await makeTestApp();
  try {
    const agent = await t.signIn(DEMO.editor.email);
    await agent.post('/api/runs').send({ source: 'show.value("x", 1)', language: 'js' }).expect(201);
    const xs: number[] = [];
    for (let i = 0; i < 100; i++) {
      const t0 = performance.now();
      await agent.post('/api/runs').send({ source: 'show.value("x", 1)', language: 'js' }).expect(201);
      xs.push(performance.now() - t0);
    }
    row('trivial run end to end through POST /api/runs', `${median(xs).toFixed(2)} ms`, '(median of 100; auth, store, run, store, answer)');
  } finally {
    await t.close();
  }
}

async function main(): Promise<void> {
  console.log('Sandbox benchmark');
  await freshContext();
  const sb = createSandbox();
  try {
    await inSandbox(sb);
    await throughApi();
    await memoryFlat(sb);
  } finally {
    await sb.close();
  }
  console.log('\n| measure | result | note |\n|---|---|---|');
  for (const [a, b, c] of rows) console.log(`| ${a} | ${b} | ${c} |`);
}

main().catch((e: unknown) => {
  console.error(e);
  process.exit(1);
});
