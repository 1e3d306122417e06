import type { Knex } from 'knex';
import type { Mailer } from './mail/mailer';
import type { Sandbox } from './sandbox/index';

export type { Sandbox };
import type { SweepQueue } from './services/sweeps/queue';

/** Outbound SMTP for production; when absent, mail goes to the local catcher. */
export interface SmtpConfig {
  host: string;
  port: number;
  secure: boolean;
  user?: string;
  pass?: string;
}

export interface AppConfig {
  /** Port `npm start` listens on (127.0.0.1). */
  port: number;
  /** Folder for the SQLite file, uploads and the mail catcher. */
  dataDir: string;
  /** Absolute path of the SQLite database file. */
  dbFile: string;
  /** The origin the app is served from, e.g. http://127.0.0.1:3000; used for links in mail and the Origin check. */
  appOrigin: string;
  /** HMAC secret for session JWTs. */
  jwtSecret: string;
  /** Lifetime of a session cookie, seconds. */
  sessionTtlSeconds: number;
  /** Lifetime of an invitation link, seconds. */
  invitationTtlSeconds: number;
  /** Lifetime of a password-reset link, seconds. */
  passwordResetTtlSeconds: number;
  /** Sender address for every mail. */
  mailFrom: string;
  /** Production SMTP; undefined means use the local catcher. */
  smtp?: SmtpConfig;
  /** Port for the local mail catcher (0 = random). */
  mailCatcherPort: number;
  /** Sign-in attempts allowed per IP within the window (failed ones count). */
  signInRateLimit: { windowMs: number; limit: number };
  /** Folder of the built client to serve with an SPA fallback; undefined = API only. */
  clientDir?: string;
  /** Log one line per request (off in tests). */
  logRequests: boolean;
  /** NODE_ENV === 'production'. */
  production: boolean;
}

export interface AppDeps {
  db: Knex;
  config: AppConfig;
  mailer: Mailer;
  sandbox?: Sandbox;
  /** Feeds sweep points to workers; absent where the server runs no sweeps. */
  sweeps?: SweepQueue;
}
