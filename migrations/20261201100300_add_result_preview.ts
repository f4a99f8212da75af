import type { Knex } from 'knex';

// A drawing preview beside each stored diagram: the same diagram thinned once, at store time, to a
// fixed point budget (special points, regimes and diagnostics complete). Serving it is a pass-through
// of stored text, so the common "draw this run" request never parses a multi-megabyte diagram.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('results', (t) => {
    t.text('preview', 'longtext').nullable();
    t.integer('preview_points').unsigned().nullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable('results', (t) => {
    t.dropColumn('preview_points');
    t.dropColumn('preview');
  });
}
