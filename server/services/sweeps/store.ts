import type { Knex } from 'knex';
import type { SweepAxis, SweepStatus, SweepSummary } from '../../../shared/schemas/sweeps';

/** Data access for sweeps and their points; JSON columns are parsed here and nowhere else. */

export interface SweepRow {
  id: number;
  group_id: number;
  user_id: number;
  title: string;
  recipe_id: number | null;
  recipe_version: number | null;
  source: string;
  language: 'ts' | 'js';
  inputs: string;
  fixed: string;
  seed: number;
  limits: string;
  kernel_version: string;
  total: number;
  completed: number;
  failed: number;
  status: SweepStatus;
  notify: number | boolean;
  error: string | null;
  created_at: string;
  started_at: string | null;
  finished_at: string | null;
}

export interface PointRow {
  sweep_id: number;
  idx: number;
  status: 'done' | 'error' | 'limit' | 'cancelled';
  inputs: string;
  values: string;
  units: string;
  error: string | null;
  duration_ms: number;
}

export interface PointRecord {
  index: number;
  status: PointRow['status'];
  inputs: Record<string, number>;
  values: Record<string, number | null>;
  units: Record<string, string>;
  error: string | null;
  durationMs: number;
}

export async function getSweepRow(db: Knex, id: number): Promise<SweepRow | undefined> {
  return db<SweepRow>('sweeps').where({ id }).first();
}

export async function summarize(db: Knex, row: SweepRow): Promise<SweepSummary> {
  const user = await db('users').select('name').where({ id: row.user_id }).first<{ name: string } | undefined>();
  return toSummary(row, user?.name ?? '');
}

export function toSummary(row: SweepRow, createdByName: string): SweepSummary {
  return {
    id: row.id,
    groupId: row.group_id,
    title: row.title,
    status: row.status,
    total: row.total,
    completed: row.completed,
    failed: row.failed,
    recipeId: row.recipe_id,
    recipeVersion: row.recipe_version,
    inputs: JSON.parse(row.inputs) as Record<string, SweepAxis>,
    fixed: JSON.parse(row.fixed) as Record<string, number>,
    createdAt: row.created_at,
    startedAt: row.started_at,
    finishedAt: row.finished_at,
    createdByName,
    notify: Boolean(row.notify),
    error: row.error,
  };
}

export async function listSweeps(db: Knex, groupId: number, limit: number): Promise<SweepSummary[]> {
  const rows = await db('sweeps as s')
    .join('users as u', 'u.id', 's.user_id')
    .where('s.group_id', groupId)
    .orderBy('s.created_at', 'desc')
    .orderBy('s.id', 'desc')
    .limit(limit)
    .select<(SweepRow & { user_name: string })[]>('s.*', 'u.name as user_name');
  return rows.map((r) => toSummary(r, r.user_name));
}

export async function finishedIndices(db: Knex, sweepId: number): Promise<Set<number>> {
  const rows = await db<PointRow>('sweep_points').where({ sweep_id: sweepId }).select('idx');
  return new Set(rows.map((r) => r.idx));
}

/** Writes a batch of finished points and the sweep's counters in one transaction. */
export async function writePoints(db: Knex, sweepId: number, points: PointRecord[]): Promise<void> {
  if (points.length === 0) return;
  await db.transaction(async (trx) => {
    // SQLite caps bound variables per statement; 100 rows × 8 columns stays well below it.
    for (let i = 0; i < points.length; i += 100) {
      await trx('sweep_points')
        .insert(
          points.slice(i, i + 100).map((p) => ({
            sweep_id: sweepId,
            idx: p.index,
            status: p.status,
            inputs: JSON.stringify(p.inputs),
            values: JSON.stringify(p.values),
            units: JSON.stringify(p.units),
            error: p.error,
            duration_ms: p.durationMs,
          })),
        )
        .onConflict(['sweep_id', 'idx'])
        .ignore();
    }
    await recount(trx, sweepId);
  });
}

/** Counters follow from the points themselves, so they are right even after a crash. */
export async function recount(db: Knex, sweepId: number): Promise<{ completed: number; failed: number }> {
  const row = await db('sweep_points')
    .where({ sweep_id: sweepId })
    .select(db.raw('count(*) as completed'), db.raw("sum(case when status = 'done' then 0 else 1 end) as failed"))
    .first<{ completed: number; failed: number | null }>();
  const counts = { completed: Number(row?.completed ?? 0), failed: Number(row?.failed ?? 0) };
  await db('sweeps').where({ id: sweepId }).update(counts);
  return counts;
}

export async function setStatus(
  db: Knex,
  sweepId: number,
  status: SweepStatus,
  extra: Partial<Pick<SweepRow, 'started_at' | 'finished_at' | 'error'>> = {},
): Promise<void> {
  await db('sweeps').where({ id: sweepId }).update({ status, ...extra });
}

export async function readPoints(db: Knex, sweepId: number): Promise<PointRecord[]> {
  const rows = await db<PointRow>('sweep_points').where({ sweep_id: sweepId }).orderBy('idx');
  return rows.map((r) => ({
    index: r.idx,
    status: r.status,
    inputs: JSON.parse(r.inputs) as Record<string, number>,
    values: JSON.parse(r.values) as Record<string, number | null>,
    units: JSON.parse(r.units) as Record<string, string>,
    error: r.error,
    durationMs: r.duration_ms,
  }));
}

export async function unfinishedSweepIds(db: Knex): Promise<number[]> {
  const rows = await db<SweepRow>('sweeps').whereIn('status', ['queued', 'running']).orderBy('id').select('id');
  return rows.map((r) => r.id);
}
