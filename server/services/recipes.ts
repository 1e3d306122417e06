/**
 * Recipes: saved scripts with declared inputs and an immutable history of versions. The param()
 * declarations are read from the source on every save and stored with the version; every write is one
 * transaction with its audit entry.
 */
import type { Knex } from 'knex';
import { audit } from './audit';
import { AppError, notFound } from '../http/errors';
import { InputProblem, ParamProblem, checkInputs, extractParamDeclarations } from './recipe-params';
import type {
  ParamDeclaration,
  RecipeDetail,
  RecipeLanguage,
  RecipeSummary,
  RecipeVersionDetail,
  RecipeVersionSummary,
} from '../../shared/schemas/recipes';
import { groupIdOf } from '../db/groupOf';
import { latestVersionsOf } from '../db/latestVersion';

interface RecipeRow {
  id: number;
  group_id: number;
  name: string;
  latest_version: number;
  created_at: string;
  created_by: number | null;
  updated_at: string;
  updated_by: number | null;
}

interface VersionRow {
  id: number;
  recipe_id: number;
  version: number;
  source: string;
  language: RecipeLanguage;
  description: string;
  params_json: string;
  message: string | null;
  restored_from: number | null;
  copied_from_recipe_id: number | null;
  copied_from_version: number | null;
  created_at: string;
  created_by: number | null;
}

/** What `recipe('name', inputs)` in a run needs: the latest version's source and its declared inputs. */
export interface ResolvedRecipe {
  id: number;
  version: number;
  source: string;
  language: RecipeLanguage;
  params: ParamDeclaration[];
}

const now = (): string => new Date().toISOString();

/** Declarations of a source, or the API's 400 naming the line and column of the bad declaration. */
export function declarationsOf(source: string, language: RecipeLanguage): ParamDeclaration[] {
  try {
    return extractParamDeclarations(source, language);
  } catch (e) {
    if (e instanceof ParamProblem) throw new AppError(400, e.code, e.message, { field: 'source', line: e.line, column: e.column });
    throw e;
  }
}

export const recipeGroupId = (db: Knex, id: number): Promise<number | undefined> => groupIdOf(db, 'recipes', id);

export async function listRecipes(db: Knex, groupId: number): Promise<RecipeSummary[]> {
  const rows = (await latestVersionsOf(db, 'recipes', groupId)
    .leftJoin('users as u', 'u.id', 'r.updated_by')
    .orderBy('r.name', 'asc')
    .select('r.id', 'r.name', 'r.latest_version', 'r.updated_at', 'v.description', 'v.language', 'v.params_json', 'u.name as updated_by_name')) as {
    id: number;
    name: string;
    latest_version: number;
    updated_at: string;
    description: string;
    language: RecipeLanguage;
    params_json: string;
    updated_by_name: string | null;
  }[];
  return rows.map((r) => ({
    id: r.id,
    name: r.name,
    description: r.description,
    language: r.language,
    version: r.latest_version,
    params: JSON.parse(r.params_json) as ParamDeclaration[],
    updatedAt: r.updated_at,
    updatedByName: r.updated_by_name,
  }));
}

function nameTaken(name: string): AppError {
  return new AppError(409, 'name_taken', `This group already has a recipe named "${name}"; choose another name.`, { field: 'name' });
}

async function insertRecipe(
  trx: Knex.Transaction,
  input: { groupId: number; userId: number; name: string },
): Promise<number> {
  const clash = await trx('recipes').where({ group_id: input.groupId, name: input.name }).first('id');
  if (clash) throw nameTaken(input.name);
  const at = now();
  const [row] = await trx('recipes')
    .insert({ group_id: input.groupId, name: input.name, latest_version: 1, created_at: at, created_by: input.userId, updated_at: at, updated_by: input.userId })
    .returning('id');
  return typeof row === 'object' ? (row as { id: number }).id : (row as number);
}

export async function createRecipe(
  db: Knex,
  input: { groupId: number; userId: number; name: string; description: string; source: string; language: RecipeLanguage },
): Promise<RecipeDetail> {
  const params = declarationsOf(input.source, input.language);
  const id = await db.transaction(async (trx) => {
    const id = await insertRecipe(trx, input);
    await trx('recipe_versions').insert({
      recipe_id: id,
      version: 1,
      source: input.source,
      language: input.language,
      description: input.description,
      params_json: JSON.stringify(params),
      message: null,
      created_at: now(),
      created_by: input.userId,
    });
    await audit(trx, { userId: input.userId, action: 'recipe.create', target: `recipe:${id}`, details: { groupId: input.groupId, name: input.name, params: params.map((p) => p.name) } });
    return id;
  });
  return getRecipe(db, id);
}

