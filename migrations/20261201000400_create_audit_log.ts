import type { Knex } from 'knex';

// Who changed what, append-only. No foreign keys on purpose: the record outlives the users,
// workspaces and objects it names.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('audit_log', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.bigIncrements('id').primary();
    t.string('workspace_id', 32).nullable();
    t.string('actor_id', 32).nullable();
    t.string('action', 64).notNullable();
    t.string('target_type', 32).nullable();
    t.string('target_id', 64).nullable();
    t.json('details').nullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.index(['workspace_id', 'created_at']);
    t.index(['actor_id']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('audit_log');
}
