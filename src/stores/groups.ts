import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import { groupsApi, type Group, type GroupRole, type Member } from '../api/groups';
import { useAuthStore } from './auth';

const RANK: Record<GroupRole, number> = { viewer: 1, editor: 2, owner: 3 };
const LAST_KEY = 'comoving.lastGroup';

export const useGroupsStore = defineStore('groups', () => {
  const groups = ref<Group[]>([]);
  const loaded = ref(false);
  const loading = ref(false);
  /** The group the current route is about (set by the router from params.groupId). */
  const currentId = ref<number | null>(readLast());
  const members = ref<Member[]>([]);
  const membersOf = ref<number | null>(null);

  const current = computed(() => groups.value.find((g) => g.id === currentId.value) ?? null);

  function roleIn(groupId: number | null | undefined): GroupRole | null {
    if (groupId == null) return null;
    return groups.value.find((g) => g.id === groupId)?.role ?? null;
  }

  /** Site admins pass every group check as owner, as the server does. */
  function atLeast(min: GroupRole, groupId: number | null | undefined = currentId.value): boolean {
    const auth = useAuthStore();
    if (auth.isAdmin) return true;
    const r = roleIn(groupId);
    return r !== null && RANK[r] >= RANK[min];
  }

  const canEdit = computed(() => atLeast('editor'));
  const isOwner = computed(() => atLeast('owner'));

  async function load(force = false): Promise<void> {
    if (loaded.value && !force) return;
    loading.value = true;
    try {
      groups.value = (await groupsApi.list()).groups;
      loaded.value = true;
    } finally {
      loading.value = false;
    }
  }

  function setCurrent(id: number | null) {
    currentId.value = id;
    if (id !== null) {
      try {
        localStorage.setItem(LAST_KEY, String(id));
      } catch {
        /* storage can be off; only a convenience */
      }
    }
  }

  /** The group to land on after sign-in: the last one visited if still a member, else the first. */
  function landing(): Group | null {
    return groups.value.find((g) => g.id === currentId.value) ?? groups.value[0] ?? null;
  }

  async function create(name: string): Promise<Group> {
    const r = await groupsApi.create(name);
    await load(true);
    return r.group;
  }

  async function loadMembers(groupId: number): Promise<void> {
    const r = await groupsApi.members(groupId);
    members.value = r.members;
    membersOf.value = groupId;
  }

  function reset() {
    groups.value = [];
    loaded.value = false;
    members.value = [];
    membersOf.value = null;
  }

  return {
    groups,
    loaded,
    loading,
    currentId,
    current,
    members,
    membersOf,
    canEdit,
    isOwner,
    roleIn,
    atLeast,
    load,
    setCurrent,
    landing,
    create,
    loadMembers,
    reset,
  };
});

function readLast(): number | null {
  try {
    const v = Number(localStorage.getItem(LAST_KEY));
    return Number.isInteger(v) && v > 0 ? v : null;
  } catch {
    return null;
  }
}
