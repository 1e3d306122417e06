import { defineStore } from 'pinia';
import { computed, ref, watch } from 'vue';
import { themeFor, palette, type ThemeMode } from '../theme';

const KEY = 'comoving.theme';

export const useThemeStore = defineStore('theme', () => {
  const mode = ref<ThemeMode>(initial());
  const naive = computed(() => themeFor(mode.value));
  const colors = computed(() => palette[mode.value]);

  watch(
    mode,
    (m) => {
      document.documentElement.dataset.theme = m;
      try {
        localStorage.setItem(KEY, m);
      } catch {
        /* not fatal */
      }
    },
    { immediate: true },
  );

  function toggle() {
    mode.value = mode.value === 'dark' ? 'light' : 'dark';
  }
  function set(m: ThemeMode) {
    mode.value = m;
  }

  return { mode, naive, colors, toggle, set };
});

function initial(): ThemeMode {
  const fromDom = document.documentElement.dataset.theme;
  if (fromDom === 'dark' || fromDom === 'light') return fromDom;
  try {
    const s = localStorage.getItem(KEY);
    if (s === 'dark' || s === 'light') return s;
  } catch {
    /* ignore */
  }
  return window.matchMedia?.('(prefers-color-scheme: dark)').matches ? 'dark' : 'light';
}
