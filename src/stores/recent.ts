/**
 * What the member used last in the command bar (actions and objects), newest first, kept in
 * localStorage per browser so "recent items first" survives reloads.
 */
import { defineStore } from 'pinia';
import { ref } from 'vue';

const KEY = 'comoving.recent';
const MAX = 30;

export interface RecentEntry {
  id: string;
  at: number;
}

function read(): RecentEntry[] {
  try {
    const v = JSON.parse(localStorage.getItem(KEY) ?? '[]') as unknown;
    return Array.isArray(v) ? v.filter((e): e is RecentEntry => typeof e?.id === 'string' && typeof e?.at === 'number') : [];
  } catch {
    return [];
  }
}

export const useRecentStore = defineStore('recent', () => {
  const entries = ref<RecentEntry[]>(read());

  function touch(id: string) {
    entries.value = [{ id, at: Date.now() }, ...entries.value.filter((e) => e.id !== id)].slice(0, MAX);
    try {
      localStorage.setItem(KEY, JSON.stringify(entries.value));
    } catch {
      /* storage may be off: recency is a convenience */
    }
  }

  /** 0 for the newest, larger for older, Infinity when never used. */
  function rank(id: string): number {
    const i = entries.value.findIndex((e) => e.id === id);
    return i < 0 ? Infinity : i;
  }

  return { entries, touch, rank };
});
