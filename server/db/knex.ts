import { readdirSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import knexFactory, { type Knex } from 'knex';

export const MIGRATIONS_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../migrations');

/**
 * Opens the SQLite database with WAL (readers never block the writer) and foreign keys on
 * (SQLite leaves them off per connection unless asked).
 */
export function createDb(filename: string): Knex {
  return knexFactory({
    client: 'better-sqlite3',
    connection: { filename },
    useNullAsDefault: true,
    pool: {
      min: 1,
      max: 1,
      afterCreate(conn: { pragma(s: string): unknown }, done: (err: Error | null, conn: unknown) => void) {
        try {
          conn.pragma('journal_mode = WAL');
          conn.pragma('foreign_keys = ON');
          conn.pragma('busy_timeout = 5000');
          conn.pragma('synchronous = NORMAL');
          done(null, conn);
        } catch (err) {
          done(err as Error, conn);
        }
      },
    },
  });
}

interface MigrationModule {
  up(knex: Knex): Promise<void>;
  down?(knex: Knex): Promise<void>;
}

/**
 * Knex's own loader imports migration files from inside node_modules, where neither tsx's nor
 * vitest's TypeScript transform reaches; importing them from our own module keeps `.ts`
 * migrations working under `tsx`, vitest and any future build.
 */
class TsMigrationSource implements Knex.MigrationSource<string> {
  constructor(private readonly dir: string) {}
  async getMigrations(): Promise<string[]> {
    return readdirSync(this.dir)
      .filter((f) => /^\d{4}_.+\.(ts|js|mjs)$/.test(f) && !f.endsWith('.d.ts'))
      .sort();
  }
  getMigrationName(name: string): string {
    return name;
  }
  async getMigration(name: string): Promise<Knex.Migration> {
    const mod = (await import(pathToFileURL(path.join(this.dir, name)).href)) as MigrationModule;
    return { up: mod.up, down: mod.down };
  }
}

/** Applies every migration in `migrations/` not yet applied. Returns the names applied now. */
export async function migrateLatest(db: Knex, dir: string = MIGRATIONS_DIR): Promise<string[]> {
  const [, applied] = (await db.migrate.latest({ migrationSource: new TsMigrationSource(dir) })) as [number, string[]];
  return applied;
}

/** Rolls everything back (tests of migrations only). */
export async function migrateRollbackAll(db: Knex, dir: string = MIGRATIONS_DIR): Promise<void> {
  await db.migrate.rollback({ migrationSource: new TsMigrationSource(dir) }, true);
}
