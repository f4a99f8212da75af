import type { Knex } from 'knex';

// A trace run computed at one clicked value of a map's second parameter (docs/maps.md, "From the map
// back to one parameter") points at the map run it was cut from. Nullable and additive: existing runs
// keep NULL; deleting the map run leaves its slices as ordinary trace runs (their settings still hold
// the overridden value, so their labels stay right).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('runs', (t) => {
    t.integer('slice_of_run_id').unsigned().nullable().references('id').inTable('runs').onDelete('SET NULL');
    t.index(['slice_of_run_id', 'cache_key'], 'runs_slice_of_cache_key');
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('runs', (t) => {
    t.dropForeign(['slice_of_run_id']);
    t.dropIndex(['slice_of_run_id', 'cache_key'], 'runs_slice_of_cache_key');
    t.dropColumn('slice_of_run_id');
  });
}
