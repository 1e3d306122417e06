/**
 * Page-level keyboard shortcuts. Bindings are written like 'Ctrl+Alt+ArrowUp'; `capture` ones run
 * before the editor sees the key (so the editor cannot swallow Ctrl Enter), the rest only when
 * nothing else handled the key (so Escape still closes the editor's suggestion list first).
 */
import { onBeforeUnmount, onMounted } from 'vue';

export interface KeyBinding {
  keys: string;
  run: (e: KeyboardEvent) => void | boolean;
  capture?: boolean;
  /** also when typing in an input or textarea outside the editor (default: only for capture bindings) */
  inInputs?: boolean;
}

function norm(k: string): string {
  if (k === ' ') return 'Space';
  return k.length === 1 ? k.toUpperCase() : k;
}

export function keyName(e: KeyboardEvent): string {
  const parts: string[] = [];
  if (e.ctrlKey || e.metaKey) parts.push('Ctrl');
  if (e.altKey) parts.push('Alt');
  if (e.shiftKey) parts.push('Shift');
  // With Alt held some layouts change e.key; e.code keeps letters and digits stable.
  let key = e.key;
  if (e.altKey && /^Key[A-Z]$/.test(e.code)) key = e.code.slice(3);
  else if (e.code === 'Period') key = '.';
  parts.push(norm(key));
  return parts.join('+');
}

/** The display form of a binding for the command bar: 'Ctrl+Alt+ArrowUp' → 'Ctrl Alt ↑'. */
export function shortcutLabel(keys: string): string {
  const map: Record<string, string> = { ArrowUp: '↑', ArrowDown: '↓', ArrowLeft: '←', ArrowRight: '→', Enter: 'Enter', Backspace: '⌫', Escape: 'Esc' };
  return keys
    .split('+')
    .map((k) => map[k] ?? k)
    .join(' ');
}

function typingTarget(e: KeyboardEvent): boolean {
  const t = e.target as HTMLElement | null;
  if (!t) return false;
  if (t.closest('.monaco-editor')) return false;
  return t.tagName === 'INPUT' || t.tagName === 'TEXTAREA' || t.isContentEditable;
}

export function useKeys(bindings: () => KeyBinding[]) {
  function handler(capture: boolean) {
    return (e: KeyboardEvent) => {
      if (e.defaultPrevented && !capture) return;
      const name = keyName(e);
      for (const b of bindings()) {
        if (!!b.capture !== capture || b.keys !== name) continue;
        if (typingTarget(e) && !(b.inInputs ?? capture)) continue;
        const r = b.run(e);
        if (r !== false) {
          e.preventDefault();
          e.stopPropagation();
        }
        return;
      }
    };
  }
  const onCapture = handler(true);
  const onBubble = handler(false);
  onMounted(() => {
    window.addEventListener('keydown', onCapture, { capture: true });
    window.addEventListener('keydown', onBubble);
  });
  onBeforeUnmount(() => {
    window.removeEventListener('keydown', onCapture, { capture: true });
    window.removeEventListener('keydown', onBubble);
  });
}
