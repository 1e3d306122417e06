import type { Knex } from 'knex';

/**
 * Datasets and their immutable versions. A version keeps both the parsed table (what scripts read) and
 * the original CSV text (what the member uploaded, downloadable as it was), so a rerun years later can
 * be traced to the exact bytes.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('datasets', (t) => {
    t.increments('id').primary();
    t.integer('group_id').notNullable().references('id').inTable('groups').onDelete('CASCADE');
    t.string('name', 80).notNullable();
    t.integer('latest_version').notNullable();
    t.string('created_at').notNullable();
    t.integer('created_by').nullable().references('id').inTable('users').onDelete('SET NULL');
    t.string('updated_at').notNullable();
    t.unique(['group_id', 'name']);
  });

  await knex.schema.createTable('dataset_versions', (t) => {
    t.increments('id').primary();
    t.integer('dataset_id').notNullable().references('id').inTable('datasets').onDelete('CASCADE');
    t.integer('version').notNullable();
    t.string('kind', 32).notNullable();
    t.text('description').notNullable().defaultTo('');
    t.text('columns_json').notNullable();
    t.text('rows_json').notNullable();
    t.integer('row_count').notNullable();
    t.text('csv_text').notNullable();
    t.text('covariance_json').nullable();
    t.text('covariance_csv').nullable();
    t.integer('copied_from_dataset_id').nullable();
    t.integer('copied_from_version').nullable();
    t.string('created_at').notNullable();
    t.integer('created_by').nullable().references('id').inTable('users').onDelete('SET NULL');
    t.unique(['dataset_id', 'version']);
  });

  // Versions are immutable: the database refuses an UPDATE, so no code path can rewrite history.
  await knex.raw(`
    CREATE TRIGGER dataset_versions_immutable BEFORE UPDATE ON dataset_versions
    BEGIN SELECT RAISE(ABORT, 'dataset versions are immutable'); END;
  `);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP TRIGGER IF EXISTS dataset_versions_immutable');
  await knex.schema.dropTableIfExists('dataset_versions');
  await knex.schema.dropTableIfExists('datasets');
}