async function loadVersion(db: Knex, id: number, version?: number): Promise<{ r: RecipeRow; v: VersionRow }> {
  const r = await db<RecipeRow>('recipes').where({ id }).first();
  if (!r) throw notFound('Recipe');
  const n = version ?? r.latest_version;
  const v = await db<VersionRow>('recipe_versions').where({ recipe_id: id, version: n }).first();
  if (!v) throw new AppError(404, 'not_found', `Recipe "${r.name}" has no version ${n} (latest is ${r.latest_version}).`, { field: 'version' });
  return { r, v };
}

export async function getRecipe(db: Knex, id: number, version?: number): Promise<RecipeDetail> {
  const { r, v } = await loadVersion(db, id, version);
  const by = v.created_by ? ((await db('users').where({ id: v.created_by }).first('name')) as { name: string } | undefined) : undefined;
  return {
    id: r.id,
    groupId: r.group_id,
    name: r.name,
    description: v.description,
    language: v.language,
    version: v.version,
    latestVersion: r.latest_version,
    source: v.source,
    params: JSON.parse(v.params_json) as ParamDeclaration[],
    updatedAt: version === undefined ? r.updated_at : v.created_at,
    updatedByName: by?.name ?? null,
  };
}

function versionSummary(v: VersionRow & { created_by_name: string | null }): RecipeVersionSummary {
  return {
    version: v.version,
    description: v.description,
    message: v.message,
    params: JSON.parse(v.params_json) as ParamDeclaration[],
    createdAt: v.created_at,
    createdByName: v.created_by_name,
    restoredFrom: v.restored_from,
    copiedFrom: v.copied_from_recipe_id !== null && v.copied_from_version !== null ? { recipeId: v.copied_from_recipe_id, version: v.copied_from_version } : null,
  };
}

export async function listVersions(db: Knex, id: number): Promise<RecipeVersionSummary[]> {
  const r = await db<RecipeRow>('recipes').where({ id }).first('id');
  if (!r) throw notFound('Recipe');
  const rows = (await db('recipe_versions as v')
    .leftJoin('users as u', 'u.id', 'v.created_by')
    .where('v.recipe_id', id)
    .orderBy('v.version', 'desc')
    .select('v.*', 'u.name as created_by_name')) as (VersionRow & { created_by_name: string | null })[];
  return rows.map(versionSummary);
}

export async function getVersion(db: Knex, id: number, n: number): Promise<RecipeVersionDetail> {
  const { v } = await loadVersion(db, id, n);
  const by = v.created_by ? ((await db('users').where({ id: v.created_by }).first('name')) as { name: string } | undefined) : undefined;
  return { ...versionSummary({ ...v, created_by_name: by?.name ?? null }), source: v.source, language: v.language };
}

/**
 * Append a version. `baseVersion` is the version the edit started from: when someone else saved since,
 * the save is refused (409 stale_version) rather than silently overwriting their work.
 */
async function appendVersion(
  db: Knex,
  input: {
    id: number;
    userId: number;
    source: string;
    language?: RecipeLanguage;
    description?: string;
    message?: string;
    baseVersion?: number;
    restoredFrom?: number;
    auditAction: string;
  },
): Promise<RecipeDetail> {
  await db.transaction(async (trx) => {
    const r = await trx<RecipeRow>('recipes').where({ id: input.id }).first();
    if (!r) throw notFound('Recipe');
    if (input.baseVersion !== undefined && input.baseVersion !== r.latest_version) {
      throw new AppError(
        409,
        'stale_version',
        `This recipe was saved by someone else since version ${input.baseVersion}; the current version is ${r.latest_version}. Reload it, or keep your text and save again on top of version ${r.latest_version}.`,
        { field: 'baseVersion', currentVersion: r.latest_version },
      );
    }
    const prev = (await trx<VersionRow>('recipe_versions').where({ recipe_id: r.id, version: r.latest_version }).first())!;
    const language = input.language ?? prev.language;
    const params = declarationsOf(input.source, language);
    const version = r.latest_version + 1;
    const at = now();
    await trx('recipe_versions').insert({
      recipe_id: r.id,
      version,
      source: input.source,
      language,
      description: input.description ?? prev.description,
      params_json: JSON.stringify(params),
      message: input.message ?? null,
      restored_from: input.restoredFrom ?? null,
      created_at: at,
      created_by: input.userId,
    });
    await trx('recipes').where({ id: r.id }).update({ latest_version: version, updated_at: at, updated_by: input.userId });
    await audit(trx, {
      userId: input.userId,
      action: input.auditAction,
      target: `recipe:${r.id}`,
      details: { groupId: r.group_id, version, ...(input.restoredFrom ? { restoredFrom: input.restoredFrom } : {}) },
    });
  });
  return getRecipe(db, input.id);
}

