/** A notebook's blocks as one text, so two versions can be compared line by line. */
import type { Block } from '../../../shared/schemas/notebooks';

export function notebookText(blocks: Block[], title?: string): string {
  const head = title ? `// ${title}\n\n` : '';
  return (
    head +
    blocks
      .map((b, i) => `// ── block ${i + 1} · ${b.kind} ${'─'.repeat(40)}\n${b.source.replace(/\s+$/, '')}\n`)
      .join('\n')
  );
}
