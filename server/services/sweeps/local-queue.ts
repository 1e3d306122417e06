import { EventEmitter } from 'node:events';
import os from 'node:os';
import type { Knex } from 'knex';
import type { SweepProgress } from '../../../shared/schemas/sweeps';
import type { RunJob, RunResult } from '../../sandbox/types';
import type { SweepQueue } from './queue';
import { buildGrid, pointInputs } from './grid';
import { finishedIndices, getSweepRow, recount, setStatus, writePoints, type PointRecord, type SweepRow } from './store';
import { log } from '../../http/log';

/** Everything one point needs except its inputs, prepared once per sweep (datasets, recipes, limits). */
export type PointJobBase = Omit<RunJob, 'params'>;

export interface LocalSweepQueueOptions {
  db: Knex;
  /** Runs one point; the sandbox pool in production, anything with the same shape in tests. */
  runPoint: (job: RunJob, signal: AbortSignal) => Promise<RunResult>;
  /**
   * Runs many points of one sweep (Sandbox.runBatch): `onResult(k, result)` once per entry of
   * paramsList, as each finishes. When given, the queue uses it instead of runPoint.
   */
  runBatch?: (
    base: PointJobBase,
    paramsList: Record<string, number>[],
    signal: AbortSignal,
    onResult: (k: number, result: RunResult) => void,
  ) => Promise<void>;
  /** Builds the job base for a sweep (resolves the datasets and recipes its source names). */
  prepare: (sweep: SweepRow) => Promise<PointJobBase>;
  /** Called once when a sweep ends (done, cancelled or failed). */
  onFinished?: (sweep: SweepRow) => Promise<void>;
  /** Points in flight at once; defaults to the number of cores (the sandbox pool's size). */
  concurrency?: number;
  /** Finished points are written in batches at least this often (ms). */
  flushMs?: number;
}

interface Active {
  abort: AbortController;
  startedAt: number;
  doneThisSession: number;
  completed: number;
  failed: number;
  total: number;
  cancelled: boolean;
  finished: Promise<void>;
}

/**
 * The embedded sweep queue: one process, points run concurrently in the sandbox worker pool,
 * finished points written to SQLite in small batches. Progress is recomputed from stored points,
 * so a restart resumes exactly where the last written point left off.
 */
export class LocalSweepQueue implements SweepQueue {
  private readonly events = new EventEmitter();
  private readonly active = new Map<number, Active>();
  private closing = false;
  private readonly concurrency: number;
  private readonly flushMs: number;

  constructor(private readonly opts: LocalSweepQueueOptions) {
    this.events.setMaxListeners(0);
    this.concurrency = opts.concurrency ?? Math.max(1, os.availableParallelism());
    this.flushMs = opts.flushMs ?? 100;
  }

  enqueue(sweepId: number): void {
    if (this.closing || this.active.has(sweepId)) return;
    const entry: Active = {
      abort: new AbortController(),
      startedAt: Date.now(),
      doneThisSession: 0,
      completed: 0,
      failed: 0,
      total: 0,
      cancelled: false,
      finished: Promise.resolve(),
    };
    this.active.set(sweepId, entry);
    entry.finished = this.work(sweepId, entry)
      .catch(async (err: unknown) => {
        log('error', 'sweep failed', { sweepId, error: err instanceof Error ? err.stack ?? err.message : String(err) });
        await setStatus(this.opts.db, sweepId, 'failed', { finished_at: new Date().toISOString(), error: 'The sweep stopped on a server error.' }).catch(() => {});
      })
      .finally(() => {
        this.active.delete(sweepId);
      });
  }

  async cancel(sweepId: number): Promise<void> {
    const entry = this.active.get(sweepId);
    if (entry) {
      entry.cancelled = true;
      entry.abort.abort();
      await entry.finished;
      return;
    }
    const row = await getSweepRow(this.opts.db, sweepId);
    if (row && (row.status === 'queued' || row.status === 'running')) {
      await setStatus(this.opts.db, sweepId, 'cancelled', { finished_at: new Date().toISOString() });
      this.emit(sweepId, await this.snapshot(sweepId));
    }
  }

  subscribe(sweepId: number, listener: (p: SweepProgress) => void): () => void {
    const name = `p${sweepId}`;
    this.events.on(name, listener);
    return () => this.events.off(name, listener);
  }

  async close(): Promise<void> {
    this.closing = true;
    const entries = [...this.active.values()];
    // Points under way are abandoned, not recorded as cancelled: after a restart they run again.
    for (const e of entries) e.abort.abort();
    await Promise.all(entries.map((e) => e.finished));
  }

  /** Current progress of any sweep, running or not. */
  async snapshot(sweepId: number): Promise<SweepProgress> {
    const row = await getSweepRow(this.opts.db, sweepId);
    if (!row) throw new Error(`sweep ${sweepId} not found`);
    const entry = this.active.get(sweepId);
    return progressOf(row, entry);
  }

  private emit(sweepId: number, p: SweepProgress): void {
    this.events.emit(`p${sweepId}`, p);
  }

