import { describe, expect, it } from 'vitest';
import { recentPace } from '../../src/components/sweeps/estimate';
import type { SweepSummary } from '../../shared/schemas/sweeps';

// The pace is our own rule of thumb (common practice: the last comparable job predicts the next one).
function sweep(id: number, recipeId: number | null, completed: number, startedAt: string, finishedAt: string, status: SweepSummary['status'] = 'done'): SweepSummary {
  return { id, groupId: 1, title: `s${id}`, status, total: completed, completed, failed: 0, recipeId, recipeVersion: 1, inputs: {}, fixed: {}, createdAt: startedAt, startedAt, finishedAt, createdByName: 'x', notify: false, error: null };
}

describe('the pace of earlier sweeps', () => {
  const list = [
    sweep(1, 7, 1600, '2026-12-01T10:00:00.000Z', '2026-12-01T10:00:02.000Z'), // 800 points/s
    sweep(2, 8, 1000, '2026-12-01T11:00:00.000Z', '2026-12-01T11:00:04.000Z'), // 250 points/s, newer
    sweep(3, 7, 10, '2026-12-01T12:00:00.000Z', '2026-12-01T12:00:01.000Z'), // too small to count
    sweep(4, 7, 400, '2026-12-01T13:00:00.000Z', '2026-12-01T13:00:01.000Z', 'cancelled'),
  ];

  it('takes the latest finished sweep of the same recipe', () => {
    expect(recentPace(list, 7)).toEqual({ pointsPerSecond: 800, sameRecipe: true });
  });

  it('falls back to the latest finished sweep of any recipe, and says so', () => {
    expect(recentPace(list, 99)).toEqual({ pointsPerSecond: 250, sameRecipe: false });
    expect(recentPace(list, null)).toEqual({ pointsPerSecond: 250, sameRecipe: false });
  });

  it('has nothing to say without a finished sweep of at least 50 points', () => {
    expect(recentPace([list[2]!, list[3]!], 7)).toBeNull();
    expect(recentPace([], 7)).toBeNull();
  });
});