export function saveRecipe(
  db: Knex,
  input: { id: number; userId: number; source: string; language?: RecipeLanguage; description?: string; baseVersion: number; message?: string },
): Promise<RecipeDetail> {
  return appendVersion(db, { ...input, auditAction: 'recipe.version' });
}

/** Restoring never rewrites history: the old version's text becomes the newest version. */
export async function restoreRecipe(db: Knex, input: { id: number; userId: number; version: number; message?: string }): Promise<RecipeDetail> {
  const { v } = await loadVersion(db, input.id, input.version);
  return appendVersion(db, {
    id: input.id,
    userId: input.userId,
    source: v.source,
    language: v.language,
    description: v.description,
    message: input.message ?? `Restored version ${input.version}`,
    restoredFrom: input.version,
    auditAction: 'recipe.restore',
  });
}

/** The version to run and the full checked inputs (defaults filled in), or a 400 naming the input. */
export async function prepareRun(
  db: Knex,
  id: number,
  inputs: Record<string, number>,
  version?: number,
): Promise<{ groupId: number; version: number; source: string; language: RecipeLanguage; params: Record<string, number> }> {
  const { r, v } = await loadVersion(db, id, version);
  const decls = JSON.parse(v.params_json) as ParamDeclaration[];
  let params: Record<string, number>;
  try {
    params = checkInputs(decls, inputs);
  } catch (e) {
    if (e instanceof InputProblem) throw new AppError(400, 'invalid_input', e.message, { field: e.field });
    throw e;
  }
  return { groupId: r.group_id, version: v.version, source: v.source, language: v.language, params };
}

export async function copyRecipe(
  db: Knex,
  input: { id: number; userId: number; targetGroupId: number; name?: string; version?: number },
): Promise<RecipeDetail> {
  const { r, v } = await loadVersion(db, input.id, input.version);
  const name = input.name ?? r.name;
  const newId = await db.transaction(async (trx) => {
    const id = await insertRecipe(trx, { groupId: input.targetGroupId, userId: input.userId, name });
    await trx('recipe_versions').insert({
      recipe_id: id,
      version: 1,
      source: v.source,
      language: v.language,
      description: v.description,
      params_json: v.params_json,
      message: `Copied from version ${v.version} of "${r.name}"`,
      copied_from_recipe_id: r.id,
      copied_from_version: v.version,
      created_at: now(),
      created_by: input.userId,
    });
    await audit(trx, {
      userId: input.userId,
      action: 'recipe.copy',
      target: `recipe:${id}`,
      details: { fromRecipeId: r.id, fromVersion: v.version, fromGroupId: r.group_id, groupId: input.targetGroupId, name },
    });
    return id;
  });
  return getRecipe(db, newId);
}

/**
 * The latest versions of the named recipes of a group, for a run's `recipe('name', inputs)` calls.
 * Unknown names are left out; the sandbox stops the run at that call with its line.
 */
export async function resolveRecipes(db: Knex, groupId: number, names: readonly string[]): Promise<Record<string, ResolvedRecipe>> {
  const wanted = [...new Set(names)];
  const out: Record<string, ResolvedRecipe> = {};
  if (wanted.length === 0) return out;
  const rows = (await latestVersionsOf(db, 'recipes', groupId)
    .whereIn('r.name', wanted)
    .select('r.id', 'r.name', 'v.version', 'v.source', 'v.language', 'v.params_json')) as {
    id: number;
    name: string;
    version: number;
    source: string;
    language: RecipeLanguage;
    params_json: string;
  }[];
  for (const r of rows) out[r.name] = { id: r.id, version: r.version, source: r.source, language: r.language, params: JSON.parse(r.params_json) as ParamDeclaration[] };
  return out;
}
