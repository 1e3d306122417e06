/**
 * The group's sweeps and the one being watched. Progress comes from the sweep's Server-Sent Events;
 * when the stream cannot be opened (or breaks before the end) the store polls the sweep instead.
 * While the sweep runs the results table is refreshed every few seconds, and once more at the end.
 */
import { defineStore } from 'pinia';
import { computed, ref, shallowRef } from 'vue';
import * as api from '../api/sweeps';
import type { NewSweep, SweepProgress, SweepResults, SweepSummary } from '../api/sweeps';

const RESULTS_EVERY_MS = 3000;
const POLL_EVERY_MS = 1500;

export const isFinished = (s: { status: string } | null | undefined) => !!s && s.status !== 'running' && s.status !== 'queued';

export const useSweepsStore = defineStore('sweeps', () => {
  const list = ref<SweepSummary[]>([]);
  const listOf = ref<number | null>(null);
  const listLoading = ref(false);
  const listError = ref('');
  const limit = ref<{ groupId: number; sweepPoints: number } | null>(null);

  const current = ref<SweepSummary | null>(null);
  const progress = ref<SweepProgress | null>(null);
  const results = shallowRef<SweepResults | null>(null);
  const loadError = ref<Error | null>(null);
  /** 'stream' while SSE delivers, 'poll' after falling back, null when idle. */
  const liveMode = ref<'stream' | 'poll' | null>(null);

  let source: EventSource | null = null;
  let pollTimer: ReturnType<typeof setInterval> | undefined;
  let resultsTimer: ReturnType<typeof setInterval> | undefined;
  let watching: number | null = null;

  async function loadList(groupId: number) {
    listLoading.value = true;
    listError.value = '';
    if (listOf.value !== groupId) list.value = [];
    try {
      list.value = (await api.listSweeps(groupId)).sweeps;
      listOf.value = groupId;
    } catch (e) {
      listError.value = e instanceof Error ? e.message : String(e);
    } finally {
      listLoading.value = false;
    }
  }

  async function loadLimit(groupId: number): Promise<number> {
    if (limit.value?.groupId === groupId) return limit.value.sweepPoints;
    const r = await api.sweepLimit(groupId);
    limit.value = { groupId, sweepPoints: r.sweepPoints };
    return r.sweepPoints;
  }

  async function start(body: NewSweep): Promise<SweepSummary> {
    const r = await api.createSweep(body);
    void loadList(body.groupId);
    return r.sweep;
  }

  function applyProgress(p: SweepProgress) {
    if (p.id !== watching) return;
    progress.value = p;
    if (current.value) current.value = { ...current.value, status: p.status, total: p.total, completed: p.completed, failed: p.failed };
  }

  // Refreshes overlap (the timer and the end of the sweep); only the newest answer may land, so an
  // older, emptier table never replaces the final one.
  let resultsSeq = 0;
  async function refreshResults() {
    const id = watching;
    if (id === null) return;
    const mine = ++resultsSeq;
    try {
      const r = await api.sweepResults(id);
      if (id === watching && mine === resultsSeq) results.value = r;
    } catch {
      /* the next tick tries again; the progress bar still moves */
    }
  }

  async function finish() {
    const id = watching;
    stopLive();
    if (id === null) return;
    try {
      const [s] = await Promise.all([api.getSweep(id), refreshResults()]);
      if (id === watching) current.value = s.sweep;
    } catch (e) {
      loadError.value = e instanceof Error ? e : new Error(String(e));
    }
  }

  function startPolling() {
    source?.close();
    source = null;
    liveMode.value = 'poll';
    clearInterval(pollTimer);
    pollTimer = setInterval(async () => {
      const id = watching;
      if (id === null) return;
      try {
        const s = (await api.getSweep(id)).sweep;
        const prev = progress.value;
        applyProgress({
          id: s.id,
          status: s.status,
          total: s.total,
          completed: s.completed,
          failed: s.failed,
          etaMs: etaFrom(s, prev),
          elapsedMs: s.startedAt ? Date.now() - Date.parse(s.startedAt) : 0,
        });
        if (isFinished(s)) void finish();
      } catch {
        /* keep polling: a restarting server comes back */
      }
    }, POLL_EVERY_MS);
  }

  function startStream(id: number) {
    if (typeof EventSource === 'undefined') return startPolling();
    let gotAny = false;
    try {
      source = new EventSource(api.sweepEventsUrl(id), { withCredentials: true });
    } catch {
      return startPolling();
    }
    liveMode.value = 'stream';
    const onData = (ev: MessageEvent<string>) => {
      gotAny = true;
      try {
        applyProgress(JSON.parse(ev.data) as SweepProgress);
      } catch {
        /* a malformed event is skipped */
      }
    };
    source.addEventListener('progress', onData as EventListener);
    source.addEventListener('end', ((ev: MessageEvent<string>) => {
      onData(ev);
      void finish();
    }) as EventListener);
    source.onerror = () => {
      // EventSource retries on its own after a clean close; a failure before any event, or a closed
      // stream while the sweep still runs, means SSE is not getting through: poll instead.
      if (!gotAny || source?.readyState === EventSource.CLOSED) startPolling();
    };
  }

  async function watch(id: number) {
    stopLive();
    watching = id;
    loadError.value = null;
    if (current.value?.id !== id) {
      current.value = null;
      results.value = null;
      progress.value = null;
    }
    try {
      const s = (await api.getSweep(id)).sweep;
      if (watching !== id) return;
      current.value = s;
      progress.value = { id, status: s.status, total: s.total, completed: s.completed, failed: s.failed, etaMs: null, elapsedMs: 0 };
      await refreshResults();
      if (!isFinished(s)) {
        startStream(id);
        resultsTimer = setInterval(() => void refreshResults(), RESULTS_EVERY_MS);
      }
    } catch (e) {
      loadError.value = e instanceof Error ? e : new Error(String(e));
    }
  }

  async function cancel() {
    const id = watching;
    if (id === null) return;
    const r = await api.cancelSweep(id);
    if (id === watching) current.value = r.sweep;
  }

  function stopLive() {
    source?.close();
    source = null;
    clearInterval(pollTimer);
    clearInterval(resultsTimer);
    liveMode.value = null;
  }

  function unwatch() {
    stopLive();
    watching = null;
  }

  const fraction = computed(() => {
    const p = progress.value;
    return p && p.total > 0 ? p.completed / p.total : 0;
  });

  return {
    list,
    listOf,
    listLoading,
    listError,
    limit,
    current,
    progress,
    results,
    loadError,
    liveMode,
    fraction,
    loadList,
    loadLimit,
    start,
    watch,
    cancel,
    unwatch,
    refreshResults,
  };
});

/** Time left from the rate between two polls (the stream carries the server's own estimate). */
function etaFrom(s: SweepSummary, prev: SweepProgress | null): number | null {
  if (!s.startedAt || s.completed === 0) return prev?.etaMs ?? null;
  const elapsed = Date.now() - Date.parse(s.startedAt);
  const rate = s.completed / Math.max(1, elapsed);
  return Math.round((s.total - s.completed) / rate);
}
