/**
 * How long a new sweep may take, from the pace of sweeps already finished in the group: the latest
 * finished sweep of the same recipe, else the latest finished one of any. Tiny sweeps are left out,
 * since the start of a sweep (queue, first compile) dominates their pace.
 */
import type { SweepSummary } from '../../../shared/schemas/sweeps';

/** Fewer points than this say more about the start-up than about the pace. */
const MIN_POINTS = 50;

export interface Pace {
  pointsPerSecond: number;
  /** measured on a sweep of the same recipe */
  sameRecipe: boolean;
}

export function recentPace(sweeps: readonly SweepSummary[], recipeId: number | null): Pace | null {
  const finished = sweeps
    .filter((s) => s.status === 'done' && s.completed >= MIN_POINTS && s.startedAt && s.finishedAt)
    .map((s) => ({ s, ms: Date.parse(s.finishedAt!) - Date.parse(s.startedAt!), at: Date.parse(s.finishedAt!) }))
    .filter((x) => x.ms > 0)
    .sort((a, b) => b.at - a.at);
  const same = recipeId === null ? undefined : finished.find((x) => x.s.recipeId === recipeId);
  const pick = same ?? finished[0];
  if (!pick) return null;
  return { pointsPerSecond: (1000 * pick.s.completed) / pick.ms, sameRecipe: same !== undefined };
}
