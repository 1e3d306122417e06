/** Client-side file downloads (CSV of a table or a plot, PNG of a plot): no server round trip. */
import { columnTitle, csvNumber } from './format';
import type { TableColumn } from './types';

export function toCsv(columns: TableColumn[], rows: ArrayLike<unknown>[]): string {
  const head = columns.map((c) => csvNumber(columnTitle(c.name, c.unit))).join(',');
  const lines = [head];
  for (const r of rows) lines.push(Array.from(r, csvNumber).join(','));
  return lines.join('\n') + '\n';
}

export function downloadBlob(filename: string, blob: Blob): void {
  const url = URL.createObjectURL(blob);
  const a = document.createElement('a');
  a.href = url;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
  setTimeout(() => URL.revokeObjectURL(url), 1000);
}

export function downloadText(filename: string, text: string, mime = 'text/csv'): void {
  downloadBlob(filename, new Blob([text], { type: `${mime};charset=utf-8` }));
}

/** Save what a same-origin or data: URL points at under `filename`. */
export function downloadUrl(filename: string, url: string): void {
  const a = document.createElement('a');
  a.href = url;
  a.download = filename;
  document.body.appendChild(a);
  a.click();
  a.remove();
}

/** A file name from a user-given label: letters, digits, dashes. */
export function fileStem(name: string | undefined, fallback: string): string {
  const s = (name ?? '').trim().toLowerCase().replace(/[^a-z0-9]+/g, '-').replace(/^-|-$/g, '');
  return s || fallback;
}
