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
import { createSweepQueue } from './services/sweeps/index';

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
  if (await seedIfEmpty(db)) log('info', 'seeded the demo data (empty database)');
  const catcher = config.smtp ? undefined : await startMailCatcher(db, { port: config.mailCatcherPort });
  if (catcher) log('info', 'mail catcher listening', { host: '127.0.0.1', port: catcher.port });
  const mailer = mailerFor(config, catcher?.port);
  const deps: AppDeps = { db, config, mailer, sandbox: createSandbox() };
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
