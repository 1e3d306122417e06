/**
 * Order command bar entries: with no query, recent first then by section; with a query, fuzzysort's
 * score (loose matches allowed) with a small lift for recently used entries.
 */
import fuzzysort from 'fuzzysort';
import type { CommandAction } from '../../stores/commandBar';

export interface Ranked {
  action: CommandAction;
  /** character positions of the match in the title, for highlighting */
  hits: number[];
  recent: boolean;
}

const SECTION_ORDER = ['Notebook', 'Notebooks', 'Go to', 'Snippets', 'Recipes', 'Datasets', 'Sweeps', 'Members', 'Groups', 'Settings', 'Account'];
const sectionRank = (s: string) => {
  const i = SECTION_ORDER.indexOf(s);
  return i < 0 ? SECTION_ORDER.length : i;
};

export function rankActions(actions: CommandAction[], q: string, recentRank: (id: string) => number, limit = 60): Ranked[] {
  const query = q.trim();
  if (!query) {
    const recent = actions
      .filter((a) => Number.isFinite(recentRank(a.id)))
      .sort((a, b) => recentRank(a.id) - recentRank(b.id))
      .slice(0, 6);
    const rest = actions
      .filter((a) => !recent.includes(a))
      .sort((a, b) => sectionRank(a.section) - sectionRank(b.section));
    return [...recent.map((action) => ({ action, hits: [], recent: true })), ...rest.map((action) => ({ action, hits: [], recent: false }))].slice(
      0,
      limit,
    );
  }
  const results = fuzzysort.go(query, actions, {
    keys: ['title', 'keywords', 'section'],
    threshold: 0,
    limit: limit * 2,
  });
  const scored = results.map((r) => {
    const rr = recentRank(r.obj.id);
    const lift = Number.isFinite(rr) ? 0.15 * (1 - Math.min(rr, 10) / 10) : 0;
    // fuzzysort's combined score: with several words, one key's own score can mislead (it may match
    // only one of them).
    const score = r.score + lift;
    return { action: r.obj, hits: r[0] ? [...(r[0].indexes ?? [])] : [], recent: Number.isFinite(rr), score };
  });
  // Keep each section together (one heading each), sections ordered by their best match.
  const best = new Map<string, number>();
  for (const x of scored) best.set(x.action.section, Math.max(best.get(x.action.section) ?? -Infinity, x.score));
  return scored
    .sort((a, b) => (best.get(b.action.section) ?? 0) - (best.get(a.action.section) ?? 0) || a.action.section.localeCompare(b.action.section) || b.score - a.score)
    .slice(0, limit)
    .map(({ action, hits, recent }) => ({ action, hits, recent }));
}

/** Split a title into plain and matched pieces for highlighting. */
export function highlight(title: string, hits: number[]): { text: string; hit: boolean }[] {
  if (!hits.length) return [{ text: title, hit: false }];
  const set = new Set(hits);
  const out: { text: string; hit: boolean }[] = [];
  for (let i = 0; i < title.length; i++) {
    const hit = set.has(i);
    const last = out[out.length - 1];
    if (last && last.hit === hit) last.text += title[i];
    else out.push({ text: title[i], hit });
  }
  return out;
}
