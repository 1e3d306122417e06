import type { PiniaPluginContext, StateTree, Store } from 'pinia';

/**
 * What a signed-in session loaded (groups, notebooks, datasets, admin tables …) must not outlive it:
 * when the session ends or expires, every such store goes back to the state it was created with.
 * Preferences and the always-mounted command bar are kept.
 */
const KEEP = new Set(['auth', 'theme', 'commandBar', 'recent']);
const initial = new Map<Store, string>();

/** Pinia plugin: remembers each session store's initial state (plain data, so JSON is a faithful copy). */
export function sessionResetPlugin({ store }: PiniaPluginContext): void {
  if (KEEP.has(store.$id)) return;
  initial.set(store, JSON.stringify(store.$state));
}

export function resetSessionStores(): void {
  for (const [store, json] of initial) {
    const fresh = JSON.parse(json) as StateTree;
    store.$patch((s: StateTree) => {
      for (const k of Object.keys(fresh)) s[k] = fresh[k];
    });
  }
}
