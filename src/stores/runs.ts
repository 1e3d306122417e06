/**
 * Runs of the open notebook's blocks: which block is running, its last result, stopping it, and
 * running all blocks from the top. A run's answer arrives when it has finished (POST /api/runs);
 * stopping aborts the request and asks the server to cancel.
 */
import { defineStore } from 'pinia';
import { ref } from 'vue';
import { cancelRun, listRuns, startRun, type Run } from '../api/runs';
import { ApiError } from '../api/http';
import { useNotebooksStore } from './notebooks';
import type { BlockRunSummary } from '../../shared/schemas/notebooks';
import type { OutputItem, RunErrorInfo } from '../components/outputs/types';

/** What a block shows beneath it: a finished run, or one in flight. */
export interface BlockResult {
  status: Run['status'] | 'failed';
  runId?: number;
  outputs: OutputItem[];
  logs: string[];
  error: RunErrorInfo | null;
  durationMs: number | null;
  notebookVersion: number | null;
  createdAt: string | null;
  /** the source that produced it, so the card can say "script changed since this run" */
  source?: string;
}

interface InFlight {
  controller: AbortController;
  runId?: number;
  groupId: number;
  notebookId: number;
}

export function fromSummary(s: BlockRunSummary): BlockResult {
  return {
    status: s.status as BlockResult['status'],
    runId: s.id,
    outputs: (s.outputs ?? []) as OutputItem[],
    logs: s.logs ?? [],
    error: (s.error as RunErrorInfo | undefined) ?? null,
    durationMs: s.durationMs,
    notebookVersion: s.notebookVersion,
    createdAt: s.createdAt,
  };
}

export const useRunsStore = defineStore('runs', () => {
  const results = ref<Record<string, BlockResult>>({});
  const running = ref<Record<string, boolean>>({});
  const runAllActive = ref(false);
  const inflight = new Map<string, InFlight>();
  let stopAllRequested = false;

  function resetFor(lastRuns: Record<string, BlockRunSummary>) {
    for (const id of [...inflight.keys()]) void stop(id);
    running.value = {};
    const r: Record<string, BlockResult> = {};
    for (const [k, v] of Object.entries(lastRuns)) r[k] = fromSummary(v);
    results.value = r;
  }

  async function runBlock(blockId: string): Promise<BlockResult | null> {
    const nbs = useNotebooksStore();
    const nb = nbs.current;
    const block = nbs.blocks.find((b) => b.id === blockId);
    if (!nb || !block || block.kind !== 'script') return null;
    if (running.value[blockId]) return null;
    const controller = new AbortController();
    // Every member runs in the group (viewers too: a run changes nothing they may not save).
    const f: InFlight = { controller, groupId: nb.groupId, notebookId: nb.id };
    inflight.set(blockId, f);
    running.value = { ...running.value, [blockId]: true };
    const source = block.source;
    let res: BlockResult;
    try {
      const { run } = await startRun(
        { source, language: 'ts', groupId: nb.groupId, notebookId: nb.id, notebookVersion: nb.version, blockId },
        controller.signal,
      );
      f.runId = run.id;
      res = {
        status: run.status,
        runId: run.id,
        outputs: run.outputs ?? [],
        logs: run.logs ?? [],
        error: run.error ?? null,
        durationMs: run.durationMs,
        notebookVersion: run.notebookVersion ?? nb.version,
        createdAt: run.createdAt,
        source,
      };
    } catch (e) {
      const aborted = controller.signal.aborted;
      res = {
        status: aborted ? 'cancelled' : 'failed',
        outputs: [],
        logs: [],
        error: aborted ? { message: 'Stopped before it finished.' } : { message: e instanceof ApiError ? e.message : String(e) },
        durationMs: null,
        notebookVersion: nb.version,
        createdAt: new Date().toISOString(),
        source,
      };
    } finally {
      inflight.delete(blockId);
      const { [blockId]: _gone, ...rest } = running.value;
      running.value = rest;
    }
    results.value = { ...results.value, [blockId]: res };
    return res;
  }

  /**
   * Ask the server to cancel the block's run; the pending POST then answers with the cancelled run.
   * The run's id is not known until it answers, so it is found among the block's running runs.
   * If the server does not answer soon after, the request is dropped.
   */
  async function stop(blockId: string) {
    const f = inflight.get(blockId);
    if (!f) return;
    const fallback = setTimeout(() => f.controller.abort(), 3000);
    try {
      for (let attempt = 0; attempt < 3 && inflight.get(blockId) === f; attempt++) {
        const { runs } = await listRuns(
          { groupId: f.groupId, notebookId: f.notebookId, blockId, pageSize: 5 },
        );
        const live = runs.filter((r) => r.status === 'running');
        if (live.length) {
          await Promise.allSettled(live.map((r) => cancelRun(r.id)));
          return;
        }
        await new Promise((r) => setTimeout(r, 250));
      }
    } catch {
      f.controller.abort();
      clearTimeout(fallback);
    }
  }

  function stopAll() {
    stopAllRequested = true;
    for (const id of [...inflight.keys()]) void stop(id);
  }

  /** Run every script block from the top, stopping at the first that does not finish cleanly. */
  async function runAll() {
    const nbs = useNotebooksStore();
    if (runAllActive.value) return;
    runAllActive.value = true;
    stopAllRequested = false;
    try {
      for (const b of nbs.blocks.filter((x) => x.kind === 'script')) {
        if (stopAllRequested) break;
        nbs.select(b.id);
        const r = await runBlock(b.id);
        if (!r || r.status !== 'done') break;
      }
    } finally {
      runAllActive.value = false;
    }
  }

  const isRunning = (blockId: string) => !!running.value[blockId];
  const anyRunning = () => Object.keys(running.value).length > 0;

  return { results, running, runAllActive, resetFor, runBlock, stop, stopAll, runAll, isRunning, anyRunning };
});
