/**
 * The sweep page's live updates without a browser: a fake EventSource and a fake fetch stand in
 * for the server. Checks the fallback the page promises (common practice for SSE clients): when
 * the stream cannot be opened the store polls, and at the end it loads the final results.
 */
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { createPinia, setActivePinia } from 'pinia';
import { useSweepsStore } from '../../src/stores/sweeps';
import type { SweepResults, SweepSummary } from '../../shared/schemas/sweeps';

const base: SweepSummary = {
  id: 7, groupId: 1, title: 't', status: 'running', total: 4, completed: 1, failed: 0, recipeId: null, recipeVersion: null,
  inputs: { x: { from: 0, to: 1, steps: 4, scale: 'linear' } }, fixed: {}, createdAt: '2026-01-01T00:00:00Z',
  startedAt: new Date(Date.now() - 1000).toISOString(), finishedAt: null, createdByName: 'Cyd', notify: false, error: null,
};

class FailingSource {
  static instances: FailingSource[] = [];
  static readonly CLOSED = 2;
  readyState = 0;
  onerror: (() => void) | null = null;
  closed = false;
  constructor(readonly url: string) {
    FailingSource.instances.push(this);
    setTimeout(() => {
      this.readyState = 2;
      this.onerror?.();
    }, 10);
  }
  addEventListener(_name: string, _f: (ev: { data: string }) => void) {}
  close() {
    this.closed = true;
  }
}

class StreamingSource extends FailingSource {
  listeners: Record<string, (ev: { data: string }) => void> = {};
  constructor(url: string) {
    super(url);
  }
  override addEventListener(name: string, f: (ev: { data: string }) => void) {
    this.listeners[name] = f;
  }
}

describe('sweeps store: live progress', () => {
  let state: SweepSummary;
  let resultCalls = 0;
  beforeEach(() => {
    setActivePinia(createPinia());
    vi.useFakeTimers();
    state = { ...base };
    resultCalls = 0;
    FailingSource.instances = [];
    vi.stubGlobal('fetch', async (url: string) => {
      const body = url.includes('/results')
        ? (resultCalls++, { sweep: state, inputNames: ['x'], valueNames: ['y'], units: {}, columns: ['x', 'y'], rows: [], points: [], best: null } satisfies SweepResults)
        : { sweep: state };
      return new Response(JSON.stringify(body), { status: 200 });
    });
  });
  afterEach(() => {
    vi.useRealTimers();
    vi.unstubAllGlobals();
  });

  it('falls back to polling when the event stream fails, and loads the results at the end', async () => {
    vi.stubGlobal('EventSource', FailingSource);
    const s = useSweepsStore();
    await s.watch(7);
    expect(s.liveMode).toBe('stream');
    await vi.advanceTimersByTimeAsync(20);
    expect(s.liveMode).toBe('poll');
    expect(FailingSource.instances[0]!.closed).toBe(true);
    state = { ...state, completed: 3 };
    await vi.advanceTimersByTimeAsync(1600);
    expect(s.progress?.completed).toBe(3);
    const before = resultCalls;
    state = { ...state, completed: 4, status: 'done', finishedAt: new Date().toISOString() };
    await vi.advanceTimersByTimeAsync(1600);
    expect(s.current?.status).toBe('done');
    expect(s.liveMode).toBe(null);
    expect(resultCalls).toBeGreaterThan(before);
    s.unwatch();
  });

  it('follows streamed progress events and stops at the end event', async () => {
    vi.stubGlobal('EventSource', StreamingSource);
    const s = useSweepsStore();
    await s.watch(7);
    const src = FailingSource.instances[0] as unknown as StreamingSource;
    src.onerror = null; // this stream stays healthy
    src.listeners.progress!({ data: JSON.stringify({ id: 7, status: 'running', total: 4, completed: 2, failed: 1, etaMs: 500, elapsedMs: 900 }) });
    expect(s.fraction).toBe(0.5);
    expect(s.current?.failed).toBe(1);
    state = { ...state, status: 'done', completed: 4, failed: 1 };
    src.listeners.end!({ data: JSON.stringify({ id: 7, status: 'done', total: 4, completed: 4, failed: 1, etaMs: 0, elapsedMs: 2000 }) });
    await vi.advanceTimersByTimeAsync(5);
    expect(src.closed).toBe(true);
    expect(s.current?.status).toBe('done');
    expect(s.liveMode).toBe(null);
  });
});
