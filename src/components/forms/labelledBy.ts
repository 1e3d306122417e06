import type { Directive } from 'vue';

/**
 * `v-labelled-by="'label-id'"` on an NSelect: a single select renders no <input> (so `for`/`id` and
 * `input-props` point at nothing); this names the element that takes focus after the visible label
 * and gives it the combobox role screen readers expect. Pair with `:label-props="{ id: 'label-id' }"`.
 */
function apply(el: HTMLElement, id: string) {
  const focusable = el.querySelector<HTMLElement>('.n-base-selection-label, .n-base-selection-tags, input');
  if (!focusable) return;
  focusable.setAttribute('aria-labelledby', id);
  if (focusable.tagName !== 'INPUT') {
    focusable.setAttribute('role', 'combobox');
    focusable.setAttribute('aria-haspopup', 'listbox');
  }
}

export const vLabelledBy: Directive<HTMLElement, string> = {
  mounted: (el, b) => apply(el, b.value),
  // naive-ui swaps the focusable element between single and filterable modes; re-apply after patches.
  updated: (el, b) => apply(el, b.value),
};
