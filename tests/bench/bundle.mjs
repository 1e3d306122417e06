#!/usr/bin/env node
/**
 * Bundle budget: builds the client if dist/client is missing or older than the sources, then prints
 * the gzipped size of the JavaScript the first page loads (index.html's entry module and everything
 * it imports statically, plus modulepreloads) and of every lazy chunk. Fails when the first page's
 * JavaScript is over 350 kB gzipped, or when Monaco is not in a chunk of its own that the first page
 * does not load. Usage: npm run bench:bundle [-- --rebuild]
 */
import { execSync } from 'node:child_process';
import { existsSync, readFileSync, readdirSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { gzipSync } from 'node:zlib';

const root = join(import.meta.dirname, '..', '..');
const dist = process.env.BUNDLE_DIST ?? join(root, 'dist', 'client');
const BUDGET_KB = 350;

function newestMtime(dir) {
  let t = 0;
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    const s = statSync(p);
    t = Math.max(t, s.isDirectory() ? newestMtime(p) : s.mtimeMs);
  }
  return t;
}

const index = join(dist, 'index.html');
const manifestFile = join(dist, '.vite', 'manifest.json');
const stale =
  !existsSync(index) ||
  !existsSync(manifestFile) ||
  process.argv.includes('--rebuild') ||
  Math.max(newestMtime(join(root, 'src')), statSync(join(root, 'index.html')).mtimeMs) > statSync(index).mtimeMs;
if (stale) {
  console.log('building the client (vite build --manifest)…');
  execSync(`npx vite build --manifest --logLevel warn --outDir ${JSON.stringify(dist)} --emptyOutDir`, { cwd: root, stdio: 'inherit' });
}

/** Vite's manifest: one record per chunk with its static `imports` and `dynamicImports`. */
const manifest = JSON.parse(readFileSync(manifestFile, 'utf8'));
const assetsDir = join(dist, 'assets');
const files = readdirSync(assetsDir).filter((f) => f.endsWith('.js'));
const base = (p) => p.replace(/^assets\//, '');
const gz = (f) => gzipSync(readFileSync(join(assetsDir, f))).length;
const raw = (f) => statSync(join(assetsDir, f)).size;

const entryKeys = Object.keys(manifest).filter((k) => manifest[k].isEntry);
if (!entryKeys.length) {
  console.error('no entry in the Vite manifest');
  process.exit(1);
}
const first = new Set();
const stack = [...entryKeys];
const seen = new Set();
while (stack.length) {
  const k = stack.pop();
  if (seen.has(k) || !manifest[k]) continue;
  seen.add(k);
  if (manifest[k].file.endsWith('.js')) first.add(base(manifest[k].file));
  stack.push(...(manifest[k].imports ?? []));
}

const kb = (n) => (n / 1024).toFixed(1).padStart(8);
const firstGz = [...first].reduce((s, f) => s + gz(f), 0);
console.log('\nfirst page (entry + static imports):');
for (const f of [...first].sort()) console.log(`  ${kb(gz(f))} kB gz  ${kb(raw(f))} kB raw  ${f}`);
console.log(`  ${kb(firstGz)} kB gz  total (budget ${BUDGET_KB} kB)`);

const lazy = files.filter((f) => !first.has(f)).sort((a, b) => gz(b) - gz(a));
console.log('\nlazy chunks and workers:');
for (const f of lazy) console.log(`  ${kb(gz(f))} kB gz  ${kb(raw(f))} kB raw  ${f}`);

// Monaco: the chunk of src/components/editor/monaco.ts must be a dynamic entry, off the first page,
// and no first-page chunk may carry Monaco's own code (marker strings of its source tree).
const monacoKey = Object.keys(manifest).find((k) => k.endsWith('src/components/editor/monaco.ts'));
const monacoRec = monacoKey ? manifest[monacoKey] : null;
const monacoFile = monacoRec ? base(monacoRec.file) : null;
const markers = ['vs/editor/', 'editor.action.triggerSuggest', 'StandaloneCodeEditor'];
const leaking = [...first].filter((f) => {
  const src = readFileSync(join(assetsDir, f), 'utf8');
  return markers.some((m) => src.includes(m));
});
const workers = files.filter((f) => /worker/i.test(f));
console.log(`\nmonaco chunk: ${monacoFile ?? 'not found'}${monacoFile ? ` (${(gz(monacoFile) / 1024).toFixed(1)} kB gz, lazy: ${monacoRec.isDynamicEntry ? 'yes' : 'no'})` : ''}`);
console.log(`worker files: ${workers.join(', ') || 'none'}`);

let failed = false;
if (firstGz > BUDGET_KB * 1024) {
  console.error(`FAIL: first page JavaScript is ${(firstGz / 1024).toFixed(1)} kB gzipped, over ${BUDGET_KB} kB`);
  failed = true;
}
if (!monacoRec || !monacoRec.isDynamicEntry) {
  console.error('FAIL: Monaco (src/components/editor/monaco.ts) is not a lazy chunk of its own');
  failed = true;
}
if (monacoFile && first.has(monacoFile)) {
  console.error('FAIL: the first page loads the Monaco chunk');
  failed = true;
}
if (leaking.length) {
  console.error(`FAIL: Monaco code is in first-page chunks: ${leaking.join(', ')}`);
  failed = true;
}
console.log(failed ? '\nbundle budget: FAILED' : `\nbundle budget: ok (${relative(root, dist) || dist})`);
process.exit(failed ? 1 : 0);
