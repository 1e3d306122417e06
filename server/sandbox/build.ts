import { build } from 'esbuild';
import { createHash } from 'node:crypto';
import { existsSync, mkdirSync, readdirSync, renameSync, statSync, unlinkSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { UNIVERSE_METHODS } from './protocol';

const here = dirname(fileURLToPath(import.meta.url));
const repoRoot = resolve(here, '../..');
/** Inside node_modules so the bundle's bare imports (quickjs-emscripten, mathjs) resolve from the repo. */
const cacheDir = join(repoRoot, 'node_modules', '.cache', 'comoving');

let building: Promise<string> | undefined;

/**
 * Bundle the worker (and the kernel it hosts) into one .mjs that plain Node can load in a worker thread,
 * whether the server runs under tsx or vitest. The prelude (the script API inside QuickJS) is bundled
 * first and inlined as a string. Content-addressed, so concurrent processes share one file safely.
 */
export function workerFile(): Promise<string> {
  building ??= buildWorker().catch((e: unknown) => {
    building = undefined;
    throw e;
  });
  return building;
}

async function buildWorker(): Promise<string> {
  const prelude = await build({
    entryPoints: [join(here, 'prelude.ts')],
    bundle: true,
    format: 'iife',
    platform: 'neutral',
    target: 'es2020',
    // QuickJS parses the prelude once per worker and again in every nested recipe context: dropping
    // whitespace and comments shortens that. Names stay, so stack frames stay readable.
    minifyWhitespace: true,
    minifySyntax: true,
    define: { __COMOVING_METHODS__: JSON.stringify(JSON.stringify(UNIVERSE_METHODS)) },
    write: false,
    logLevel: 'silent',
  });
  const preludeCode = prelude.outputFiles[0].text;
  const worker = await build({
    entryPoints: [join(here, 'worker.ts')],
    bundle: true,
    format: 'esm',
    platform: 'node',
    target: 'node20',
    packages: 'external',
    write: false,
    logLevel: 'silent',
    define: { __COMOVING_PRELUDE__: JSON.stringify(preludeCode) },
  });
  const code = worker.outputFiles[0].text;
  const hash = createHash('sha256').update(code).digest('hex').slice(0, 16);
  mkdirSync(cacheDir, { recursive: true });
  const file = join(cacheDir, `sandbox-worker-${hash}.mjs`);
  if (!existsSync(file)) {
    const tmp = `${file}.${process.pid}.${Date.now()}.tmp`;
    writeFileSync(tmp, code);
    renameSync(tmp, file);
    pruneOld(file);
  }
  return file;
}

/** Bundles of earlier code versions, untouched for a day, are no longer loaded by any process. */
function pruneOld(keep: string): void {
  const dayAgo = Date.now() - 24 * 3600 * 1000;
  for (const name of readdirSync(cacheDir)) {
    const path = join(cacheDir, name);
    if (path === keep || !name.startsWith('sandbox-worker-')) continue;
    try {
      if (statSync(path).mtimeMs < dayAgo) unlinkSync(path);
    } catch {
      // Another process pruned it first.
    }
  }
}
