import type { Knex } from 'knex';

// A workspace is the unit of sharing; every later resource (models, runs, results) belongs to one.
// The role decides what a member may do: owner (members, settings), modeler (models, runs, band
// tags), reviewer (reads, comments, exports).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('workspaces', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.string('id', 32).primary();
    t.string('name', 100).notNullable();
    t.string('created_by', 32).nullable().references('id').inTable('users').onDelete('SET NULL');
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.datetime('updated_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
  });
  await knex.schema.createTable('memberships', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.string('workspace_id', 32).notNullable().references('id').inTable('workspaces').onDelete('CASCADE');
    t.string('user_id', 32).notNullable().references('id').inTable('users').onDelete('CASCADE');
    t.enu('role', ['owner', 'modeler', 'reviewer']).notNullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.primary(['workspace_id', 'user_id']);
    t.index(['user_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('memberships');
  await knex.schema.dropTable('workspaces');
}
