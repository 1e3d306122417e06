/**
 * `npm run bench:sweep`: a 2-input, 40 × 40 sweep of a recipe that computes 100 luminosity
 * distances and a χ² against a 500-row distance-modulus dataset (the synthetic Aurora table), run
 * through the real sweep queue and a prewarmed sandbox pool (as the server's). The queue hands the
 * whole sweep to Sandbox.runBatch, which compiles the recipe once and sends the points to the two
 * workers in chunks of up to 16 (a fresh QuickJS context per point). Prints points per second, the
 * time to the full results table, and the process's CPU time per point (all threads), which other
 * load on the machine blurs far less than the wall-clock rate. Target on this machine (2 cores): at
 * least 500 points per second.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { loadavg, tmpdir } from 'node:os';
import { performance } from 'node:perf_hooks';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { loadConfig } from '../../server/config';
import { createDb, migrateLatest } from '../../server/db/knex';
import { seedIfEmpty } from '../../server/db/seed/index';
import type { AppDeps } from '../../server/deps';
import { startMailCatcher } from '../../server/mail/catcher';
import { mailerFor } from '../../server/mail/mailer';
import { createSandbox } from '../../server/sandbox/index';
import { uploadDataset } from '../../server/services/datasets';
import { createRecipe } from '../../server/services/recipes';
import { createSweepQueue } from '../../server/services/sweeps/index';
import { createSweep, sweepResults } from '../../server/services/sweeps/service';
import { resultsToCsv } from '../../server/services/sweeps/results';
import { readPoints } from '../../server/services/sweeps/store';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');

const RECIPE = `
const omegaM = param('omegaM', { default: 0.3, min: 0.05, max: 0.95 });
const w0 = param('w0', { default: -1, min: -2.5, max: 0 });
const model = universe({ H0: 70, omegaM, w0 });
const z = linspace(0.01, 2, 100);
const dL = model.luminosityDistance(z);
const fit = chi2(model, dataset('bench-sn'));
show.value('chi2', fit.chi2);
show.value('dL at z=2', dL[99], 'Mpc');
`;

async function main() {
  const dataDir = mkdtempSync(path.join(tmpdir(), 'comoving-bench-sweep-'));
  const config = loadConfig({ NODE_ENV: 'test', COMOVING_JWT_SECRET: 'bench-secret-0123456789abcdef0123456789' }, { dataDir, dbFile: path.join(dataDir, 'bench.sqlite'), logRequests: false });
  const db = createDb(config.dbFile);
  await migrateLatest(db);
  await seedIfEmpty(db);
  const catcher = await startMailCatcher(db, { port: 0 });
  const mailer = mailerFor(config, catcher.port);
  // Prewarmed like the server's (server/index.ts): every worker is up before the first sweep.
  const sandbox = createSandbox({ prewarm: true });
  const deps: AppDeps = { db, config, mailer, sandbox };
  const queue = createSweepQueue(deps);
  deps.sweeps = queue;
  try {
    const group = (await db('groups').orderBy('id').first('id')) as { id: number };
    const user = (await db('users').where({ role: 'admin' }).first('id')) as { id: number };
    const csv = readFileSync(path.join(ROOT, 'examples/datasets/aurora-sn-synthetic.csv'), 'utf8');
    await uploadDataset(db, { groupId: group.id, userId: user.id, name: 'bench-sn', kind: 'distance_modulus', csvText: csv });
    const rows = csv.split('\n').filter((l) => /^\d/.test(l)).length;
    const recipe = await createRecipe(db, { groupId: group.id, userId: user.id, name: 'bench-chi2', description: 'benchmark', source: RECIPE, language: 'ts' });

    // Warm the pool (worker bundle, QuickJS module load) so the figure is the steady rate.
    await createSweep(db, queue, user.id, { groupId: group.id, recipeId: recipe.id, language: 'ts', inputs: { omegaM: { values: [0.3, 0.31, 0.32, 0.33] } }, fixed: {}, notify: false });
    await waitAll(db);

    const t0 = performance.now();
    const cpu0 = process.cpuUsage();
    const elu0 = performance.eventLoopUtilization();
    const s = await createSweep(db, queue, user.id, {
      groupId: group.id,
      recipeId: recipe.id,
      language: 'ts',
      inputs: { omegaM: { from: 0.1, to: 0.6, steps: 40, scale: 'linear' }, w0: { from: -1.6, to: -0.5, steps: 40, scale: 'linear' } },
      fixed: {},
      notify: false,
    });
    await waitAll(db);
    const tRun = performance.now() - t0;
    const cpu = process.cpuUsage(cpu0);
    const elu = performance.eventLoopUtilization(elu0);
    const results = await sweepResults(db, s.id);
    const csvOut = resultsToCsv(results);
    const tTable = performance.now() - t0;
    const stored = await readPoints(db, s.id);
    const failed = results.points.filter((p) => p.status !== 'done');
    const pps = results.rows.length / (tRun / 1000);
    console.log('\nSweep benchmark (2 cores, embedded queue, QuickJS worker pool)');
    console.table([
      { measure: 'points', value: results.rows.length },
      { measure: 'dataset rows', value: rows },
      { measure: 'failed points', value: failed.length },
      { measure: 'time to last point (ms)', value: Math.round(tRun) },
      { measure: 'time to full results table + CSV (ms)', value: Math.round(tTable) },
      { measure: 'points per second', value: Math.round(pps) },
      // Every thread of this process (main + workers): a figure that other work on the machine blurs less.
      { measure: 'process CPU per point (ms)', value: ((cpu.user + cpu.system) / 1000 / results.rows.length).toFixed(2) },
      // Main thread (queue, SQLite writes, messages) and the workers' own time inside each point.
      { measure: 'main thread busy per point (ms)', value: (elu.active / results.rows.length).toFixed(2) },
      { measure: 'worker time per point, mean (ms)', value: (stored.reduce((s, p) => s + p.durationMs, 0) / stored.length).toFixed(2) },
      { measure: 'load average (1 min) at the end', value: loadavg()[0]!.toFixed(2) },
      { measure: 'CSV size (kB)', value: Math.round(csvOut.length / 1024) },
      { measure: 'best χ²', value: results.best ? `${results.best.value.toFixed(2)} at Ωm=${results.best.inputs.omegaM!.toFixed(3)}, w0=${results.best.inputs.w0!.toFixed(3)}` : 'none' },
    ]);
    console.log(`target ≥ 500 points/s: ${pps >= 500 ? 'met' : 'NOT met'}`);
    if (failed.length) console.log('first failure:', failed[0]);
  } finally {
    await queue.close();
    await sandbox.close();
    mailer.close();
    await catcher.close();
    await db.destroy();
    rmSync(dataDir, { recursive: true, force: true });
  }
}

async function waitAll(db: AppDeps['db']): Promise<void> {
  for (;;) {
    const busy = await db('sweeps').whereIn('status', ['queued', 'running']).count<{ n: number }[]>({ n: '*' });
    if (Number(busy[0]!.n) === 0) return;
    await new Promise((r) => setTimeout(r, 20));
  }
}

main().catch((err: unknown) => {
  console.error(err);
  process.exit(1);
});
