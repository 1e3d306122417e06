import { defineStore } from 'pinia';
import { computed, ref } from 'vue';
import { authApi, type User } from '../api/auth';
import { ApiError } from '../api/http';

export const useAuthStore = defineStore('auth', () => {
  const user = ref<User | null>(null);
  /** True once we asked the server who we are; the router waits for it before guarding. */
  const ready = ref(false);
  let pending: Promise<void> | null = null;

  const isAdmin = computed(() => user.value?.role === 'admin');
  const signedIn = computed(() => user.value !== null);

  function load(): Promise<void> {
    if (ready.value) return Promise.resolve();
    pending ??= authApi
      .me()
      .then((r) => {
        user.value = r.user;
      })
      .catch((e: unknown) => {
        // 401 simply means signed out; anything else we also treat as signed out, but say so.
        if (!(e instanceof ApiError && e.status === 401)) console.warn('Could not check the session', e);
        user.value = null;
      })
      .finally(() => {
        ready.value = true;
        pending = null;
      });
    return pending;
  }

  async function signIn(email: string, password: string): Promise<User> {
    const r = await authApi.signIn(email, password);
    user.value = r.user;
    ready.value = true;
    return r.user;
  }

  function setUser(u: User | null) {
    user.value = u;
    ready.value = true;
  }

  async function signOut(): Promise<void> {
    try {
      await authApi.signOut();
    } finally {
      user.value = null;
    }
  }

  return { user, ready, isAdmin, signedIn, load, signIn, setUser, signOut };
});
