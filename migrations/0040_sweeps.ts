import type { Knex } from 'knex';

const NOW = "(strftime('%Y-%m-%dT%H:%M:%fZ','now'))";

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('sweeps', (t) => {
    t.increments('id').primary();
    t.integer('group_id').notNullable().references('id').inTable('groups').onDelete('CASCADE');
    t.integer('user_id').notNullable().references('id').inTable('users');
    t.string('title', 200).notNullable();
    // Either a recipe version or a literal script; the source is copied either way so a sweep can
    // be resumed and re-read even if the recipe changes afterwards.
    t.integer('recipe_id').nullable();
    t.integer('recipe_version').nullable();
    t.text('source').notNullable();
    t.string('language', 4).notNullable().checkIn(['ts', 'js']);
    t.text('inputs').notNullable(); // JSON: {name: axis}
    t.text('fixed').notNullable(); // JSON: {name: number}
    t.integer('seed').notNullable();
    t.text('limits').notNullable(); // JSON: the sandbox limits in force when it was created
    t.string('kernel_version', 40).notNullable();
    t.integer('total').notNullable();
    t.integer('completed').notNullable().defaultTo(0);
    t.integer('failed').notNullable().defaultTo(0);
    t.string('status', 12).notNullable().checkIn(['queued', 'running', 'done', 'cancelled', 'failed']);
    t.boolean('notify').notNullable().defaultTo(false);
    t.text('error').nullable();
    t.timestamp('created_at').notNullable().defaultTo(knex.raw(NOW));
    t.timestamp('started_at').nullable();
    t.timestamp('finished_at').nullable();
    t.index(['group_id', 'created_at']);
    t.index(['status']);
  });
  await knex.schema.createTable('sweep_points', (t) => {
    t.integer('sweep_id').notNullable().references('id').inTable('sweeps').onDelete('CASCADE');
    t.integer('idx').notNullable();
    t.string('status', 12).notNullable().checkIn(['done', 'error', 'limit', 'cancelled']);
    t.text('inputs').notNullable(); // JSON
    t.text('values').notNullable(); // JSON: {name: number|null}
    t.text('units').notNullable(); // JSON: {name: unit}
    t.text('error').nullable();
    t.float('duration_ms').notNullable();
    t.primary(['sweep_id', 'idx']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('sweep_points');
  await knex.schema.dropTable('sweeps');
}
