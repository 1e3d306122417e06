import type { Knex } from 'knex';
import { randomInt } from 'node:crypto';
import type { CreateSweep, SweepResults, SweepSummary } from '../../../shared/schemas/sweeps';
import { AppError, notFound } from '../../http/errors';
import { audit } from '../audit';
import { getLimits } from '../limits';
import { declarationsOf, getRecipe } from '../recipes';
import type { ParamDeclaration } from '../../../shared/schemas/recipes';
import { checkInputs, InputProblem } from '../recipe-params';
import { KERNEL_VERSION } from '../../kernel/index';
import { resolveScriptInputs } from '../runs';
import { buildGrid, GridError, type SweepGrid } from './grid';
import { buildResults } from './results';
import { getSweepRow, readPoints, summarize, type SweepRow } from './store';
import type { SweepQueue } from './queue';
import { groupIdOf } from '../../db/groupOf';

export const sweepGroupId = (db: Knex, id: number): Promise<number | undefined> => groupIdOf(db, 'sweeps', id);

/**
 * Checks a sweep request completely before anything is stored: the recipe's declared inputs and
 * ranges, the grid, and the sweep-points limit; then stores it and hands it to the queue.
 */
export async function createSweep(db: Knex, queue: SweepQueue, userId: number, body: CreateSweep): Promise<SweepSummary> {
  let grid;
  try {
    grid = buildGrid(body.inputs);
  } catch (err) {
    if (err instanceof GridError) throw new AppError(400, 'invalid_input', `${err.field}: ${err.message}`, { field: err.field });
    throw err;
  }
  let source = body.source ?? '';
  let language = body.language;
  let recipeVersion: number | null = null;
  let title = body.title?.trim() || '';
  let params: ParamDeclaration[];
  if (body.recipeId !== undefined) {
    const recipe = await getRecipe(db, body.recipeId).catch(() => undefined);
    if (!recipe || recipe.groupId !== body.groupId) throw new AppError(404, 'not_found', `Recipe ${body.recipeId} not found in this group.`, { field: 'recipeId' });
    source = recipe.source;
    language = recipe.language;
    recipeVersion = recipe.version;
    params = recipe.params;
    title ||= `${recipe.name} over ${grid.names.join(' × ')}`;
  } else {
    // A script's inputs are its param() declarations, read the same way a recipe's are.
    params = declarationsOf(source, language);
  }
  checkGridAgainst(params, grid, body.fixed);
  title ||= `Script over ${grid.names.join(' × ')}`;
  // Unknown dataset or recipe names are refused now, not once per point.
  await resolveScriptInputs(db, body.groupId, source);
  const limits = await getLimits(db, body.groupId);
  if (grid.total > limits.sweepPoints) {
    throw new AppError(400, 'limit', `This sweep has ${grid.total} points; the sweep points limit is ${limits.sweepPoints}.`, {
      field: 'inputs',
      limit: 'sweepPoints',
      total: grid.total,
      max: limits.sweepPoints,
    });
  }
  const now = new Date().toISOString();
  const id = await db.transaction(async (trx) => {
    const [row] = await trx('sweeps')
      .insert({
        group_id: body.groupId,
        user_id: userId,
        title: title.slice(0, 200),
        recipe_id: body.recipeId ?? null,
        recipe_version: recipeVersion,
        source,
        language,
        inputs: JSON.stringify(body.inputs),
        fixed: JSON.stringify(body.fixed),
        seed: body.seed ?? randomInt(0, 2 ** 31 - 1),
        limits: JSON.stringify(limits),
        kernel_version: KERNEL_VERSION,
        total: grid.total,
        status: 'queued',
        notify: body.notify,
        created_at: now,
      })
      .returning('id');
    const sweepId = typeof row === 'object' ? (row as { id: number }).id : (row as number);
    await audit(trx, { userId, action: 'sweep.create', target: `sweep:${sweepId}`, details: { groupId: body.groupId, total: grid.total, recipeId: body.recipeId ?? null } });
    return sweepId;
  });
  queue.enqueue(id);
  return getSweep(db, id);
}

/**
 * Every varied and fixed input must be declared, and every corner of the grid must pass the
 * declarations' own range checks, so that no point fails on a range after the sweep has started.
 */
function checkGridAgainst(params: readonly ParamDeclaration[], grid: SweepGrid, fixed: Record<string, number>): void {
  const declared = params.map((p) => p.name).join(', ') || 'none';
  try {
    for (const name of [...grid.names, ...Object.keys(fixed)]) {
      if (!params.some((p) => p.name === name)) {
        const field = grid.names.includes(name) ? `inputs.${name}` : `fixed.${name}`;
        throw new InputProblem(field, `unknown input "${name}"; the script declares: ${declared}`);
      }
    }
    const lo: Record<string, number> = { ...fixed };
    const hi: Record<string, number> = { ...fixed };
    grid.names.forEach((n, k) => {
      const axis = grid.axes[k]!;
      // A loop, not Math.min(...axis): spreading a long axis into arguments overflows V8's stack (~3e5).
      let min = Infinity;
      let max = -Infinity;
      for (const v of axis) {
        if (v < min) min = v;
        if (v > max) max = v;
      }
      lo[n] = min;
      hi[n] = max;
    });
    checkInputs(params, lo);
    checkInputs(params, hi);
  } catch (err) {
    if (err instanceof InputProblem) throw new AppError(400, 'invalid_input', err.message, { field: err.field });
    throw err;
  }
}

export async function getSweep(db: Knex, id: number): Promise<SweepSummary> {
  const row = await getSweepRow(db, id);
  if (!row) throw notFound('Sweep');
  return summarize(db, row);
}

export async function sweepResults(db: Knex, id: number): Promise<SweepResults> {
  const sweep = await getSweep(db, id);
  return buildResults(sweep, await readPoints(db, id));
}

export async function cancelSweep(db: Knex, queue: SweepQueue, userId: number, id: number): Promise<SweepSummary> {
  const row = await getSweepRow(db, id);
  if (!row) throw notFound('Sweep');
  if (row.status !== 'queued' && row.status !== 'running') {
    throw new AppError(409, 'not_running', `Sweep ${id} has already ended (${row.status}).`);
  }
  await queue.cancel(id);
  await audit(db, { userId, action: 'sweep.cancel', target: `sweep:${id}`, details: {} });
  return getSweep(db, id);
}

/** The mail a member asked for when their sweep ends. */
export function finishedMail(row: SweepRow, appOrigin: string): { subject: string; text: string } {
  const failed = row.failed > 0 ? `, ${row.failed} of them failed` : '';
  return {
    subject: `Sweep ${row.status}: ${row.title}`,
    text:
      `Your sweep "${row.title}" has ${row.status === 'done' ? 'finished' : `ended (${row.status})`}: ` +
      `${row.completed} of ${row.total} points ran${failed}.\n\n` +
      `Results: ${appOrigin}/groups/${row.group_id}/sweeps/${row.id}\n`,
  };
}
