/** The ground under the API: database settings, migrations, the seed's one-time rule, config, start(). */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import { afterEach, describe, expect, it } from 'vitest';
import { loadConfig } from '../../server/config';
import { createDb, migrateLatest } from '../../server/db/knex';
import { seedIfEmpty } from '../../server/db/seed/index';
import { start } from '../../server/index';
import { DEMO } from '../helpers/testApp';

const dirs: string[] = [];
function tempDir(): string {
  const d = mkdtempSync(path.join(tmpdir(), 'comoving-found-'));
  dirs.push(d);
  return d;
}
afterEach(() => {
  for (const d of dirs.splice(0)) rmSync(d, { recursive: true, force: true });
});

describe('database', () => {
  it('opens in WAL mode with foreign keys enforced, and migrations are idempotent', async () => {
    const db = createDb(path.join(tempDir(), 'x.sqlite'));
    try {
      const first = await migrateLatest(db);
      expect(first.slice(0, 7)).toEqual([
        '0001_users_groups.ts',
        '0002_memberships.ts',
        '0003_invitations.ts',
        '0004_password_resets.ts',
        '0005_audit_log.ts',
        '0006_settings.ts',
        '0007_mail_outbox.ts',
      ]);
      expect(await migrateLatest(db)).toEqual([]);
      const [mode] = (await db.raw('PRAGMA journal_mode')) as { journal_mode: string }[];
      expect(mode!.journal_mode).toBe('wal');
      const [fk] = (await db.raw('PRAGMA foreign_keys')) as { foreign_keys: number }[];
      expect(fk!.foreign_keys).toBe(1);
      await expect(db('memberships').insert({ user_id: 999, group_id: 999, role: 'viewer' })).rejects.toThrow(/FOREIGN KEY/);
      await expect(db('users').insert({ email: 'a@example.org', name: 'A', password_hash: 'x', role: 'root' })).rejects.toThrow(/CHECK/);
    } finally {
      await db.destroy();
    }
  });

  it('seeds only an empty database and never overwrites', async () => {
    const db = createDb(path.join(tempDir(), 'x.sqlite'));
    try {
      await migrateLatest(db);
      expect(await seedIfEmpty(db)).toBe(true);
      const emails = (await db('users').orderBy('id').pluck('email')) as string[];
      expect(emails).toEqual([DEMO.admin.email, DEMO.owner.email, DEMO.editor.email, DEMO.viewer.email]);
      await db('users').where({ email: DEMO.owner.email }).update({ name: 'Changed by hand' });
      await db('groups').insert({ name: 'Added later' });
      expect(await seedIfEmpty(db)).toBe(false);
      expect((await db('users').where({ email: DEMO.owner.email }).first('name')).name).toBe('Changed by hand');
      expect(await db('users').count({ n: '*' }).first()).toEqual({ n: 4 });
      expect(await db('groups').where({ name: 'Added later' }).first()).toBeDefined();
    } finally {
      await db.destroy();
    }
  });

  it('a failing seed step leaves the database empty (one transaction)', async () => {
    const db = createDb(path.join(tempDir(), 'x.sqlite'));
    try {
      await migrateLatest(db);
      const steps = [
        { name: 'ok', run: async (trx: Parameters<Parameters<typeof db.transaction>[0]>[0]) => void (await trx('groups').insert({ name: 'half' })) },
        { name: 'boom', run: async () => { throw new Error('step failed'); } },
      ];
      await expect(seedIfEmpty(db, steps)).rejects.toThrow('step failed');
      expect(await db('groups').count({ n: '*' }).first()).toEqual({ n: 0 });
    } finally {
      await db.destroy();
    }
  });
});

describe('config', () => {
  it('has the documented defaults and keeps a generated session secret across restarts', () => {
    const dataDir = tempDir();
    const a = loadConfig({ COMOVING_DATA_DIR: dataDir });
    expect(a.port).toBe(3000);
    expect(a.appOrigin).toBe('http://127.0.0.1:3000');
    expect(a.dbFile).toBe(path.join(dataDir, 'comoving.sqlite'));
    expect(a.smtp).toBeUndefined();
    expect(a.jwtSecret.length).toBeGreaterThanOrEqual(32);
    expect(readFileSync(path.join(dataDir, 'jwt-secret'), 'utf8').trim()).toBe(a.jwtSecret);
    expect(loadConfig({ COMOVING_DATA_DIR: dataDir }).jwtSecret).toBe(a.jwtSecret);
    const b = loadConfig({ COMOVING_DATA_DIR: dataDir, PORT: '4100', COMOVING_JWT_SECRET: 'from-env-secret-0123456789abcdefghij', SMTP_HOST: 'smtp.example.org', SMTP_USER: 'u', SMTP_PASS: 'p' });
    expect(b.port).toBe(4100);
    expect(b.jwtSecret).toBe('from-env-secret-0123456789abcdefghij');
    expect(b.smtp).toEqual({ host: 'smtp.example.org', port: 587, secure: false, user: 'u', pass: 'p' });
    expect(() => loadConfig({ COMOVING_DATA_DIR: dataDir, PORT: 'abc' })).toThrow(/PORT/);
  });
});

describe('start()', () => {
  it('migrates, seeds, starts the catcher and serves the API on 127.0.0.1', async () => {
    const dataDir = tempDir();
    const prev = process.env.COMOVING_DATA_DIR;
    process.env.COMOVING_DATA_DIR = dataDir;
    let running: Awaited<ReturnType<typeof start>> | undefined;
    try {
      running = await start({ port: 0, logRequests: false, appOrigin: 'http://127.0.0.1:3000', clientDir: undefined });
      const addr = running.server.address() as { address: string; port: number };
      expect(addr.address).toBe('127.0.0.1');
      const health = await fetch(`http://127.0.0.1:${addr.port}/api/health`);
      expect(await health.json()).toEqual({ status: 'ok' });
      const signIn = await fetch(`http://127.0.0.1:${addr.port}/api/auth/sign-in`, {
        method: 'POST',
        headers: { 'Content-Type': 'application/json' },
        body: JSON.stringify({ email: DEMO.viewer.email, password: DEMO.viewer.password }),
      });
      expect(signIn.status).toBe(200);
      expect(running.catcher?.port).toBeGreaterThan(0);
      await running.deps.mailer.send({ to: 'check@example.org', subject: 'start check', text: 'hello' });
      expect((await running.catcher!.messages())[0]).toMatchObject({ to: 'check@example.org', subject: 'start check' });
    } finally {
      await running?.stop();
      if (prev === undefined) delete process.env.COMOVING_DATA_DIR;
      else process.env.COMOVING_DATA_DIR = prev;
    }
  });
});
