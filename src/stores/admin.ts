import { defineStore } from 'pinia';
import { ref } from 'vue';
import { adminApi, type AdminUser, type GroupLimitsResponse, type LimitsResponse, type OutboxMessage, type UsageResponse } from '../api/admin';
import type { SiteRole } from '../../shared/schemas/auth';
import type { GroupLimitOverrides, UpdateLimits } from '../../shared/schemas/limits';

export const useAdminStore = defineStore('admin', () => {
  const users = ref<AdminUser[]>([]);
  const outbox = ref<OutboxMessage[]>([]);
  const limits = ref<LimitsResponse | null>(null);
  const groupLimits = ref<Record<number, GroupLimitsResponse>>({});
  const usage = ref<UsageResponse | null>(null);

  async function loadUsers() {
    users.value = (await adminApi.users()).users;
  }
  async function updateUser(id: number, patch: { role?: SiteRole; disabled?: boolean }) {
    const r = await adminApi.updateUser(id, patch);
    const i = users.value.findIndex((u) => u.id === id);
    if (i >= 0 && r?.user) users.value[i] = r.user;
    else await loadUsers();
  }
  async function invite(email: string, role: SiteRole) {
    await adminApi.invite(email, role);
  }
  async function loadOutbox() {
    outbox.value = (await adminApi.outbox()).messages;
  }
  async function loadLimits() {
    limits.value = await adminApi.limits();
  }
  async function saveLimits(patch: UpdateLimits) {
    limits.value = await adminApi.saveLimits(patch);
  }
  async function loadGroupLimits(groupId: number) {
    groupLimits.value = { ...groupLimits.value, [groupId]: await adminApi.groupLimits(groupId) };
  }
  async function saveGroupLimits(groupId: number, patch: GroupLimitOverrides) {
    groupLimits.value = { ...groupLimits.value, [groupId]: await adminApi.saveGroupLimits(groupId, patch) };
  }
  async function loadUsage() {
    usage.value = await adminApi.usage();
  }

  return {
    users,
    outbox,
    limits,
    groupLimits,
    usage,
    loadUsers,
    updateUser,
    invite,
    loadOutbox,
    loadLimits,
    saveLimits,
    loadGroupLimits,
    saveGroupLimits,
    loadUsage,
  };
});
