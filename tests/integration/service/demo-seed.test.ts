/**
 * The demo seed (seeds/02_demo_models.ts, run by scripts/test.sh as by npm start) leaves the demo
 * workspace with three invented lake variants, each with a finished run whose stored diagram the
 * API serves, band tags and a reviewer comment.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { closeDbAfterAll, db } from '../helpers.ts';
import { DEMO } from '../../../seeds/01_demo_workspace.ts';
import { diagramOfResultRow } from '../../../src/lib/server/results/stored-diagram.ts';

closeDbAfterAll(afterAll);

describe('seeds/02_demo_models.ts', () => {
  it('three variants, each with a finished run with a stored result, tags and a reviewer comment', async () => {
    // Browser tests add their own models to the demo workspace while this runs: look at the seeded ones.
    const models = await db('models').where({ workspace_id: DEMO.workspace.id }).andWhere('name', 'like', 'Fenn lakes:%').orderBy('id');
    expect(models.map((m) => m.name)).toEqual([
      'Fenn lakes: downstream flow only', 'Fenn lakes: flow plus groundwater exchange', 'Fenn lakes: restored upper lake',
    ]);
    for (const m of models) {
      const run = await db('runs').where({ model_id: m.id }).first();
      expect(run.status, `${m.name}: run status`).toBe('done');
      const result = await db('results').where({ id: run.result_id }).first();
      expect(result.diagram_blob, `${m.name}: the seed stores the encoded diagram (docs/storage.md)`).toBeTruthy();
      const diagram = diagramOfResultRow(result);
      expect(diagram.variables).toEqual(['upper', 'middle', 'lower']);
      expect(diagram.branches.length).toBeGreaterThan(0);
      expect(Number((await db('band_tags').where({ run_id: run.id }).count({ n: '*' }))[0].n)).toBeGreaterThan(0);
      const reviewer = DEMO.users.find((u) => u.role === 'reviewer')!;
      expect(await db('comments').where({ run_id: run.id, created_by: reviewer.id }).first()).toBeTruthy();
    }
  });
});
