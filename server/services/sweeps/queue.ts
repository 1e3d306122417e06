import type { SweepProgress } from '../../../shared/schemas/sweeps';

/**
 * What feeds sweep points to workers. The embedded default runs them in this process's sandbox
 * pool; a department that outgrows one machine swaps in a queue on Redis (BullMQ) whose workers run
 * the same `runSweepPoint` elsewhere — the routes and the service only ever see this interface.
 */
export interface SweepQueue {
  /** Start, or resume after a restart, the work on a sweep. Returns at once. */
  enqueue(sweepId: number): void;
  /** Stop a sweep: points under way are cancelled, finished ones are kept. */
  cancel(sweepId: number): Promise<void>;
  /** Progress of a sweep as it happens; returns the unsubscribe function. */
  subscribe(sweepId: number, listener: (progress: SweepProgress) => void): () => void;
  /** Let points under way finish writing, then stop taking work. */
  close(): Promise<void>;
}
