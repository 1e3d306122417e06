/**
 * Browser-test harness shared by every e2e test: builds the client once (when dist/client is missing
 * or older than the sources), starts the real server in-process on a free port with a fresh temporary
 * data dir (migrated and seeded with the demo accounts), and drives Debian's chromium headless.
 *
 *   import { hasChromium, startE2E, skipReason } from './helpers';
 *   describe.skipIf(!hasChromium)('browser: …', () => {
 *     let e: E2E;
 *     beforeAll(async () => { e = await startE2E(); });
 *     afterAll(async () => { await e?.close(); });
 *     it('…', async () => { await e.signIn(DEMO_EDITOR); await e.page.getByRole(…) … });
 *   });
 */
import { execFileSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, rmSync, statSync } from 'node:fs';
import { createServer } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromium, type BrowserContext, type Page } from 'playwright-core';
import type { AppConfig } from '../../server/deps';

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..');
export const CLIENT_DIR = path.join(ROOT, 'dist/client');
export const SCREENSHOT_DIR = path.join(ROOT, 'tests/e2e/screenshots');
export const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
export const hasChromium = existsSync(CHROMIUM);
export const skipReason = `browser tests skipped: no chromium at ${CHROMIUM} (apt-get install -y chromium, or set CHROMIUM_PATH)`;

/** The seeded demo accounts (server/db/seed/demoAccounts.ts); all share one password. */
export const DEMO_PASSWORD = 'comoving-demo';
export const DEMO_EMAILS = {
  admin: 'ada@lindqvist-lab.example',
  owner: 'bo@lindqvist-lab.example',
  editor: 'cyd@lindqvist-lab.example',
  viewer: 'dee@lindqvist-lab.example',
} as const;
export const DEMO_GROUP = 'Lindqvist Lab — Survey Cosmology';

export interface E2E {
  /** e.g. http://127.0.0.1:41234 */
  baseUrl: string;
  dataDir: string;
  context: BrowserContext;
  /** The first page of the context; open more with `context.newPage()`. */
  page: Page;
  /** Go to a path of the app (e.g. '/groups/1') and wait for the network to settle. */
  goto(pathname: string, page?: Page): Promise<void>;
  /** Sign in through the real form and wait until the app frame shows. */
  signIn(email: string, password?: string, page?: Page): Promise<void>;
  /** Sign out through the API and drop the cookie. */
  signOut(page?: Page): Promise<void>;
  /** Full-page PNG into tests/e2e/screenshots/<name>.png (git-ignored); returns the file path. */
  screenshot(name: string, page?: Page): Promise<string>;
  close(): Promise<void>;
}

export interface E2EOptions {
  /** Server config overrides (merged over the harness's defaults). */
  config?: Partial<AppConfig>;
  viewport?: { width: number; height: number };
  colorScheme?: 'light' | 'dark';
  /** Echo browser console errors to the test output (default true). */
  logConsole?: boolean;
}

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.unref();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const addr = s.address();
      const port = typeof addr === 'object' && addr ? addr.port : 0;
      s.close(() => resolve(port));
    });
  });
}

function newestMtime(dir: string): number {
  let newest = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = path.join(dir, entry.name);
    if (entry.isDirectory()) newest = Math.max(newest, newestMtime(p));
    else newest = Math.max(newest, statSync(p).mtimeMs);
  }
  return newest;
}

function clientIsStale(): boolean {
  const built = path.join(CLIENT_DIR, 'index.html');
  if (!existsSync(built)) return true;
  if (process.env.COMOVING_E2E_NO_REBUILD === '1') return false;
  const builtAt = statSync(built).mtimeMs;
  const sources = [path.join(ROOT, 'src'), path.join(ROOT, 'shared')].filter(existsSync);
  const newest = Math.max(statSync(path.join(ROOT, 'index.html')).mtimeMs, ...sources.map(newestMtime));
  return newest > builtAt;
}

/**
 * Build the client when needed. Test files run in parallel workers, so a lock directory makes
 * sure only one of them builds while the others wait for it.
 */