  private async work(sweepId: number, entry: Active): Promise<void> {
    const { db } = this.opts;
    const row = await getSweepRow(db, sweepId);
    if (!row || (row.status !== 'queued' && row.status !== 'running')) return;
    const grid = buildGrid(JSON.parse(row.inputs));
    const fixed = JSON.parse(row.fixed) as Record<string, number>;
    const done = await finishedIndices(db, sweepId);
    const counts = await recount(db, sweepId);
    entry.completed = counts.completed;
    entry.failed = counts.failed;
    entry.total = row.total;
    await setStatus(db, sweepId, 'running', { started_at: row.started_at ?? new Date().toISOString() });
    const base = await this.opts.prepare(row);

    const pending: number[] = [];
    for (let i = 0; i < grid.total; i++) if (!done.has(i)) pending.push(i);

    let buffer: PointRecord[] = [];
    let lastFlush = Date.now();
    let lastEmit = 0;
    const flush = async () => {
      const batch = buffer;
      buffer = [];
      lastFlush = Date.now();
      await writePoints(db, sweepId, batch);
    };
    const maybeEmit = (force = false) => {
      const now = Date.now();
      if (!force && now - lastEmit < 150) return;
      lastEmit = now;
      this.emit(sweepId, progressOf({ ...row, status: 'running', completed: entry.completed, failed: entry.failed }, entry));
    };

    let flushing: Promise<void> = Promise.resolve();
    const record = (index: number, inputs: Record<string, number>, result: RunResult, durationMs: number) => {
      buffer.push(toPoint(index, inputs, result, durationMs));
      entry.completed++;
      entry.doneThisSession++;
      if (result.status !== 'done') entry.failed++;
      if (Date.now() - lastFlush >= this.flushMs) flushing = flushing.then(flush);
      maybeEmit();
    };

    const { runBatch } = this.opts;
    if (runBatch) {
      // One call for the whole sweep: the sandbox sends the points to its workers in chunks.
      const inputsOf = pending.map((index) => pointInputs(grid, index));
      try {
        await runBatch(base, inputsOf.map((inputs) => ({ ...fixed, ...inputs })), entry.abort.signal, (k, result) => {
          // A point stopped by our own abort is not finished: it runs again on resume.
          if (entry.abort.signal.aborted && result.status === 'cancelled') return;
          record(pending[k]!, inputsOf[k]!, result, result.durationMs);
        });
      } finally {
        await flushing;
        await flush();
      }
    } else {
      let next = 0;
      const worker = async () => {
        while (!entry.abort.signal.aborted) {
          const k = next++;
          if (k >= pending.length) return;
          const index = pending[k]!;
          const inputs = pointInputs(grid, index);
          const t0 = performance.now();
          let result: RunResult;
          try {
            result = await this.opts.runPoint({ ...base, params: { ...fixed, ...inputs } }, entry.abort.signal);
          } catch (err) {
            if (entry.abort.signal.aborted) return;
            throw err;
          }
          // A point stopped by our own abort is not finished: it runs again on resume.
          if (entry.abort.signal.aborted && result.status === 'cancelled') return;
          record(index, inputs, result, performance.now() - t0);
        }
      };
      try {
        await Promise.all(Array.from({ length: Math.min(this.concurrency, Math.max(1, pending.length)) }, worker));
      } finally {
        await flushing;
        await flush();
      }
    }

    const final = await recount(db, sweepId);
    entry.completed = final.completed;
    entry.failed = final.failed;
    if (entry.cancelled) {
      await setStatus(db, sweepId, 'cancelled', { finished_at: new Date().toISOString() });
    } else if (this.closing) {
      // Left as 'running' so the next start resumes it.
      return;
    } else {
      await setStatus(db, sweepId, 'done', { finished_at: new Date().toISOString() });
    }
    const ended = (await getSweepRow(db, sweepId))!;
    this.emit(sweepId, progressOf(ended, undefined));
    if (this.opts.onFinished) await this.opts.onFinished(ended).catch((err: unknown) => log('warn', 'sweep finish hook failed', { sweepId, error: String(err) }));
  }
}

function progressOf(row: Pick<SweepRow, 'id' | 'status' | 'total' | 'completed' | 'failed'>, entry: Active | undefined): SweepProgress {
  const elapsedMs = entry ? Date.now() - entry.startedAt : 0;
  let etaMs: number | null = null;
  if (entry && entry.doneThisSession > 0) {
    const rate = entry.doneThisSession / Math.max(1, elapsedMs);
    etaMs = Math.round((row.total - row.completed) / rate);
  }
  return { id: row.id, status: row.status, total: row.total, completed: row.completed, failed: row.failed, etaMs, elapsedMs };
}

function toPoint(index: number, inputs: Record<string, number>, result: RunResult, durationMs: number): PointRecord {
  const values: Record<string, number | null> = {};
  const units: Record<string, string> = {};
  for (const o of result.outputs) {
    if (o.kind === 'value') {
      values[o.name] = typeof o.value === 'number' && Number.isFinite(o.value) ? o.value : null;
      if (o.unit) units[o.name] = o.unit;
    }
  }
  const status = result.status === 'done' ? 'done' : result.status === 'limit' ? 'limit' : result.status === 'cancelled' ? 'cancelled' : 'error';
  return { index, status, inputs, values, units, error: result.error?.message ?? null, durationMs };
}
