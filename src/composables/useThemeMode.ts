/**
 * The current colour theme as a ref, read from <html data-theme>. Components that draw outside CSS
 * (charts, the editor) follow it without depending on how the shell stores the preference.
 */
import { onBeforeUnmount, ref, type Ref } from 'vue';

export type ThemeMode = 'light' | 'dark';

function read(): ThemeMode {
  return document.documentElement.dataset.theme === 'dark' ? 'dark' : 'light';
}

export function useThemeMode(): Ref<ThemeMode> {
  const mode = ref<ThemeMode>(read());
  const obs = new MutationObserver(() => {
    mode.value = read();
  });
  obs.observe(document.documentElement, { attributes: true, attributeFilter: ['data-theme'] });
  onBeforeUnmount(() => obs.disconnect());
  return mode;
}

/** Resolved value of a palette variable (see src/styles/palette.css). */
export function cssVar(name: string): string {
  return getComputedStyle(document.documentElement).getPropertyValue(name).trim();
}
