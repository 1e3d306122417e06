import type { Knex } from 'knex';

/** Tables whose rows belong to one group through a `group_id` column. */
export type GroupOwnedTable = 'notebooks' | 'recipes' | 'datasets' | 'sweeps';

/**
 * The group a row belongs to, or undefined when there is no such row (or the id is not a positive
 * integer), which the role middleware turns into a 404.
 */
export async function groupIdOf(db: Knex, table: GroupOwnedTable, id: number): Promise<number | undefined> {
  if (!Number.isInteger(id) || id <= 0) return undefined;
  const row = (await db(table).where({ id }).first('group_id')) as { group_id: number } | undefined;
  return row?.group_id;
}
