/**
 * The Monaco setup, loaded on demand (dynamic import) so the first page never pays for the editor.
 * Only the core editor and TypeScript are bundled; workers come through Vite's `?worker`. The
 * script API declaration from shared/ is loaded as an extra lib, which gives completion, hover docs
 * and type errors before a run.
 */
import * as monaco from 'monaco-editor/editor';
// The editor's features (suggest, hover, code actions, find …) and the services they need: the bare
// API entry leaves them out. Only the two grammars we use, not every language Monaco knows.
import 'monaco-editor/features/register.all';
import 'monaco-editor/languages/definitions/typescript/register';
import 'monaco-editor/languages/definitions/markdown/register';
import { ScriptTarget, typescriptDefaults } from 'monaco-editor/languages/features/typescript/register';
import EditorWorker from 'monaco-editor/editor/editor.worker?worker';
import TsWorker from 'monaco-editor/languages/features/typescript/ts.worker?worker';

declare global {
  interface Window {
    MonacoEnvironment?: { getWorker(workerId: string, label: string): Worker };
  }
}

window.MonacoEnvironment = {
  getWorker(_id: string, label: string) {
    if (label === 'typescript' || label === 'javascript') return new TsWorker();
    return new EditorWorker();
  },
};

// A glob, not a plain import, so the client still builds while shared/script-api.d.ts is being written.
const apiDecl = import.meta.glob('../../../shared/script-api.d.ts', { query: '?raw', import: 'default', eager: true }) as Record<
  string,
  string
>;
export const scriptApiSource: string = Object.values(apiDecl)[0] ?? '';

typescriptDefaults.setCompilerOptions({
  target: ScriptTarget.ES2020,
  lib: ['es2022'],
  strict: true,
  noEmit: true,
  allowNonTsExtensions: true,
  // Every block runs in its own sandbox context: make each model its own module so two blocks may
  // both declare `const u` without a "redeclare" error. (3 = ModuleDetectionKind.Force)
  moduleDetection: 3,
});
typescriptDefaults.setDiagnosticsOptions({ noSemanticValidation: false, noSyntaxValidation: false });
typescriptDefaults.setEagerModelSync(true);
// The declaration file is a module (the sandbox bridge imports it); scripts see its exports as
// globals, so drop the leading `export ` of each line (the file's own documented convention).
if (scriptApiSource) typescriptDefaults.addExtraLib(scriptApiSource.replace(/^export /gm, ''), 'file:///comoving/script-api.d.ts');

