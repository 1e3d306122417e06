import type { Knex } from 'knex';

/**
 * Notebooks and their versions. A version row is never changed once written (the triggers refuse
 * it), so a run that records (notebook_id, notebook_version) can always be traced to its exact source.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('notebooks', (t) => {
    t.increments('id').primary();
    t.integer('group_id').notNullable().references('id').inTable('groups').onDelete('CASCADE');
    t.string('title', 200).notNullable();
    t.integer('owner_id').notNullable().references('id').inTable('users');
    t.integer('current_version').notNullable();
    t.string('created_at').notNullable();
    t.string('updated_at').notNullable();
    t.index(['group_id', 'updated_at']);
  });

  await knex.schema.createTable('notebook_versions', (t) => {
    t.integer('notebook_id').notNullable().references('id').inTable('notebooks').onDelete('CASCADE');
    t.integer('n').notNullable();
    t.string('title', 200).notNullable();
    t.text('blocks').notNullable();
    t.string('message', 500).notNullable().defaultTo('');
    t.integer('author_id').notNullable().references('id').inTable('users');
    t.string('created_at').notNullable();
    t.primary(['notebook_id', 'n']);
  });

  // Immutability is a property of the data, not of the service code that happens to write it.
  await knex.raw(`
    CREATE TRIGGER notebook_versions_no_update
    BEFORE UPDATE ON notebook_versions
    BEGIN
      SELECT RAISE(ABORT, 'notebook versions are immutable');
    END;
  `);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP TRIGGER IF EXISTS notebook_versions_no_update');
  await knex.schema.dropTableIfExists('notebook_versions');
  await knex.schema.dropTableIfExists('notebooks');
}
