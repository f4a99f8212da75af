import type { Knex } from 'knex';

// Escape studies (run kind 'escapes', docs/noise.md "Escape studies as runs"). One compact row per
// parameter value in escape_points, written as soon as that value is computed and keyed by the
// run's cache key, so a retried run (or another run of identical inputs) resumes where the last
// attempt stopped. The study row (exit switches, band edges, diagnostics) is written when the last
// value is done; runs point at it through escape_study_id. Trace results stay in `results`.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('escape_studies', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.increments('id').primary();
    t.specificType('cache_key', 'CHAR(64)').notNullable().unique();
    t.string('engine_version', 64).notNullable();
    /** The trace result (atlas of the same version and sweep) the study was computed on. */
    t.integer('atlas_result_id').unsigned().nullable().references('id').inTable('results').onDelete('SET NULL');
    t.string('parameter', 200).notNullable();
    t.double('noise').notNullable();
    t.string('start', 16).notNullable();
    t.integer('value_count').unsigned().notNullable();
    t.text('exit_switches').notNullable();
    t.text('band_edges').notNullable();
    t.text('diagnostics').notNullable();
    t.integer('compute_ms').unsigned().notNullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
  });
  await knex.schema.createTable('escape_points', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.increments('id').primary();
    t.specificType('cache_key', 'CHAR(64)').notNullable();
    t.integer('idx').unsigned().notNullable();
    t.double('p').notNullable();
    t.enu('status', ['done', 'skipped']).notNullable();
    t.string('reason', 500).nullable();
    t.integer('paths').unsigned().notNullable().defaultTo(0);
    t.double('dt').nullable();
    t.double('t_max').nullable();
    t.bigInteger('seed').unsigned().nullable();
    t.double('node_steps').notNullable().defaultTo(0);
    t.integer('capped').unsigned().notNullable().defaultTo(0);
    t.integer('returns').unsigned().notNullable().defaultTo(0);
    t.integer('paths_with_returns').unsigned().notNullable().defaultTo(0);
    // Small JSON arrays, a few hundred bytes to a few kB each (see src/lib/server/escapes/rows.ts).
    t.text('sequences').notNullable();
    t.text('escape_times').notNullable();
    t.text('between').notNullable();
    t.text('prediction').notNullable();
    t.text('barriers').notNullable();
    t.text('step_check').nullable();
    t.text('estimate').nullable();
    t.text('diagnostics').notNullable();
    t.integer('compute_ms').unsigned().notNullable().defaultTo(0);
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
    t.unique(['cache_key', 'idx']);
  });
  await knex.schema.alterTable('runs', (t) => {
    t.integer('escape_study_id').unsigned().nullable().references('id').inTable('escape_studies').onDelete('SET NULL');
    // Structured progress beside `progress`/`phrase`: for escape runs, paths done per parameter value.
    t.text('progress_detail').nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('runs', (t) => {
    t.dropForeign(['escape_study_id']);
    t.dropColumn('escape_study_id');
    t.dropColumn('progress_detail');
  });
  await knex.schema.dropTable('escape_points');
  await knex.schema.dropTable('escape_studies');
}
