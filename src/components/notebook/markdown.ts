/**
 * Note blocks: Markdown with $…$ and $$…$$ maths through KaTeX, then DOMPurify, because a note is
 * written by one member and read in the browsers of all the others.
 */
import MarkdownIt from 'markdown-it';
import texmath from 'markdown-it-texmath';
import DOMPurify from 'dompurify';
import 'katex/dist/katex.min.css';

const md = new MarkdownIt({ html: false, linkify: true, typographer: true });
// texmath loads KaTeX itself (one copy in the bundle; importing it here too would add a second).
md.use(texmath, { delimiters: 'dollars', katexOptions: { throwOnError: false, output: 'htmlAndMathml' } });

// Links in notes open away from the notebook, never with access to it.
DOMPurify.addHook('afterSanitizeAttributes', (node) => {
  if (node.tagName === 'A') {
    node.setAttribute('target', '_blank');
    node.setAttribute('rel', 'noopener noreferrer');
  }
});

export function renderNote(source: string): string {
  return DOMPurify.sanitize(md.render(source), {
    USE_PROFILES: { html: true, mathMl: true, svg: true },
    ADD_TAGS: ['eqn', 'semantics', 'annotation'],
    ADD_ATTR: ['target', 'encoding'],
  });
}
