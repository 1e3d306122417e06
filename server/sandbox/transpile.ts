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
