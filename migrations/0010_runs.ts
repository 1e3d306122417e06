import type { Knex } from 'knex';

/**
 * Every execution of a script, with what produced it: the exact source and its SHA-256, the notebook or
 * recipe version, parameters, seed, the limits in force and the kernel version, so a result can be
 * traced and repeated.
 */
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('runs', (t) => {
    t.increments('id').primary();
    t.integer('user_id').nullable().references('id').inTable('users').onDelete('SET NULL');
    t.integer('group_id').nullable().references('id').inTable('groups').onDelete('CASCADE');
    t.string('status', 16).notNullable();
    t.string('language', 8).notNullable();
    t.text('source').notNullable();
    t.string('source_hash', 64).notNullable();
    t.integer('notebook_id').nullable();
    t.integer('notebook_version').nullable();
    t.string('block_id', 100).nullable();
    t.integer('recipe_id').nullable();
    t.integer('recipe_version').nullable();
    t.text('params').notNullable(); // JSON object
    t.integer('seed').notNullable();
    t.text('limits').notNullable(); // JSON SandboxLimits
    t.string('kernel_version', 64).notNullable();
    t.text('outputs').notNullable().defaultTo('[]'); // JSON OutputItem[]
    t.text('logs').notNullable().defaultTo('[]'); // JSON string[]
    t.text('declared_params').notNullable().defaultTo('[]'); // JSON ParamDeclaration[]
    t.text('error').nullable(); // JSON {message, line?, column?, limit?}
    t.string('error_limit', 32).nullable(); // error.limit again, for counting stops by limit
    t.integer('kernel_calls').notNullable().defaultTo(0);
    t.float('duration_ms').nullable();
    t.float('cpu_ms').nullable();
    t.string('created_at').notNullable().defaultTo(knex.raw("(strftime('%Y-%m-%dT%H:%M:%fZ','now'))"));
    t.string('finished_at').nullable();
    t.index(['group_id', 'id']);
    t.index(['notebook_id', 'block_id']);
    t.index(['recipe_id']);
    t.index(['user_id', 'status']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTableIfExists('runs');
}
