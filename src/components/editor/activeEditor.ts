/**
 * The editor that last had focus, so commands from outside (the command bar's "insert snippet",
 * run-block shortcuts) know where to act. Holds plain callbacks: importing it never loads Monaco.
 */
import { shallowRef } from 'vue';

export interface EditorHandle {
  /** block this editor belongs to, when it is a notebook block */
  blockId?: string;
  insert(text: string): void;
  focus(): void;
}

export const activeEditor = shallowRef<EditorHandle | null>(null);

export function setActiveEditor(h: EditorHandle | null): void {
  activeEditor.value = h;
}
