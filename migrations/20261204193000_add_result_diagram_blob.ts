import type { Knex } from 'knex';
import { decodeDiagram, decodeDiagramText } from '../src/lib/storage/index.ts';
import { thinDiagram } from '../src/lib/server/results/thin.ts';
import { PREVIEW_POINTS } from '../src/lib/server/results/preview.ts';

// Issue 12, goal 2: a result's diagram stored compactly (docs/storage.md): point data as Float64
// columns, deflated, behind a versioned header, in one binary column. New rows leave `diagram` and
// `preview` NULL (the preview is thinned from the decoded diagram when it is read); rows written
// before keep their JSON text and are read as they are.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable('results', (t) => {
    t.specificType('diagram_blob', 'LONGBLOB').nullable();
  });
  await knex.schema.alterTable('results', (t) => {
    t.text('diagram', 'longtext').nullable().alter();
  });
}

// Writes every encoded diagram back as JSON text (and its preview) before the column goes, so the
// rows read as they did before this migration.
export async function down(knex: Knex): Promise<void> {
  const ids = (await knex('results').whereNull('diagram').select('id')).map((r) => r.id as number);
  for (const id of ids) {
    const row = await knex('results').where({ id }).first('diagram_blob');
    const bytes = new Uint8Array(row.diagram_blob);
    const text = decodeDiagramText(bytes);
    const diagram = decodeDiagram(bytes);
    const points = diagram.branches.reduce((n, b) => n + b.points.length, 0);
    const preview = points > PREVIEW_POINTS ? JSON.stringify(thinDiagram(diagram, PREVIEW_POINTS)) : text;
    await knex('results').where({ id }).update({ diagram: text, preview });
  }
  await knex.schema.alterTable('results', (t) => {
    t.text('diagram', 'longtext').notNullable().alter();
  });
  await knex.schema.alterTable('results', (t) => {
    t.dropColumn('diagram_blob');
  });
}
