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
  const currentId = ref<number | null>(null);
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
      // Pages outside any group (admin, the group list) still show the group last worked in.
      if (currentId.value === null) currentId.value = readLast(lastKey());
    } finally {
      loading.value = false;
    }
  }

  /** Remembered per account: one browser shared by two people must not land one in the other's group. */
  function lastKey(): string {
    const uid = useAuthStore().user?.id;
    return uid ? `${LAST_KEY}:${uid}` : LAST_KEY;
  }

  function setCurrent(id: number | null) {
    currentId.value = id;
    if (id !== null && groups.value.some((g) => g.id === id)) {
      try {
        localStorage.setItem(lastKey(), String(id));
      } catch {
        /* storage can be off; only a convenience */
      }
    }
  }

  /**
   * The group to land on after sign-in: the last one visited if still a member, else the one with
   * the most members (the lab's main group rather than a side project), else the first.
   */
  async function landing(): Promise<Group | null> {
    const remembered = readLast(lastKey());
    const last = groups.value.find((g) => g.id === remembered);
    if (last) return last;
    if (groups.value.length <= 1) return groups.value[0] ?? null;
    const counts = await Promise.all(
      groups.value.map((g) =>
        groupsApi
          .members(g.id)
          .then((r) => r.members.length)
          .catch(() => 0),
      ),
    );
    let best = 0;
    counts.forEach((c, i) => {
      if (c > counts[best]!) best = i;
    });
    return groups.value[best] ?? null;
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

function readLast(key: string): number | null {
  try {
    const v = Number(localStorage.getItem(key));
    return Number.isInteger(v) && v > 0 ? v : null;
  } catch {
    return null;
  }
}
