/**
 * The open notebook: a working copy of its blocks, what was last saved, and the operations of the
 * page (add, move, duplicate, delete blocks; save with a message; stale-save handling). Also the
 * group's notebook list, which the list page and the command bar share.
 */
import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import * as api from '../api/notebooks';
import { ApiError } from '../api/http';
import type { Block, BlockRunSummary, Notebook, NotebookListItem } from '../../shared/schemas/notebooks';

export type BlockKind = Block['kind'];

export function newBlockId(): string {
  const rnd = Math.random().toString(36).slice(2, 10);
  return `b-${Date.now().toString(36)}-${rnd}`;
}

/** Outcome of a save, for the page to react to. */
export type SaveOutcome =
  | { kind: 'saved'; version: number }
  | { kind: 'stale'; currentVersion: number }
  | { kind: 'refused'; message: string }
  | { kind: 'error'; message: string; field?: string };

export const useNotebooksStore = defineStore('notebooks', () => {
  // ---- the group's list ----
  const list = ref<NotebookListItem[]>([]);
  const listGroupId = ref<number | null>(null);
  const listLoading = ref(false);
  const listError = ref('');

  async function loadList(groupId: number, opts: { q?: string; sort?: api.NotebookSort; order?: 'asc' | 'desc' } = {}) {
    listLoading.value = true;
    listError.value = '';
    try {
      const r = await api.listNotebooks(groupId, opts);
      list.value = r.notebooks;
      listGroupId.value = groupId;
    } catch (e) {
      listError.value = e instanceof Error ? e.message : String(e);
    } finally {
      listLoading.value = false;
    }
  }

  async function create(groupId: number, title: string, blocks?: Block[]): Promise<Notebook> {
    const r = await api.createNotebook(groupId, {
      title,
      blocks: blocks ?? [{ id: newBlockId(), kind: 'script', source: '' }],
    });
    return r.notebook;
  }

  // ---- the open notebook ----
  const current = ref<Notebook | null>(null);
  const canEdit = ref(false);
  const blocks = ref<Block[]>([]);
  const title = ref('');
  const lastRuns = ref<Record<string, BlockRunSummary>>({});
  const loading = ref(false);
  const loadError = ref<ApiError | null>(null);
  const saving = ref(false);
  const selectedId = ref<string | null>(null);
  const savedSnapshot = ref('');

  const snapshot = () => JSON.stringify({ t: title.value, b: blocks.value.map((b) => [b.id, b.kind, b.source]) });
  const dirty = computed(() => current.value !== null && snapshot() !== savedSnapshot.value);

  function adopt(nb: Notebook) {
    current.value = nb;
    title.value = nb.title;
    blocks.value = nb.blocks.map((b) => ({ ...b }));
    savedSnapshot.value = snapshot();
    if (!blocks.value.some((b) => b.id === selectedId.value)) selectedId.value = blocks.value[0]?.id ?? null;
  }

  async function open(id: number) {
    loading.value = true;
    loadError.value = null;
    try {
      const r = await api.getNotebook(id);
      canEdit.value = r.canEdit;
      lastRuns.value = r.lastRuns ?? {};
      selectedId.value = null;
      adopt(r.notebook);
    } catch (e) {
      current.value = null;
      loadError.value = e instanceof ApiError ? e : new ApiError(0, 'network', e instanceof Error ? e.message : String(e));
    } finally {
      loading.value = false;
    }
  }

  function close() {
    current.value = null;
    blocks.value = [];
    lastRuns.value = {};
    savedSnapshot.value = '';
  }

  function indexOf(id: string) {
    return blocks.value.findIndex((b) => b.id === id);
  }

  function addBlock(kind: BlockKind, at?: number, source = ''): Block {
    const b: Block = { id: newBlockId(), kind, source };
    const i = at === undefined ? blocks.value.length : Math.max(0, Math.min(at, blocks.value.length));
    blocks.value.splice(i, 0, b);
    selectedId.value = b.id;
    return b;
  }

  function addAfterSelected(kind: BlockKind): Block {
    const i = selectedId.value ? indexOf(selectedId.value) : -1;
    return addBlock(kind, i < 0 ? blocks.value.length : i + 1);
  }

  function move(id: string, delta: number) {
    const i = indexOf(id);
    const j = i + delta;
    if (i < 0 || j < 0 || j >= blocks.value.length) return;
    const [b] = blocks.value.splice(i, 1);
    blocks.value.splice(j, 0, b);
  }

  function duplicate(id: string): Block | null {
    const i = indexOf(id);
    if (i < 0) return null;
    const src = blocks.value[i];
    const b: Block = { id: newBlockId(), kind: src.kind, source: src.source };
    blocks.value.splice(i + 1, 0, b);
    selectedId.value = b.id;
    return b;
  }

  /** Remove a block; returns a function that puts it back (for an undo offer). */
  function remove(id: string): (() => void) | null {
    const i = indexOf(id);
    if (i < 0) return null;
    const [b] = blocks.value.splice(i, 1);
    selectedId.value = blocks.value[Math.min(i, blocks.value.length - 1)]?.id ?? null;
    return () => {
      blocks.value.splice(Math.min(i, blocks.value.length), 0, b);
      selectedId.value = b.id;
    };
  }

  function setSource(id: string, source: string) {
    const b = blocks.value.find((x) => x.id === id);
    if (b) b.source = source;
  }

  function select(id: string | null) {
    selectedId.value = id;
  }

  function selectRelative(delta: number) {
    const i = selectedId.value ? indexOf(selectedId.value) : -1;
    const j = Math.max(0, Math.min(blocks.value.length - 1, i + delta));
    selectedId.value = blocks.value[j]?.id ?? null;
  }

  async function save(message?: string): Promise<SaveOutcome> {
    const nb = current.value;
    if (!nb) return { kind: 'error', message: 'No notebook is open.' };
    saving.value = true;
    try {
      const r = await api.saveNotebook(nb.id, {
        blocks: blocks.value.map((b) => ({ id: b.id, kind: b.kind, source: b.source })),
        baseVersion: nb.version,
        message: message?.trim() || undefined,
        title: title.value.trim() !== nb.title ? title.value.trim() : undefined,
      });
      // Keep the working copy (the member may have typed while saving); only the base moves on.
      const typedMeanwhile = snapshot();
      current.value = r.notebook;
      savedSnapshot.value = JSON.stringify({ t: r.notebook.title, b: r.notebook.blocks.map((b) => [b.id, b.kind, b.source]) });
      if (typedMeanwhile === savedSnapshot.value) adopt(r.notebook);
      return { kind: 'saved', version: r.notebook.version };
    } catch (e) {
      if (e instanceof ApiError) {
        if (e.status === 409) return { kind: 'stale', currentVersion: Number(e.details?.currentVersion ?? 0) };
        if (e.status === 403) return { kind: 'refused', message: e.message };
        return { kind: 'error', message: e.message, field: e.field };
      }
      return { kind: 'error', message: e instanceof Error ? e.message : String(e) };
    } finally {
      saving.value = false;
    }
  }

  /** "Keep both": the working copy becomes a new notebook in the same group. */
  async function saveAsCopy(): Promise<Notebook> {
    const nb = current.value;
    if (!nb) throw new Error('No notebook is open.');
    const r = await api.createNotebook(nb.groupId, {
      title: `${title.value.trim() || nb.title} (my copy)`.slice(0, 200),
      blocks: blocks.value.map((b) => ({ id: b.id, kind: b.kind, source: b.source })),
    });
    return r.notebook;
  }

  async function restore(version: number) {
    const nb = current.value;
    if (!nb) return;
    const r = await api.restoreVersion(nb.id, version);
    adopt(r.notebook);
  }

  return {
    list, listGroupId, listLoading, listError, loadList, create,
    current, canEdit, blocks, title, lastRuns, loading, loadError, saving, selectedId, dirty,
    open, close, addBlock, addAfterSelected, move, duplicate, remove, setSource, select, selectRelative,
    save, saveAsCopy, restore, indexOf,
  };
});
