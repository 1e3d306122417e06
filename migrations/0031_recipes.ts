import type { Knex } from 'knex';

/**
 * Recipes and their immutable versions. The param() declarations read from the source are stored with
 * each version, so a form, a sweep or an input check never has to run the script to learn its inputs.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('recipes', (t) => {
    t.increments('id').primary();
    t.integer('group_id').notNullable().references('id').inTable('groups').onDelete('CASCADE');
    t.string('name', 80).notNullable();
    t.integer('latest_version').notNullable();
    t.string('created_at').notNullable();
    t.integer('created_by').nullable().references('id').inTable('users').onDelete('SET NULL');
    t.string('updated_at').notNullable();
    t.integer('updated_by').nullable().references('id').inTable('users').onDelete('SET NULL');
    t.unique(['group_id', 'name']);
  });

  await knex.schema.createTable('recipe_versions', (t) => {
    t.increments('id').primary();
    t.integer('recipe_id').notNullable().references('id').inTable('recipes').onDelete('CASCADE');
    t.integer('version').notNullable();
    t.text('source').notNullable();
    t.string('language', 8).notNullable().defaultTo('ts');
    t.text('description').notNullable().defaultTo('');
    t.text('params_json').notNullable();
    t.text('message').nullable();
    t.integer('restored_from').nullable();
    t.integer('copied_from_recipe_id').nullable();
    t.integer('copied_from_version').nullable();
    t.string('created_at').notNullable();
    t.integer('created_by').nullable().references('id').inTable('users').onDelete('SET NULL');
    t.unique(['recipe_id', 'version']);
  });

  await knex.raw(`
    CREATE TRIGGER recipe_versions_immutable BEFORE UPDATE ON recipe_versions
    BEGIN SELECT RAISE(ABORT, 'recipe versions are immutable'); END;
  `);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw('DROP TRIGGER IF EXISTS recipe_versions_immutable');
  await knex.schema.dropTableIfExists('recipe_versions');
  await knex.schema.dropTableIfExists('recipes');
}
