import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import path from 'node:path';
import type express from 'express';
import type { Knex } from 'knex';
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { createApp } from '../../server/app';
import { SESSION_COOKIE } from '../../server/auth/session';
import { loadConfig } from '../../server/config';
import { createDb, migrateLatest } from '../../server/db/knex';
import { DEMO_GROUP_NAME, DEMO_PASSWORD, SECOND_GROUP_NAME } from '../../server/db/seed/demoAccounts';
import { seedIfEmpty } from '../../server/db/seed/index';
import type { AppConfig, AppDeps } from '../../server/deps';
import { startMailCatcher, type MailCatcher } from '../../server/mail/catcher';
import { mailerFor } from '../../server/mail/mailer';
import { createSandbox } from '../../server/sandbox/index';

/** The four demo accounts of the seed (demo only). */
export const DEMO = {
  admin: { email: 'ada@lindqvist-lab.example', password: DEMO_PASSWORD, name: 'Ada Lindqvist' },
  owner: { email: 'bo@lindqvist-lab.example', password: DEMO_PASSWORD, name: 'Bo Kessler' },
  editor: { email: 'cyd@lindqvist-lab.example', password: DEMO_PASSWORD, name: 'Cyd Okafor' },
  viewer: { email: 'dee@lindqvist-lab.example', password: DEMO_PASSWORD, name: 'Dee Marsh' },
} as const;
export type DemoRole = keyof typeof DEMO;
export { DEMO_GROUP_NAME, SECOND_GROUP_NAME };

/** The origin test apps are configured with; the agents send it as their Origin header. */
export const TEST_ORIGIN = 'http://127.0.0.1:3000';

export type Agent = ReturnType<typeof request.agent>;

export interface TestApp {
  app: express.Express;
  db: Knex;
  deps: AppDeps;
  config: AppConfig;
  mailCatcher: MailCatcher;
  /** A supertest agent signed in as the account (password defaults to the demo one), sending Origin. */
  signIn(email: string, password?: string): Promise<Agent>;
  /**
   * A supertest agent carrying a session cookie minted directly (no argon2 check, so ~0 ms instead
   * of ~150 ms). For role-based tests; the sign-in route itself is tested through signIn().
   */
  as(email: string): Promise<Agent>;
  /** A signed-out supertest agent that still sends the app's Origin. */
  anon(): Agent;
  /** Id of "Lindqvist Lab — Survey Cosmology". */
  demoGroupId(): Promise<number>;
  /** Id of "Kessler Group — Early Universe" (bo owner, cyd editor only). */
  secondGroupId(): Promise<number>;
  close(): Promise<void>;
}

export interface TestAppOptions {
  /** Config values to override (e.g. signInRateLimit). */
  config?: Partial<AppConfig>;
  /** Seed the demo data (default true). */
  seed?: boolean;
  /** Extra deps (e.g. a sandbox) merged into AppDeps. */
  deps?: Partial<Omit<AppDeps, 'db' | 'config' | 'mailer'>>;
}

async function groupIdByName(db: Knex, name: string): Promise<number> {
  const row = (await db('groups').where({ name }).first('id')) as { id: number } | undefined;
  if (!row) throw new Error(`No group named ${name}; was the database seeded?`);
  return row.id;
}

/** Id of the demo group in a seeded database. */
export function demoGroupId(target: Knex | TestApp): Promise<number> {
  return groupIdByName('db' in target && typeof target.close === 'function' ? (target as TestApp).db : (target as Knex), DEMO_GROUP_NAME);
}

/** Id of the second demo group in a seeded database. */
export function secondGroupId(target: Knex | TestApp): Promise<number> {
  return groupIdByName('db' in target && typeof target.close === 'function' ? (target as TestApp).db : (target as Knex), SECOND_GROUP_NAME);
}

/** A fresh app on a temp data dir: migrated, seeded, with a real SMTP catcher on loopback. */
export async function makeTestApp(opts: TestAppOptions = {}): Promise<TestApp> {
  const dataDir = mkdtempSync(path.join(tmpdir(), 'comoving-test-'));
  const config = loadConfig(
    { NODE_ENV: 'test', COMOVING_JWT_SECRET: 'test-secret-' + Math.random().toString(36).slice(2) + '-0123456789abcdef' },
    {
      dataDir,
      appOrigin: TEST_ORIGIN,
      logRequests: false,
      signInRateLimit: { windowMs: 60_000, limit: 1000 },
      ...opts.config,
    },
  );
  const db = createDb(config.dbFile);
  await migrateLatest(db);
  if (opts.seed !== false) await seedIfEmpty(db);
  const mailCatcher = await startMailCatcher(db);
  const mailer = mailerFor({ ...config, smtp: undefined }, mailCatcher.port);
  const deps: AppDeps = { db, config, mailer, sandbox: createSandbox(), ...opts.deps };
  const app = createApp(deps);

  const anon = (): Agent => request.agent(app).set('Origin', TEST_ORIGIN);
  const t: TestApp = {
    app,
    db,
    deps,
    config,
    mailCatcher,
    anon,
    async signIn(email, password = DEMO_PASSWORD) {
      const agent = anon();
      const res = await agent.post('/api/auth/sign-in').send({ email, password });
      if (res.status !== 200) throw new Error(`sign-in as ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
      return agent;
    },
    async as(email) {
      const u = (await db('users').where({ email: email.toLowerCase() }).first('id', 'session_version')) as { id: number; session_version: number } | undefined;
      if (!u) throw new Error(`No user ${email}`);
      const token = jwt.sign({ sv: u.session_version }, config.jwtSecret, { algorithm: 'HS256', subject: String(u.id), expiresIn: config.sessionTtlSeconds });
      return anon().set('Cookie', `${SESSION_COOKIE}=${token}`);
    },
    demoGroupId: () => groupIdByName(db, DEMO_GROUP_NAME),
    secondGroupId: () => groupIdByName(db, SECOND_GROUP_NAME),
    async close() {
      mailer.close();
      await mailCatcher.close();
      await deps.sandbox?.close();
      await db.destroy();
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
  return t;
}
