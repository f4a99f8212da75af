import type { Knex } from 'knex';

// Manual band tags (modelers) and review comments (reviewers), both attached to a run. Automatic
// regime labels live in the result and are never overwritten; tags are stored beside them.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('band_tags', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.increments('id').primary();
    t.string('workspace_id', 32).notNullable().references('id').inTable('workspaces').onDelete('CASCADE');
    t.integer('run_id').unsigned().notNullable().references('id').inTable('runs').onDelete('CASCADE');
    t.double('range_from').notNullable();
    t.double('range_to').notNullable();
    t.string('name', 100).notNullable();
    t.specificType('colour', 'CHAR(7)').notNullable();
    t.string('note', 2000).notNullable();
    t.string('created_by', 32).nullable().references('id').inTable('users').onDelete('SET NULL');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.index(['run_id']);
  });
  await knex.schema.createTable('comments', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.increments('id').primary();
    t.string('workspace_id', 32).notNullable().references('id').inTable('workspaces').onDelete('CASCADE');
    t.integer('run_id').unsigned().notNullable().references('id').inTable('runs').onDelete('CASCADE');
    // What the comment is about: the whole run, one regime band (its index) or one special point (its id).
    t.enu('target_kind', ['run', 'band', 'special-point']).notNullable();
    t.string('target_ref', 64).nullable();
    t.text('body').notNullable();
    t.string('created_by', 32).nullable().references('id').inTable('users').onDelete('SET NULL');
    t.datetime('resolved_at', { precision: 3 }).nullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.index(['run_id']);
    t.index(['workspace_id', 'resolved_at']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('comments');
  await knex.schema.dropTable('band_tags');
}
