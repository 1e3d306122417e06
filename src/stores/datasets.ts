import { defineStore } from 'pinia';
import { ref } from 'vue';
import { datasetsApi, type DatasetDetail, type DatasetSummary, type DatasetVersionSummary, type UploadInput } from '../api/datasets';

export const useDatasetsStore = defineStore('datasets', () => {
  const list = ref<DatasetSummary[]>([]);
  const listOf = ref<number | null>(null);
  const loading = ref(false);
  const current = ref<DatasetDetail | null>(null);
  const versions = ref<DatasetVersionSummary[]>([]);

  async function load(groupId: number) {
    loading.value = true;
    try {
      if (listOf.value !== groupId) list.value = [];
      list.value = (await datasetsApi.list(groupId)).datasets;
      listOf.value = groupId;
    } finally {
      loading.value = false;
    }
  }

  async function upload(groupId: number, input: UploadInput): Promise<DatasetSummary> {
    const r = await datasetsApi.upload(groupId, input);
    await load(groupId);
    return r.dataset;
  }

  async function open(id: number, version?: number) {
    const [d, v] = await Promise.all([datasetsApi.get(id, version), datasetsApi.versions(id)]);
    current.value = d.dataset;
    versions.value = v.versions;
  }

  return { list, listOf, loading, current, versions, load, upload, open };
});
