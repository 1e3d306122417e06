/** Words and tones for a sweep's status, and a time span in words. */
import type { SweepStatus } from '../../../shared/schemas/sweeps';

export const STATUS_TEXT: Record<SweepStatus, string> = {
  queued: 'waiting',
  running: 'running',
  done: 'finished',
  cancelled: 'cancelled',
  failed: 'stopped by an error',
};

export function duration(ms: number | null | undefined): string {
  if (ms === null || ms === undefined || !Number.isFinite(ms)) return '—';
  const s = Math.max(0, Math.round(ms / 1000));
  if (s < 60) return `${s} s`;
  const m = Math.floor(s / 60);
  if (m < 60) return `${m} min ${s % 60} s`;
  return `${Math.floor(m / 60)} h ${m % 60} min`;
}
