/**
 * For command-bar actions that lead to a form further down the page: scroll the section into view and
 * put the cursor in its first field, as a click on it would.
 */
export function focusSection(sectionId: string): void {
  const section = document.getElementById(sectionId)?.closest('section') ?? document.getElementById(sectionId);
  if (!section) return;
  section.scrollIntoView({ block: 'start', behavior: 'smooth' });
  const field = section.querySelector<HTMLElement>('input:not([type="hidden"]):not([disabled]), textarea:not([disabled]), button:not([disabled])');
  field?.focus({ preventScroll: true });
}
