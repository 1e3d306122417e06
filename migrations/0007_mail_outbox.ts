import type { Knex } from 'knex';

export async function up(knex: Knex): Promise<void> {
  // Every message the local catcher received over SMTP, as parsed from the wire.
  await knex.schema.createTable('mail_outbox', (t) => {
    t.increments('id').primary();
    t.string('message_id', 500).nullable();
    t.string('from_addr', 500).notNullable().defaultTo('');
    t.string('to_addr', 2000).notNullable();
    t.string('subject', 1000).notNullable().defaultTo('');
    t.text('text').notNullable().defaultTo('');
    t.text('html').nullable();
    t.timestamp('created_at').notNullable().defaultTo(knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ','now'))"));
    t.index(['created_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('mail_outbox');
}
