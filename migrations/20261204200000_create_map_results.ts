import type { Knex } from 'knex';

// Two-parameter maps (run kind 'map', docs/maps.md "Maps in the workspace"). One row per distinct
// computation (the run's cache key): the map as deflated JSON in one blob (curves of a few thousand
// points each compress about 3-4x) and the counts the run page shows without inflating it. Runs
// point at it through map_result_id; a run of identical inputs reuses the row.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('map_results', (t) => {
    t.engine('InnoDB');
    t.charset('utf8mb4');
    t.collate('utf8mb4_unicode_ci');
    t.increments('id').primary();
    t.specificType('cache_key', 'CHAR(64)').notNullable().unique();
    t.string('engine_version', 64).notNullable();
    t.string('second_parameter', 200).notNullable();
    /** The document's own value of the second parameter (where the one-parameter diagram cuts the map). */
    t.double('second_value').notNullable();
    t.integer('curve_count').unsigned().notNullable();
    t.integer('curve_point_count').unsigned().notNullable();
    t.integer('point_count').unsigned().notNullable();
    t.integer('json_bytes').unsigned().notNullable();
    t.specificType('map_blob', 'LONGBLOB').notNullable();
    t.integer('compute_ms').unsigned().notNullable();
    t.datetime('created_at', { precision: 3 }).notNullable().defaultTo(knex.raw('CURRENT_TIMESTAMP(3)'));
  });
  await knex.schema.alterTable('runs', (t) => {
    t.integer('map_result_id').unsigned().nullable().references('id').inTable('map_results').onDelete('SET NULL');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('runs', (t) => {
    t.dropForeign(['map_result_id']);
    t.dropColumn('map_result_id');
  });
  await knex.schema.dropTable('map_results');
}