export function ensureClientBuilt(): void {
  if (!clientIsStale()) return;
  const lock = path.join(os.tmpdir(), `comoving-e2e-build-${Buffer.from(ROOT).toString('hex').slice(-16)}.lock`);
  const deadline = Date.now() + 180_000;
  for (;;) {
    try {
      mkdirSync(lock);
      break;
    } catch {
      // Someone else is building; a lock older than 3 minutes is left over from a killed run.
      try {
        if (Date.now() - statSync(lock).mtimeMs > 180_000) rmSync(lock, { recursive: true, force: true });
      } catch {
        /* vanished between the calls: fine */
      }
      if (Date.now() > deadline) throw new Error('timed out waiting for another test to build the client');
      execFileSync('sleep', ['0.5']);
    }
  }
  try {
    // Vite refuses to build while another build of the project runs (a developer's, another test
    // run's): wait for that one and try again.
    for (let attempt = 0; clientIsStale(); attempt++) {
      try {
        execFileSync('npx', ['vite', 'build', '--logLevel', 'warn'], { cwd: ROOT, stdio: 'pipe', encoding: 'utf8' });
      } catch (e) {
        const out = `${(e as { stdout?: string }).stdout ?? ''}${(e as { stderr?: string }).stderr ?? ''}`;
        if (/another Vite build process/i.test(out) && attempt < 60) {
          execFileSync('sleep', ['3']);
          continue;
        }
        throw new Error(`building the client failed:\n${out}`);
      }
    }
  } finally {
    rmSync(lock, { recursive: true, force: true });
  }
}

export async function startE2E(opts: E2EOptions = {}): Promise<E2E> {
  if (!hasChromium) throw new Error(skipReason);
  // COMOVING_E2E_CLIENT_DIR: a build made elsewhere, so a parallel rebuild of dist/ cannot pull pages away mid-test.
  const clientDir = process.env.COMOVING_E2E_CLIENT_DIR;
  if (!clientDir) ensureClientBuilt();
  const port = await freePort();
  const dataDir = mkdtempSync(path.join(os.tmpdir(), 'comoving-e2e-data-'));
  const profileDir = mkdtempSync(path.join(os.tmpdir(), 'comoving-e2e-profile-'));
  const baseUrl = `http://127.0.0.1:${port}`;

  // Imported lazily so that a machine without chromium never loads the server stack for nothing.
  const { start } = await import('../../server/index');
  const running = await start({
    port,
    appOrigin: baseUrl,
    dataDir,
    dbFile: path.join(dataDir, 'comoving.sqlite'),
    clientDir: clientDir ?? CLIENT_DIR,
    logRequests: false,
    signInRateLimit: { windowMs: 60_000, limit: 1000 },
    ...opts.config,
  });

  let context: BrowserContext;
  try {
    context = await chromium.launchPersistentContext(profileDir, {
      executablePath: CHROMIUM,
      headless: true,
      viewport: opts.viewport ?? { width: 1280, height: 860 },
      colorScheme: opts.colorScheme ?? 'light',
      args: [
        '--no-sandbox',
        '--disable-gpu',
        '--disable-quic',
        '--no-first-run',
        '--disable-background-networking',
        '--disable-component-update',
        '--disable-sync',
      ],
    });
  } catch (e) {
    await running.stop();
    throw e;
  }
  context.setDefaultTimeout(15_000);
  const page = context.pages()[0] ?? (await context.newPage());
  if (opts.logConsole ?? true) {
    context.on('console', (m) => {
      // 401s are routine (the app asks who is signed in before anyone is); anything else is worth seeing.
      if (m.type() === 'error' && !m.text().includes('status of 401')) console.warn(`[browser] ${m.text()}`);
    });
    context.on('weberror', (e) => console.warn(`[browser] ${e.error().message}`));
  }

  const e2e: E2E = {
    baseUrl,
    dataDir,
    context,
    page,
    async goto(pathname, p = page) {
      await p.goto(baseUrl + pathname, { waitUntil: 'networkidle' });
    },
    async signIn(email, password = DEMO_PASSWORD, p = page) {
      await p.goto(`${baseUrl}/sign-in`, { waitUntil: 'networkidle' });
      await p.getByLabel('E-mail').fill(email);
      await p.getByLabel('Password', { exact: true }).fill(password);
      await p.getByRole('button', { name: 'Sign in' }).click();
      await p.locator('header.topbar').waitFor();
      await p.waitForLoadState('networkidle');
    },
    async signOut(p = page) {
      // Through the context's request client (it shares the cookies), so it works on any page, even about:blank.
      await p.context().request.post(`${baseUrl}/api/auth/sign-out`, { headers: { Origin: baseUrl } }).catch(() => undefined);
      await p.context().clearCookies();
    },
    async screenshot(name, p = page) {
      mkdirSync(SCREENSHOT_DIR, { recursive: true });
      const file = path.join(SCREENSHOT_DIR, `${name}.png`);
      // A sticky top bar over a scrolled page would be drawn mid-page in a full-page shot.
      await p.evaluate(() => window.scrollTo(0, 0));
      // Let naive-ui's fade-ins (form feedback, messages) finish so colours are the settled ones.
      await p.waitForTimeout(350);
      await p.screenshot({ path: file, fullPage: true });
      return file;
    },
    async close() {
      await context.close().catch(() => undefined);
      await running.stop().catch(() => undefined);
      rmSync(profileDir, { recursive: true, force: true });
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
  return e2e;
}
