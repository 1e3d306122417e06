import { createHash } from 'node:crypto';
import { transform, type Message } from 'esbuild';
import type { CompiledScript, RunResultError } from './types';

export type CompileOutcome = { ok: true; script: CompiledScript } | { ok: false; error: RunResultError };

/**
 * TypeScript → JavaScript with esbuild's transform (types stripped, nothing else changed in meaning),
 * keeping a source map so runtime errors point at the user's own lines. JavaScript is passed through
 * untouched: QuickJS reports its syntax errors with the exact line and column itself.
 */
export async function compileScript(source: string, language: 'ts' | 'js'): Promise<CompileOutcome> {
  if (language === 'js') return { ok: true, script: { code: source } };
  // A sweep (and a notebook run again and again) sends the same source many times; esbuild's transform
  // costs a few ms each time and the outcome depends on nothing but the source.
  const key = createHash('sha256').update(language).update('\0').update(source).digest('base64');
  const hit = cache.get(key);
  if (hit) {
    cache.delete(key);
    cache.set(key, hit);
    return hit;
  }
  const outcome = await transpile(source);
  cache.set(key, outcome);
  if (cache.size > CACHE_ENTRIES) cache.delete(cache.keys().next().value as string);
  return outcome;
}

/** Compiled scripts by SHA-256 of language and source, least recently used first (Map order). */
const cache = new Map<string, CompileOutcome>();
const CACHE_ENTRIES = 256;

async function transpile(source: string): Promise<CompileOutcome> {
  try {
    const out = await transform(source, {
      loader: 'ts',
      sourcemap: 'external',
      sourcefile: 'script.ts',
      target: 'es2022',
      // Scripts are not modules: keep top-level names exactly as written.
      format: undefined,
      logLevel: 'silent',
    });
    return { ok: true, script: { code: out.code, map: out.map } };
  } catch (e) {
    const first: Message | undefined = (e as { errors?: Message[] }).errors?.[0];
    if (first) {
      const err: RunResultError = { message: `SyntaxError: ${first.text}` };
      if (first.location) {
        err.line = first.location.line;
        err.column = first.location.column + 1;
      }
      return { ok: false, error: err };
    }
    return { ok: false, error: { message: `SyntaxError: ${e instanceof Error ? e.message : String(e)}` } };
  }
}
