import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('invitations', (t) => {
    t.increments('id').primary();
    // SHA-256 of the token in the link; the token itself is never stored.
    t.string('token_hash', 64).notNullable().unique();
    t.string('email', 320).notNullable();
    t.string('site_role', 16).notNullable().defaultTo('member').checkIn(['admin', 'member']);
    t.integer('group_id').nullable().references('id').inTable('groups').onDelete('CASCADE');
    t.string('group_role', 16).nullable().checkIn(['owner', 'editor', 'viewer']);
    t.integer('invited_by').nullable().references('id').inTable('users').onDelete('SET NULL');
    t.timestamp('created_at').notNullable().defaultTo(knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ','now'))"));
    t.timestamp('expires_at').notNullable();
    t.timestamp('accepted_at').nullable();
    t.integer('accepted_user_id').nullable().references('id').inTable('users').onDelete('SET NULL');
    t.index(['email']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('invitations');
}
