import type { Knex } from 'knex';

/**
 * A versioned resource joined to its latest immutable version: `datasets as d` with
 * `dataset_versions as v`, or `recipes as r` with `recipe_versions as v`, restricted to one group.
 */
export function latestVersionsOf(db: Knex, resource: 'datasets' | 'recipes', groupId: number): Knex.QueryBuilder {
  const [a, fk] = resource === 'datasets' ? ['d', 'dataset_id'] : ['r', 'recipe_id'];
  const versions = resource === 'datasets' ? 'dataset_versions' : 'recipe_versions';
  return db(`${resource} as ${a}`)
    .join(`${versions} as v`, function () {
      this.on(`v.${fk}`, '=', `${a}.id`).andOn('v.version', '=', `${a}.latest_version`);
    })
    .where(`${a}.group_id`, groupId);
}
