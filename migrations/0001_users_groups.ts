import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('users', (t) => {
    t.increments('id').primary();
    // Stored lower-cased by the services; uniqueness is therefore case-insensitive.
    t.string('email', 320).notNullable().unique();
    t.string('name', 200).notNullable();
    t.string('password_hash', 255).notNullable();
    t.string('role', 16).notNullable().defaultTo('member').checkIn(['admin', 'member']);
    t.boolean('disabled').notNullable().defaultTo(false);
    // Bumped on password change and disabling so that sessions issued before stop working.
    t.integer('session_version').notNullable().defaultTo(0);
    t.timestamp('created_at').notNullable().defaultTo(knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ','now'))"));
  });
  await knex.schema.createTable('groups', (t) => {
    t.increments('id').primary();
    t.string('name', 200).notNullable();
    t.timestamp('created_at').notNullable().defaultTo(knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ','now'))"));
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('groups');
  await knex.schema.dropTable('users');
}
