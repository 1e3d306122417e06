/**
 * Usage of the sandbox for the admin: runs and CPU per group and per member, runs stopped by each
 * limit, and the recipes whose runs take longest. Read from the `runs` table.
 */
import type { Knex } from 'knex';

export interface UsageReport {
  byGroup: { groupId: number | null; name: string; runs: number; cpuMs: number; failures: number }[];
  byUser: { userId: number | null; email: string | null; runs: number; cpuMs: number }[];
  failuresByLimit: { limit: string; count: number }[];
  slowestRecipes: { recipeId: number; name: string | null; runs: number; avgMs: number; maxMs: number }[];
}

const round = (x: unknown) => Math.round(Number(x ?? 0) * 1000) / 1000;

/** `since` (ISO time) limits the report to runs created from then on. */
export async function usageReport(db: Knex, opts: { since?: string } = {}): Promise<UsageReport> {
  const runs = () => {
    const q = db('runs as r');
    if (opts.since) q.where('r.created_at', '>=', opts.since);
    return q;
  };
  const byGroup = (await runs()
    .leftJoin('groups as g', 'g.id', 'r.group_id')
    .groupBy('r.group_id', 'g.name')
    .select('r.group_id as groupId', 'g.name as name')
    .count({ runs: '*' })
    .sum({ cpuMs: 'r.cpu_ms' })
    .select(db.raw("sum(case when r.status in ('error', 'limit') then 1 else 0 end) as failures"))
    .orderBy('runs', 'desc')) as { groupId: number | null; name: string | null; runs: number; cpuMs: number | null; failures: number }[];
  const byUser = (await runs()
    .leftJoin('users as u', 'u.id', 'r.user_id')
    .groupBy('r.user_id', 'u.email')
    .select('r.user_id as userId', 'u.email as email')
    .count({ runs: '*' })
    .sum({ cpuMs: 'r.cpu_ms' })
    .orderBy('runs', 'desc')) as { userId: number | null; email: string | null; runs: number; cpuMs: number | null }[];
  const failuresByLimit = (await runs()
    .whereNotNull('r.error_limit')
    .groupBy('r.error_limit')
    .select('r.error_limit as limit')
    .count({ count: '*' })
    .orderBy('count', 'desc')) as { limit: string; count: number }[];
  const hasRecipes = await db.schema.hasTable('recipes');
  const slowQ = runs()
    .whereNotNull('r.recipe_id')
    .whereNotNull('r.duration_ms')
    .groupBy('r.recipe_id')
    .select('r.recipe_id as recipeId')
    .count({ runs: '*' })
    .avg({ avgMs: 'r.duration_ms' })
    .max({ maxMs: 'r.duration_ms' })
    .orderBy('avgMs', 'desc')
    .limit(10);
  if (hasRecipes) slowQ.leftJoin('recipes as rc', 'rc.id', 'r.recipe_id').select('rc.name as name').groupBy('rc.name');
  const slow = (await slowQ) as { recipeId: number; name?: string | null; runs: number; avgMs: number; maxMs: number }[];
  return {
    byGroup: byGroup.map((g) => ({
      groupId: g.groupId,
      name: g.name ?? (g.groupId === null ? '(no group)' : `group ${g.groupId}`),
      runs: Number(g.runs),
      cpuMs: round(g.cpuMs),
      failures: Number(g.failures),
    })),
    byUser: byUser.map((u) => ({ userId: u.userId, email: u.email, runs: Number(u.runs), cpuMs: round(u.cpuMs) })),
    failuresByLimit: failuresByLimit.map((f) => ({ limit: f.limit, count: Number(f.count) })),
    slowestRecipes: slow.map((s) => ({
      recipeId: s.recipeId,
      name: s.name ?? null,
      runs: Number(s.runs),
      avgMs: round(s.avgMs),
      maxMs: round(s.maxMs),
    })),
  };
}
