/**
 * Recipe inputs carried in a link (`?in.omegaM=0.33&in.w0=-1.12`), so a sweep's best point opens the
 * recipe with its form filled in. Numbers are written in full (String(x) round-trips a double).
 */
const PREFIX = 'in.';

export function inputsToQuery(inputs: Record<string, number>): Record<string, string> {
  return Object.fromEntries(Object.entries(inputs).filter(([, v]) => Number.isFinite(v)).map(([k, v]) => [PREFIX + k, String(v)]));
}

/** The inputs a link carries; anything not a finite number is left out (the form keeps its default). */
export function inputsFromQuery(query: Record<string, unknown>): Record<string, number> {
  const out: Record<string, number> = {};
  for (const [k, raw] of Object.entries(query)) {
    if (!k.startsWith(PREFIX) || typeof raw !== 'string' || raw.trim() === '') continue;
    const v = Number(raw);
    if (Number.isFinite(v)) out[k.slice(PREFIX.length)] = v;
  }
  return out;
}