/** Our editor themes: paper and ink, teal keywords, amber literals; no editor-product palette. */
function defineThemes() {
  monaco.editor.defineTheme('comoving-light', {
    base: 'vs',
    inherit: true,
    rules: [
      { token: '', foreground: '141a26' },
      { token: 'comment', foreground: '7d8391', fontStyle: 'italic' },
      { token: 'keyword', foreground: '1f7a74', fontStyle: 'bold' },
      { token: 'string', foreground: '8a5c0c' },
      { token: 'number', foreground: 'a4471f' },
      { token: 'type', foreground: '3f5f93' },
      { token: 'type.identifier', foreground: '3f5f93' },
      { token: 'identifier', foreground: '141a26' },
      { token: 'delimiter', foreground: '4f5666' },
      { token: 'regexp', foreground: '8a5c0c' },
    ],
    colors: {
      'editor.background': '#fcfbf8',
      'editor.foreground': '#141a26',
      'editorLineNumber.foreground': '#b9b3a5',
      'editorLineNumber.activeForeground': '#4f5666',
      'editor.lineHighlightBackground': '#f3f0e8',
      'editor.lineHighlightBorder': '#00000000',
      'editor.selectionBackground': '#cfe5e1',
      'editor.inactiveSelectionBackground': '#e3eeeb',
      'editorCursor.foreground': '#1f7a74',
      'editorIndentGuide.background1': '#ebe7dd',
      'editorWidget.background': '#fcfbf8',
      'editorWidget.border': '#dcd7cb',
      'editorSuggestWidget.background': '#fcfbf8',
      'editorSuggestWidget.border': '#dcd7cb',
      'editorSuggestWidget.selectedBackground': '#e0eeeb',
      'editorSuggestWidget.selectedForeground': '#141a26',
      'editorSuggestWidget.highlightForeground': '#1f7a74',
      'editorSuggestWidget.focusHighlightForeground': '#17635e',
      'list.activeSelectionForeground': '#141a26',
      'list.focusForeground': '#141a26',
      'editorHoverWidget.background': '#fcfbf8',
      'editorHoverWidget.border': '#dcd7cb',
      'editorError.foreground': '#b2432f',
      'editorWarning.foreground': '#d99a2b',
      'editorGutter.background': '#fcfbf8',
      'scrollbarSlider.background': '#c6c0b155',
      'focusBorder': '#1f7a7400',
      'diffEditor.insertedTextBackground': '#1f7a7426',
      'diffEditor.removedTextBackground': '#b2432f22',
    },
  });
  monaco.editor.defineTheme('comoving-dark', {
    base: 'vs-dark',
    inherit: true,
    rules: [
      { token: '', foreground: 'ece9e2' },
      { token: 'comment', foreground: '868c99', fontStyle: 'italic' },
      { token: 'keyword', foreground: '62bab2', fontStyle: 'bold' },
      { token: 'string', foreground: 'e9bf6e' },
      { token: 'number', foreground: 'e39a7c' },
      { token: 'type', foreground: '8fa9d6' },
      { token: 'type.identifier', foreground: '8fa9d6' },
      { token: 'identifier', foreground: 'ece9e2' },
      { token: 'delimiter', foreground: 'b2b6bf' },
      { token: 'regexp', foreground: 'e9bf6e' },
    ],
    colors: {
      'editor.background': '#1a2130',
      'editor.foreground': '#ece9e2',
      'editorLineNumber.foreground': '#4a5367',
      'editorLineNumber.activeForeground': '#b2b6bf',
      'editor.lineHighlightBackground': '#1f2737',
      'editor.lineHighlightBorder': '#00000000',
      'editor.selectionBackground': '#2d5451',
      'editor.inactiveSelectionBackground': '#24403e',
      'editorCursor.foreground': '#62bab2',
      'editorIndentGuide.background1': '#252d3d',
      'editorWidget.background': '#1a2130',
      'editorWidget.border': '#2b3344',
      'editorSuggestWidget.background': '#1a2130',
      'editorSuggestWidget.border': '#3a4457',
      'editorSuggestWidget.selectedBackground': '#1b3533',
      'editorSuggestWidget.selectedForeground': '#ece9e2',
      'editorSuggestWidget.highlightForeground': '#62bab2',
      'editorSuggestWidget.focusHighlightForeground': '#7fd0c8',
      'list.activeSelectionForeground': '#ece9e2',
      'list.focusForeground': '#ece9e2',
      'editorHoverWidget.background': '#1a2130',
      'editorHoverWidget.border': '#3a4457',
      'editorError.foreground': '#e0806c',
      'editorWarning.foreground': '#e2aa45',
      'editorGutter.background': '#1a2130',
      'scrollbarSlider.background': '#3a445788',
      'focusBorder': '#4aa79f00',
      'diffEditor.insertedTextBackground': '#4aa79f2e',
      'diffEditor.removedTextBackground': '#e0806c26',
    },
  });
}
defineThemes();

export function themeName(mode: 'light' | 'dark'): string {
  return mode === 'dark' ? 'comoving-dark' : 'comoving-light';
}

export const baseEditorOptions: monaco.editor.IStandaloneEditorConstructionOptions = {
  fontFamily: "'IBM Plex Mono', ui-monospace, monospace",
  fontSize: 13.5,
  lineHeight: 21,
  minimap: { enabled: false },
  scrollBeyondLastLine: false,
  overviewRulerLanes: 0,
  hideCursorInOverviewRuler: true,
  overviewRulerBorder: false,
  renderLineHighlight: 'line',
  renderLineHighlightOnlyWhenFocus: true,
  lineNumbersMinChars: 3,
  lineDecorationsWidth: 10,
  glyphMargin: false,
  folding: false,
  tabSize: 2,
  fixedOverflowWidgets: true,
  automaticLayout: true,
  wordWrap: 'on',
  padding: { top: 10, bottom: 10 },
  scrollbar: { vertical: 'hidden', horizontal: 'auto', alwaysConsumeMouseWheel: false, verticalScrollbarSize: 8 },
  contextmenu: false,
  stickyScroll: { enabled: false },
  // Greek letters (σ, Ω) are everyday names here, not look-alike tricks.
  unicodeHighlight: { ambiguousCharacters: false },
};

export { monaco };
