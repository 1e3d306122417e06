/** Every timestamp in the database is an ISO 8601 UTC string, so that text order is time order. */
export function nowIso(): string {
  return new Date().toISOString();
}

export function isoIn(seconds: number): string {
  return new Date(Date.now() + seconds * 1000).toISOString();
}

/** Column default producing the same ISO format as nowIso(), for migrations. */
export const ISO_NOW_SQL = "(strftime('%Y-%m-%dT%H:%M:%fZ','now'))";
