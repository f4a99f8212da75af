import type { Knex } from 'knex';

// Runs are the job queue: a worker claims a queued row with SELECT ... FOR UPDATE SKIP LOCKED and
// holds a lease (lease_expires_at, renewed by its heartbeat); an expired lease makes the run
// claimable again until max_attempts is used up. Results are immutable and keyed by
// (model version hash, settings, engine version), so runs with the same key share one result row.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('results', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.increments('id').primary();
    t.specificType('cache_key', 'CHAR(64)').notNullable().unique();
    t.string('engine_version', 64).notNullable();
    // One diagram in one row: see docs/architecture.md ("Storing results") for the measurement.
    t.text('diagram', 'longtext').notNullable();
    t.text('regimes', 'longtext').notNullable();
    t.integer('branch_count').unsigned().notNullable();
    t.integer('point_count').unsigned().notNullable();
    t.integer('special_point_count').unsigned().notNullable();
    t.integer('compute_ms').unsigned().notNullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
  });
  await knex.schema.createTable('runs', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.increments('id').primary();
    t.string('workspace_id', 32).notNullable().references('id').inTable('workspaces').onDelete('CASCADE');
    t.integer('model_id').unsigned().notNullable().references('id').inTable('models').onDelete('CASCADE');
    t.integer('model_version_id').unsigned().notNullable().references('id').inTable('model_versions').onDelete('CASCADE');
    t.string('kind', 32).notNullable().defaultTo('trace');
    t.json('settings').notNullable();
    t.specificType('cache_key', 'CHAR(64)').notNullable();
    t.string('queue', 64).notNullable().defaultTo('default');
    t.enu('status', ['queued', 'running', 'done', 'failed', 'cancelled']).notNullable().defaultTo('queued');
    t.double('progress').notNullable().defaultTo(0);
    t.string('phrase', 200).notNullable().defaultTo('');
    t.string('created_by', 32).nullable().references('id').inTable('users').onDelete('SET NULL');
    t.boolean('notify').notNullable().defaultTo(false);
    t.integer('attempts').unsigned().notNullable().defaultTo(0);
    t.integer('max_attempts').unsigned().notNullable().defaultTo(3);
    t.string('lease_owner', 128).nullable();
    t.datetime('lease_expires_at', { precision: 3 }).nullable();
    t.datetime('heartbeat_at', { precision: 3 }).nullable();
    t.boolean('cancel_requested').notNullable().defaultTo(false);
    t.string('engine_version', 64).notNullable();
    t.integer('result_id').unsigned().nullable().references('id').inTable('results').onDelete('SET NULL');
    t.boolean('reused').notNullable().defaultTo(false);
    t.json('error').nullable();
    t.datetime('queued_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.datetime('started_at', { precision: 3 }).nullable();
    t.datetime('finished_at', { precision: 3 }).nullable();
    t.index(['status', 'queue', 'queued_at']);
    t.index(['status', 'lease_expires_at']);
    t.index(['workspace_id', 'queued_at']);
    t.index(['model_id', 'queued_at']);
    t.index(['cache_key']);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable('runs');
  await knex.schema.dropTable('results');
}
