/**
 * The command bar's registry. Views register what they can do (`register(actions)` returns an
 * unregister function; `unregister(ids)` also works); object sources (notebooks, datasets …) are
 * loaded when the bar opens. Everything the mouse can do on a page should be registered here.
 */
import { defineStore } from 'pinia';
import { computed, ref, shallowRef } from 'vue';

export interface CommandPrompt {
  label: string;
  placeholder?: string;
  initial?: string;
}

export interface CommandAction {
  /** unique; also the key for "recent" (e.g. 'notebook.save', 'open.notebook.12') */
  id: string;
  title: string;
  /** heading it is listed under: 'Notebook', 'Go to', 'Notebooks', 'Snippets', 'Account' … */
  section: string;
  /** shown beside the title, e.g. 'Ctrl Enter' */
  shortcut?: string;
  /** extra words to match (not shown) */
  keywords?: string;
  /** secondary text (owner, last change …) */
  hint?: string;
  /** false or a reason string hides/greys the action */
  enabled?: () => boolean | string;
  /** ask for one line of text before running (e.g. a new notebook's title) */
  prompt?: CommandPrompt;
  run: (input?: string) => void | Promise<void>;
}

/** Loads objects to list (called each time the bar opens; failures are tolerated). */
export type CommandSource = () => Promise<CommandAction[]>;

export const useCommandBarStore = defineStore('commandBar', () => {
  const isOpen = ref(false);
  const registered = shallowRef<Map<string, CommandAction>>(new Map());
  const sources = new Map<string, CommandSource>();
  const loaded = shallowRef<CommandAction[]>([]);
  const loading = ref(false);

  function register(actions: CommandAction[]): () => void {
    const next = new Map(registered.value);
    for (const a of actions) next.set(a.id, a);
    registered.value = next;
    const ids = actions.map((a) => a.id);
    return () => unregister(ids);
  }

  function unregister(ids: string[]) {
    const next = new Map(registered.value);
    for (const id of ids) next.delete(id);
    registered.value = next;
  }

  function registerSource(id: string, src: CommandSource): () => void {
    sources.set(id, src);
    return () => sources.delete(id);
  }

  async function refreshSources() {
    loading.value = true;
    const results = await Promise.allSettled([...sources.values()].map((s) => s()));
    loaded.value = results.flatMap((r) => (r.status === 'fulfilled' ? r.value : []));
    loading.value = false;
  }

  const actions = computed<CommandAction[]>(() => {
    const seen = new Set<string>();
    const out: CommandAction[] = [];
    for (const a of [...registered.value.values(), ...loaded.value]) {
      if (seen.has(a.id)) continue;
      seen.add(a.id);
      const en = a.enabled?.() ?? true;
      if (en === false) continue;
      out.push(a);
    }
    return out;
  });

  function open() {
    isOpen.value = true;
    void refreshSources();
  }
  function close() {
    isOpen.value = false;
  }
  function toggle() {
    if (isOpen.value) close();
    else open();
  }

  return { isOpen, actions, loading, open, close, toggle, register, unregister, registerSource, refreshSources };
});
