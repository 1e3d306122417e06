/**
 * Runs: one execution of a script in the sandbox, stored with everything that produced it (source and
 * its SHA-256, notebook or recipe version, parameters, seed, limits in force, kernel version), so the
 * same inputs can be run again and give the same outputs.
 */
import { createHash, randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import type { AppDeps } from '../deps';
import { AppError, badRequest } from '../http/errors';
import { nowIso } from '../db/time';
import { createSandbox } from '../sandbox/index';
import type { DatasetTable, RecipeSource, RunJob, RunResult, Sandbox } from '../sandbox/types';
import { getLimits } from './limits';
import { resolveDatasets } from './datasets';
import { resolveRecipes } from './recipes';
import { describeLimit, type SandboxLimits } from '../../shared/schemas/limits';
import type { OutputItem, ParamDeclaration } from '../../shared/schemas/outputs';
import type { ListRunsQuery, Run, RunError, RunListResponse, RunStatus, RunSummary, ScriptLanguage } from '../../shared/schemas/runs';
import { KERNEL_VERSION } from '../kernel/index';
import { groupIdOf } from '../db/groupOf';

export interface ExecuteRunInput {
  userId: number;
  groupId?: number | null;
  source: string;
  language?: ScriptLanguage;
  params?: Record<string, number>;
  seed?: number;
  notebookId?: number | null;
  notebookVersion?: number | null;
  blockId?: string | null;
  recipeId?: number | null;
  recipeVersion?: number | null;
  /** Aborting it cancels the run (as POST /api/runs/:id/cancel does). */
  signal?: AbortSignal;
}

interface RunRow {
  id: number;
  user_id: number | null;
  group_id: number | null;
  status: RunStatus;
  language: ScriptLanguage;
  source: string;
  source_hash: string;
  notebook_id: number | null;
  notebook_version: number | null;
  block_id: string | null;
  recipe_id: number | null;
  recipe_version: number | null;
  params: string;
  seed: number;
  limits: string;
  kernel_version: string;
  outputs: string;
  logs: string;
  declared_params: string;
  error: string | null;
  error_limit: string | null;
  kernel_calls: number;
  duration_ms: number | null;
  cpu_ms: number | null;
  created_at: string;
  finished_at: string | null;
}

/** Runs in flight in this process, per database (so separate test apps never see each other's). */
interface Active {
  byUser: Map<number, number>;
  byRun: Map<number, { controller: AbortController; done: Promise<unknown>; userId: number }>;
}
const activeByDb = new WeakMap<Knex, Active>();
function active(db: Knex): Active {
  let a = activeByDb.get(db);
  if (!a) {
    a = { byUser: new Map(), byRun: new Map() };
    activeByDb.set(db, a);
  }
  return a;
}

/** The app's sandbox, created on first use when the deps came without one. */
export function sandboxOf(deps: AppDeps): Sandbox {
  deps.sandbox ??= createSandbox();
  return deps.sandbox;
}

export function sha256(text: string): string {
  return createHash('sha256').update(text, 'utf8').digest('hex');
}

/** Names given as string literals to dataset('…') and recipe('…') in a source. */
export function namesIn(source: string): { datasets: string[]; recipes: string[] } {
  const find = (fn: string) => {
    const re = new RegExp(`\\b${fn}\\s*\\(\\s*(['"\`])([^'"\`\\n]{1,120})\\1`, 'g');
    return [...new Set([...source.matchAll(re)].map((m) => m[2]))];
  };
  return { datasets: find('dataset'), recipes: find('recipe') };
}

/**
 * The datasets and recipes a source names, read from the group (recipes' own dataset and recipe calls
 * included, a few levels deep). Unknown names are a 400 before anything runs. Without a group there is
 * nothing to resolve; the script then meets a clear error at the call.
 */
export async function resolveScriptInputs(
  db: Knex,
  groupId: number | null | undefined,
  source: string,
): Promise<{ datasets: Record<string, DatasetTable>; recipes: Record<string, RecipeSource> }> {
  const datasets: Record<string, DatasetTable> = {};
  const recipes: Record<string, RecipeSource> = {};
  if (groupId == null) return { datasets, recipes };
  let pending = [source];
  for (let depth = 0; depth < 4 && pending.length > 0; depth++) {
    const wantD = new Set<string>();
    const wantR = new Set<string>();
    for (const s of pending) {
      const n = namesIn(s);
      n.datasets.filter((d) => !(d in datasets)).forEach((d) => wantD.add(d));
      n.recipes.filter((r) => !(r in recipes)).forEach((r) => wantR.add(r));
    }
    Object.assign(datasets, await resolveDatasets(db, groupId, [...wantD]));
    const found = await resolveRecipes(db, groupId, [...wantR]);
    pending = [];
    for (const [name, r] of Object.entries(found)) {
      recipes[name] = { source: r.source, language: r.language };
      pending.push(r.source);
    }
  }
  return { datasets, recipes };
}

function randomSeed(): number {
  return randomBytes(4).readUInt32LE(0);
}

function toRun(r: RunRow): Run {
  return {
    id: r.id,
    userId: r.user_id ?? 0,
    groupId: r.group_id,
    status: r.status,
    language: r.language,
    source: r.source,
    sourceHash: r.source_hash,
    params: JSON.parse(r.params) as Record<string, number>,
    seed: r.seed,
    limits: JSON.parse(r.limits) as SandboxLimits,
    kernelVersion: r.kernel_version,
    notebookId: r.notebook_id,
    notebookVersion: r.notebook_version,
    blockId: r.block_id,
    recipeId: r.recipe_id,
    recipeVersion: r.recipe_version,
    outputs: JSON.parse(r.outputs) as OutputItem[],
    logs: JSON.parse(r.logs) as string[],
    error: r.error ? (JSON.parse(r.error) as RunError) : null,
    declaredParams: JSON.parse(r.declared_params) as ParamDeclaration[],
    kernelCalls: r.kernel_calls,
    durationMs: r.duration_ms ?? 0,
    cpuMs: r.cpu_ms ?? 0,
    createdAt: r.created_at,
    finishedAt: r.finished_at,
  };
}

function toSummary(r: RunRow): RunSummary {
  const { source: _s, outputs: _o, logs: _l, ...rest } = toRun(r);
  return rest;
}

/** Run a script now and store the run; resolves when the run has finished (any status). */
export async function executeRun(deps: AppDeps, input: ExecuteRunInput): Promise<Run> {
  const { db } = deps;
  const groupId = input.groupId ?? null;
  const language = input.language ?? 'ts';
  const limits = await getLimits(db, groupId);
  const act = active(db);
  const going = act.byUser.get(input.userId) ?? 0;
  if (going >= limits.concurrentRuns) {
    throw new AppError(
      429,
      'limit',
      `You already have ${going} run${going === 1 ? '' : 's'} going: the ${describeLimit('concurrentRuns', limits.concurrentRuns)} allows no more until one finishes.`,
      { limit: 'concurrentRuns' },
    );
  }
  const { datasets, recipes } = await resolveScriptInputs(db, groupId, input.source);
  const seed = input.seed ?? randomSeed();
  const params = input.params ?? {};
  const job: RunJob = { source: input.source, language, params, seed, limits, datasets, recipes };

  act.byUser.set(input.userId, going + 1);
  const controller = new AbortController();
  const onOuterAbort = () => controller.abort();
  input.signal?.addEventListener('abort', onOuterAbort, { once: true });
  if (input.signal?.aborted) controller.abort();
  let runId: number | undefined;
  let finish: () => void = () => undefined;
  const done = new Promise<void>((resolve) => (finish = resolve));
  try {
    const [row] = (await db('runs')
      .insert({
        user_id: input.userId,
        group_id: groupId,
        status: 'running',
        language,
        source: input.source,
        source_hash: sha256(input.source),
        notebook_id: input.notebookId ?? null,
        notebook_version: input.notebookVersion ?? null,
        block_id: input.blockId ?? null,
        recipe_id: input.recipeId ?? null,
        recipe_version: input.recipeVersion ?? null,
        params: JSON.stringify(params),
        seed,
        limits: JSON.stringify(limits),
        kernel_version: KERNEL_VERSION,
        created_at: nowIso(),
      })
      .returning('id')) as { id: number }[];
    runId = row.id;
    act.byRun.set(runId, { controller, done, userId: input.userId });

    let result: RunResult;
    try {
      result = await sandboxOf(deps).run(job, controller.signal);
    } catch (e) {
      result = {
        status: 'error', outputs: [], logs: [], durationMs: 0, cpuMs: 0, kernelCalls: 0, declaredParams: [],
        error: { message: `Sandbox error: ${e instanceof Error ? e.message : String(e)}` },
      };
    }
    await db('runs')
      .where({ id: runId })
      .update({
        status: result.status,
        outputs: JSON.stringify(result.outputs),
        logs: JSON.stringify(result.logs),
        declared_params: JSON.stringify(result.declaredParams),
        error: result.error ? JSON.stringify(result.error) : null,
        error_limit: result.error?.limit ?? null,
        kernel_calls: result.kernelCalls,
        duration_ms: result.durationMs,
        cpu_ms: result.cpuMs,
        finished_at: nowIso(),
      });
    return (await getRun(db, runId))!;
  } finally {
    input.signal?.removeEventListener('abort', onOuterAbort);
    if (runId !== undefined) act.byRun.delete(runId);
    const n = (act.byUser.get(input.userId) ?? 1) - 1;
    if (n <= 0) act.byUser.delete(input.userId);
    else act.byUser.set(input.userId, n);
    finish();
  }
}

export async function getRun(db: Knex, id: number): Promise<Run | undefined> {
  const row = (await db('runs').where({ id }).first()) as RunRow | undefined;
  return row ? toRun(row) : undefined;
}

/** Group and author of a run, for authorization; undefined when there is no such run. */
export async function runOwnership(db: Knex, id: number): Promise<{ groupId: number | null; userId: number | null } | undefined> {
  const row = (await db('runs').where({ id }).first('group_id', 'user_id')) as { group_id: number | null; user_id: number | null } | undefined;
  return row ? { groupId: row.group_id, userId: row.user_id } : undefined;
}

/**
 * Ask a running run to stop and wait (briefly) until it has; answers the stored run. A run that is not
 * running in this process but still says so (the server restarted under it) is marked cancelled.
 */
export async function cancelRun(db: Knex, id: number): Promise<Run | undefined> {
  const a = active(db).byRun.get(id);
  if (a) {
    a.controller.abort();
    await Promise.race([a.done, new Promise((r) => setTimeout(r, 5_000))]);
  } else {
    await db('runs')
      .where({ id, status: 'running' })
      .update({ status: 'cancelled', error: JSON.stringify({ message: 'Cancelled' }), finished_at: nowIso() });
  }
  return getRun(db, id);
}

/**
 * Runs still marked running when the server starts were cut off by the previous process stopping;
 * they are marked as errors so nobody waits on them. Returns how many.
 */
export async function recoverInterruptedRuns(db: Knex): Promise<number> {
  return db('runs')
    .where({ status: 'running' })
    .update({
      status: 'error',
      error: JSON.stringify({ message: 'The server stopped while this run was going; run it again.' }),
      finished_at: nowIso(),
    });
}

/** A page of runs, newest first: of a group (with optional notebook/block/recipe filters) or of one author. */
export async function listRuns(
  db: Knex,
  query: ListRunsQuery,
  scope: { groupId: number } | { userId: number },
): Promise<RunListResponse> {
  const base = () => {
    const q = db('runs');
    if ('groupId' in scope) q.where('group_id', scope.groupId);
    else q.where('user_id', scope.userId);
    if (query.notebookId !== undefined) q.where('notebook_id', query.notebookId);
    if (query.blockId !== undefined) q.where('block_id', query.blockId);
    if (query.recipeId !== undefined) q.where('recipe_id', query.recipeId);
    return q;
  };
  const [{ n }] = (await base().count({ n: '*' })) as { n: number }[];
  const rows = (await base()
    .orderBy('id', 'desc')
    .limit(query.pageSize)
    .offset((query.page - 1) * query.pageSize)
    .select('*')) as RunRow[];
  return { runs: rows.map(toSummary), page: query.page, pageSize: query.pageSize, total: Number(n) };
}

/** Group of a notebook, for the runs list filter; undefined when there is no such notebook. */
export const notebookGroupId = (db: Knex, notebookId: number): Promise<number | undefined> => groupIdOf(db, 'notebooks', notebookId);

/** A notebook given with a run must belong to the run's group. */
export async function checkNotebookInGroup(db: Knex, notebookId: number, groupId: number | null): Promise<void> {
  const g = await notebookGroupId(db, notebookId);
  if (g === undefined) throw badRequest(`There is no notebook ${notebookId}.`, 'notebookId');
  if (g !== groupId) throw badRequest(`Notebook ${notebookId} belongs to another group than the run.`, 'notebookId');
}
