import type { Knex } from 'knex';

/** Per-group overrides of the site-wide sandbox limits: one row per overridden field. */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('group_limits', (t) => {
    t.integer('group_id').notNullable().references('id').inTable('groups').onDelete('CASCADE');
    t.string('name', 32).notNullable();
    t.integer('value').notNullable();
    t.string('updated_at').notNullable().defaultTo(knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ','now'))"));
    t.integer('updated_by').nullable().references('id').inTable('users').onDelete('SET NULL');
    t.primary(['group_id', 'name']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('group_limits');
}
