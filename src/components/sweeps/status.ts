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
  // Sweeps of a few thousand points end within seconds: tenths say more than a rounded "2 s".
  if (ms < 9950) return `${(Math.max(0, ms) / 1000).toFixed(1)} s`;
  const s = Math.round(ms / 1000);
  if (s < 60) return `${s} s`;
  const m = Math.floor(s / 60);
  if (m < 60) return `${m} min ${s % 60} s`;
  return `${Math.floor(m / 60)} h ${m % 60} min`;
}
