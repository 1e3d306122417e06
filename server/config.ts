import { randomBytes } from 'node:crypto';
import { existsSync, mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import type { AppConfig, SmtpConfig } from './deps';

type Env = Record<string, string | undefined>;

function intFrom(env: Env, name: string, fallback: number): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0) throw new Error(`Environment variable ${name} must be a non-negative integer, got "${raw}"`);
  return n;
}

/**
 * The session secret must survive restarts (or every restart signs everyone out), so when the
 * environment does not give one we make one once and keep it beside the database.
 */
export function loadOrCreateSecret(dataDir: string): string {
  const file = path.join(dataDir, 'jwt-secret');
  if (existsSync(file)) {
    const s = readFileSync(file, 'utf8').trim();
    if (s.length >= 32) return s;
  }
  const secret = randomBytes(48).toString('base64url');
  writeFileSync(file, secret + '\n', { mode: 0o600 });
  return secret;
}

function smtpFrom(env: Env): SmtpConfig | undefined {
  if (!env.SMTP_HOST) return undefined;
  const port = intFrom(env, 'SMTP_PORT', 587);
  return {
    host: env.SMTP_HOST,
    port,
    secure: env.SMTP_SECURE ? env.SMTP_SECURE === 'true' : port === 465,
    user: env.SMTP_USER || undefined,
    pass: env.SMTP_PASS || undefined,
  };
}

/** Reads the configuration from the environment; every value has a working default for one machine. */
export function loadConfig(env: Env = process.env, overrides: Partial<AppConfig> = {}): AppConfig {
  const port = intFrom(env, 'PORT', 3000);
  const dataDir = path.resolve(overrides.dataDir ?? env.COMOVING_DATA_DIR ?? './data');
  mkdirSync(dataDir, { recursive: true });
  const appOrigin = (env.COMOVING_ORIGIN ?? `http://127.0.0.1:${port}`).replace(/\/+$/, '');
  const config: AppConfig = {
    port,
    dataDir,
    dbFile: path.join(dataDir, 'comoving.sqlite'),
    appOrigin,
    jwtSecret: env.COMOVING_JWT_SECRET || loadOrCreateSecret(dataDir),
    sessionTtlSeconds: intFrom(env, 'COMOVING_SESSION_TTL', 7 * 24 * 3600),
    invitationTtlSeconds: intFrom(env, 'COMOVING_INVITATION_TTL', 7 * 24 * 3600),
    passwordResetTtlSeconds: intFrom(env, 'COMOVING_RESET_TTL', 3600),
    mailFrom: env.SMTP_FROM || 'Comoving <no-reply@comoving.local>',
    smtp: smtpFrom(env),
    mailCatcherPort: intFrom(env, 'COMOVING_MAIL_CATCHER_PORT', 0),
    signInRateLimit: {
      windowMs: intFrom(env, 'COMOVING_SIGNIN_WINDOW_MS', 15 * 60 * 1000),
      limit: intFrom(env, 'COMOVING_SIGNIN_LIMIT', 10),
    },
    logRequests: env.COMOVING_LOG_REQUESTS ? env.COMOVING_LOG_REQUESTS === 'true' : true,
    production: env.NODE_ENV === 'production',
    ...overrides,
  };
  if (overrides.dataDir) config.dbFile = overrides.dbFile ?? path.join(dataDir, 'comoving.sqlite');
  return config;
}
