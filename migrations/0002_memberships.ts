import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('memberships', (t) => {
    t.integer('user_id').notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.integer('group_id').notNullable().references('id').inTable('groups').onDelete('CASCADE');
    t.string('role', 16).notNullable().checkIn(['owner', 'editor', 'viewer']);
    t.timestamp('created_at').notNullable().defaultTo(knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ','now'))"));
    t.primary(['user_id', 'group_id']);
    t.index(['group_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('memberships');
}
