import { existsSync, readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { createRecipe } from '../../services/recipes';
import { DEMO_GROUP_NAME } from './demoAccounts';
import type { SeedStep } from './index';

export const EXAMPLE_RECIPES_DIR = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../../../examples/recipes');

/**
 * A recipe file's description is its leading comment (a block comment or consecutive // lines), so the
 * example files stay plain scripts that also read well on their own.
 */
export function leadingComment(source: string): string {
  const s = source.replace(/^\uFEFF/, '').trimStart();
  const block = /^\/\*+([\s\S]*?)\*\//.exec(s);
  if (block) {
    return block[1]
      .split('\n')
      .map((l) => l.replace(/^\s*\*\s?/, '').trim())
      .filter((l) => l !== '')
      .join(' ');
  }
  const lines: string[] = [];
  for (const l of s.split('\n')) {
    const m = /^\s*\/\/\s?(.*)$/.exec(l);
    if (!m) break;
    lines.push(m[1].trim());
  }
  return lines.filter((l) => l !== '').join(' ');
}

/** The example recipes: examples/recipes/<name>.ts|js, named after the file. */
export function exampleRecipes(): { name: string; language: 'ts' | 'js'; source: string; description: string }[] {
  if (!existsSync(EXAMPLE_RECIPES_DIR)) return [];
  return readdirSync(EXAMPLE_RECIPES_DIR)
    .filter((f) => /^[a-z0-9][a-z0-9-]*\.(ts|js)$/.test(f) && !f.endsWith('.d.ts'))
    .sort()
    .map((f) => {
      const source = readFileSync(path.join(EXAMPLE_RECIPES_DIR, f), 'utf8');
      return { name: f.replace(/\.(ts|js)$/, ''), language: f.endsWith('.js') ? ('js' as const) : ('ts' as const), source, description: leadingComment(source).slice(0, 2000) };
    });
}

/** Seeds the example recipes into the demo group; a recipe whose declarations do not parse stops the seed, naming the file. */
export const demoRecipes: SeedStep = {
  name: 'demo recipes',
  async run(db, ctx) {
    const groupId = ctx.groups[DEMO_GROUP_NAME];
    const userId = ctx.users['bo@lindqvist-lab.example'];
    for (const r of exampleRecipes()) {
      try {
        await createRecipe(db, { groupId, userId, name: r.name, description: r.description, source: r.source, language: r.language });
      } catch (e) {
        throw new Error(`seed: examples/recipes/${r.name}.${r.language} was refused: ${(e as Error).message}`);
      }
    }
  },
};
