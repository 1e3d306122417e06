import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Server } from 'node:http';
import { createApp } from './app';
import { loadConfig } from './config';
import { createDb, migrateLatest } from './db/knex';
import { seedIfEmpty } from './db/seed/index';
import type { AppConfig, AppDeps } from './deps';
import { log } from './http/log';
import { startMailCatcher, type MailCatcher } from './mail/catcher';
import { mailerFor } from './mail/mailer';
import { createSandbox } from './sandbox/index';
import { recoverInterruptedRuns } from './services/runs';
import { createSweepQueue } from './services/sweeps/index';
import { runNotebookBlocks } from './services/notebook-runs';

const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..');

export interface Running {
  server: Server;
  deps: AppDeps;
  catcher?: MailCatcher;
  stop(): Promise<void>;
}

/** config → database → migrations → seed (empty database only) → mail catcher → app → listen. */
export async function start(overrides: Partial<AppConfig> = {}): Promise<Running> {
  const config = loadConfig(process.env, { clientDir: path.join(ROOT, 'dist/client'), ...overrides });
  const db = createDb(config.dbFile);
  const applied = await migrateLatest(db);
  if (applied.length) log('info', 'migrations applied', { applied });
  const seeded = await seedIfEmpty(db);
  if (seeded) log('info', 'seeded the demo data (empty database)');
  const cutOff = await recoverInterruptedRuns(db);
  if (cutOff) log('info', 'runs cut off by the last stop marked as errors', { count: cutOff });
  const catcher = config.smtp ? undefined : await startMailCatcher(db, { port: config.mailCatcherPort });
  if (catcher) log('info', 'mail catcher listening', { host: '127.0.0.1', port: catcher.port });
  const mailer = mailerFor(config, catcher?.port);
  const deps: AppDeps = { db, config, mailer, sandbox: createSandbox({ prewarm: true }) };
  const sweeps = createSweepQueue(deps);
  deps.sweeps = sweeps;
  const app = createApp(deps);
  const server = await new Promise<Server>((resolve, reject) => {
    const s = app.listen(config.port, '127.0.0.1', () => resolve(s));
    s.once('error', reject);
  });
  log('info', `Comoving at ${config.appOrigin}`, { port: config.port, dataDir: config.dataDir });
  // Sweeps a previous process left unfinished pick up at their first missing point.
  const resumed = await sweeps.resumeUnfinished();
  if (resumed.length) log('info', 'resumed unfinished sweeps', { sweeps: resumed });
  if (seeded) void runSeededNotebooks(deps);
  return {
    server,
    deps,
    catcher,
    async stop() {
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await deps.sweeps?.close();
      mailer.close();
      await catcher?.close();
      await deps.sandbox?.close();
      await db.destroy();
    },
  };
}

/** Runs the freshly seeded notebooks once, in the background, so they open with results. */
async function runSeededNotebooks(deps: AppDeps): Promise<void> {
  try {
    const rows = (await deps.db('notebooks').select('id', 'owner_id').orderBy('id')) as { id: number; owner_id: number }[];
    for (const nb of rows) {
      const r = await runNotebookBlocks(deps, nb.id, nb.owner_id);
      if (r.failed) log('warn', 'an example notebook block did not finish', { notebookId: nb.id, ...r });
    }
    log('info', 'ran the example notebooks', { notebooks: rows.length });
  } catch (err) {
    log('warn', 'could not run the example notebooks', { error: err instanceof Error ? err.message : String(err) });
  }
}

const isMain = process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url);
if (isMain) {
  start()
    .then((running) => {
      const shutdown = () => {
        running.stop().finally(() => process.exit(0));
      };
      process.once('SIGINT', shutdown);
      process.once('SIGTERM', shutdown);
    })
    .catch((err: unknown) => {
      log('error', 'could not start', { error: err instanceof Error ? err.stack ?? err.message : String(err) });
      process.exit(1);
    });
}
