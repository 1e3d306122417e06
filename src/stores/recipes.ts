/**
 * The group's recipe library and the recipe page's state: the open recipe, its versions, the last
 * run from its form. Saving reports a stale base version instead of throwing, so the page can offer
 * "reload" or "keep mine as a copy".
 */
import { defineStore } from 'pinia';
import { ref } from 'vue';
import { ApiError } from '../api/http';
import * as api from '../api/recipes';
import type { RecipeDetail, RecipeSummary, RecipeVersionSummary, Run } from '../api/recipes';

export type SaveOutcome =
  | { kind: 'saved'; version: number }
  | { kind: 'stale'; currentVersion: number }
  | { kind: 'failed'; error: ApiError | Error };

export const useRecipesStore = defineStore('recipes', () => {
  const list = ref<RecipeSummary[]>([]);
  const listOf = ref<number | null>(null);
  const listLoading = ref(false);
  const listError = ref('');

  const current = ref<RecipeDetail | null>(null);
  const versions = ref<RecipeVersionSummary[]>([]);
  const loadError = ref<ApiError | Error | null>(null);
  const lastRun = ref<Run | null>(null);
  const running = ref(false);

  async function loadList(groupId: number) {
    listLoading.value = true;
    listError.value = '';
    if (listOf.value !== groupId) list.value = [];
    try {
      list.value = (await api.listRecipes(groupId)).recipes;
      listOf.value = groupId;
    } catch (e) {
      listError.value = e instanceof Error ? e.message : String(e);
    } finally {
      listLoading.value = false;
    }
  }

  async function create(groupId: number, body: api.NewRecipe): Promise<RecipeDetail> {
    const r = await api.createRecipe(groupId, body);
    void loadList(groupId);
    return r.recipe;
  }

  async function open(id: number) {
    loadError.value = null;
    if (current.value?.id !== id) {
      current.value = null;
      lastRun.value = null;
      versions.value = [];
    }
    try {
      const [r, v] = await Promise.all([api.getRecipe(id), api.listRecipeVersions(id)]);
      current.value = r.recipe;
      versions.value = v.versions;
    } catch (e) {
      loadError.value = e instanceof Error ? e : new Error(String(e));
    }
  }

  async function refreshVersions() {
    if (current.value) versions.value = (await api.listRecipeVersions(current.value.id)).versions;
  }

  async function save(source: string, description: string, message: string): Promise<SaveOutcome> {
    const r = current.value;
    if (!r) return { kind: 'failed', error: new Error('No recipe is open.') };
    try {
      const res = await api.saveRecipe(r.id, {
        source,
        description,
        baseVersion: r.version,
        message: message.trim() || undefined,
      });
      current.value = res.recipe;
      void refreshVersions();
      return { kind: 'saved', version: res.recipe.version };
    } catch (e) {
      if (e instanceof ApiError && e.code === 'stale_version') {
        return { kind: 'stale', currentVersion: Number(e.details?.currentVersion ?? 0) };
      }
      return { kind: 'failed', error: e instanceof Error ? e : new Error(String(e)) };
    }
  }

  async function restore(version: number): Promise<RecipeDetail> {
    const r = current.value;
    if (!r) throw new Error('No recipe is open.');
    const res = await api.restoreRecipe(r.id, version);
    current.value = res.recipe;
    await refreshVersions();
    return res.recipe;
  }

  async function run(inputs: Record<string, number>): Promise<Run> {
    const r = current.value;
    if (!r) throw new Error('No recipe is open.');
    running.value = true;
    try {
      const res = await api.runRecipe(r.id, { inputs });
      lastRun.value = res.run;
      return res.run;
    } finally {
      running.value = false;
    }
  }

  async function copyTo(groupId: number, name?: string): Promise<RecipeDetail> {
    const r = current.value;
    if (!r) throw new Error('No recipe is open.');
    return (await api.copyRecipe(r.id, groupId, name)).recipe;
  }

  function close() {
    current.value = null;
    versions.value = [];
    lastRun.value = null;
    loadError.value = null;
  }

  return {
    list,
    listOf,
    listLoading,
    listError,
    current,
    versions,
    loadError,
    lastRun,
    running,
    loadList,
    create,
    open,
    refreshVersions,
    save,
    restore,
    run,
    copyTo,
    close,
  };
});
