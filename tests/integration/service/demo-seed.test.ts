/**
 * The demo seed (seeds/02_demo_models.ts, run by scripts/test.sh as by npm start) leaves the demo
 * workspace with three invented lake variants, each with a finished run whose stored diagram the
 * API serves, band tags and a reviewer comment; seeds/03_demo_escape_studies.ts adds a finished
 * escape study on each, which the API serves with one row per parameter value.
 */
import { readFileSync } from 'node:fs';
import { afterAll, describe, expect, it } from 'vitest';
import { closeDbAfterAll, db } from '../helpers.ts';
import { DEMO } from '../../../seeds/01_demo_workspace.ts';
import { diagramOfResultRow } from '../../../src/lib/server/results/stored-diagram.ts';
import { signedInClient } from '../helpers.ts';
import { ws } from './fixtures.ts';
import type { EscapePoint } from '../../../src/lib/server/escapes/rows.ts';
import { listVersionStudies } from '../../../src/lib/server/escapes/repository.ts';

closeDbAfterAll(afterAll);

describe('seeds/02_demo_models.ts', () => {
  it('three variants, each with a finished run with a stored result, tags and a reviewer comment', async () => {
    // Browser tests add their own models to the demo workspace while this runs: look at the seeded ones.
    const models = await db('models').where({ workspace_id: DEMO.workspace.id }).andWhere('name', 'like', 'Fenn lakes:%').orderBy('id');
    expect(models.map((m) => m.name)).toEqual([
      'Fenn lakes: downstream flow only', 'Fenn lakes: flow plus groundwater exchange', 'Fenn lakes: restored upper lake',
    ]);
    for (const m of models) {
      const run = await db('runs').where({ model_id: m.id, kind: 'trace' }).orderBy('id').first();
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

describe('seeds/03_demo_escape_studies.ts', () => {
  it('a finished escape study on each variant: the API serves one row per stored value with sane counts', async () => {
    const file = JSON.parse(readFileSync('seeds/demo-escape-studies.json', 'utf8')) as { settings: { values: number[]; paths: number; noise: number; seed: number } };
    const modeler = DEMO.users.find((u) => u.role === 'modeler')!;
    const client = await signedInClient(modeler.email, modeler.password);
    const models = await db('models').where({ workspace_id: DEMO.workspace.id }).andWhere('name', 'like', 'Fenn lakes:%').orderBy('id');
    expect(models).toHaveLength(3);
    for (const m of models) {
      // The seeded study: created by the modeler with the file's seed (browser tests start others with other seeds).
      const runs = await db('runs').where({ model_id: m.id, kind: 'escapes', created_by: modeler.id }).orderBy('id');
      const seeded = runs.filter((r) => (typeof r.settings === 'string' ? JSON.parse(r.settings) : r.settings).seed === file.settings.seed);
      expect(seeded, `${m.name}: one seeded escape study`).toHaveLength(1);
      const run = seeded[0];
      expect(run.status, `${m.name}: status`).toBe('done');
      expect(run.model_version_id).toBe((await db('model_versions').where({ model_id: m.id, number: 1 }).first('id')).id);
      const res = await client.get(ws(`/api/runs/${run.id}/escapes`, DEMO.workspace.id));
      expect(res.status, res.text).toBe(200);
      const { study, points } = res.body as { study: { noise: number; valueCount: number; parameter: string } | null; points: EscapePoint[] };
      expect(study, `${m.name}: the study row`).not.toBeNull();
      expect(study!.noise).toBe(file.settings.noise);
      expect(study!.parameter).toBe('beta');
      expect(study!.valueCount).toBe(file.settings.values.length);
      expect(points.map((p) => p.p)).toEqual(file.settings.values);
      for (const pt of points) {
        expect(pt.status, `${m.name} at ${pt.p}`).toBe('done');
        expect(pt.paths).toBe(file.settings.paths);
        // Every path ends in one escape order or at the cap: the orders' counts add up to the paths that escaped at all.
        const escaped = pt.sequences.reduce((s, q) => s + q.count, 0);
        expect(escaped + pt.capped, `${m.name} at ${pt.p}: escaped + capped`).toBeGreaterThanOrEqual(pt.paths);
        expect(escaped).toBeLessThanOrEqual(pt.paths);
        for (const q of pt.sequences) {
          expect(q.probability).toBeCloseTo(q.count / pt.paths, 12);
          expect(q.low).toBeLessThanOrEqual(q.probability);
          expect(q.high).toBeGreaterThanOrEqual(q.probability);
        }
        expect(pt.prediction?.sequences.length, `${m.name} at ${pt.p}: a prediction`).toBeGreaterThan(0);
        expect(pt.barriers.length).toBeGreaterThan(0);
      }
      const csv = await client.get(ws(`/api/runs/${run.id}/escapes.csv`, DEMO.workspace.id));
      expect(csv.status).toBe(200);
      expect(csv.text.split('\n').filter((l) => l.startsWith('value,')).length, `${m.name}: one CSV value line per value`).toBe(file.settings.values.length);
    }
  });

  it('listVersionStudies (the band links) finds the seeded study of each version, in the demo workspace only', async () => {
    const file = JSON.parse(readFileSync('seeds/demo-escape-studies.json', 'utf8')) as { settings: { values: number[]; seed: number } };
    const models = await db('models').where({ workspace_id: DEMO.workspace.id }).andWhere('name', 'like', 'Fenn lakes:%').orderBy('id');
    for (const m of models) {
      const version = await db('model_versions').where({ model_id: m.id, number: 1 }).first('id');
      const runs = await db('runs').where({ model_version_id: version.id, kind: 'escapes', status: 'done' }).select('id', 'settings');
      const seeded = runs.find((r) => (typeof r.settings === 'string' ? JSON.parse(r.settings) : r.settings).seed === file.settings.seed)!;
      const studies = await listVersionStudies(DEMO.workspace.id, version.id);
      const mine = studies.find((s) => s.runId === seeded.id);
      expect(mine, `${m.name}: the seeded study is listed`).toBeTruthy();
      expect(mine!.points.map((p) => p.p)).toEqual(file.settings.values);
      for (const pt of mine!.points) {
        expect(pt.orders.length).toBeGreaterThan(0);
        expect(pt.orders.length).toBeLessThanOrEqual(3);
        const probs = pt.orders.map((o) => o.probability ?? -1);
        expect(probs, 'most probable first').toEqual([...probs].sort((a, b) => b - a));
      }
      // Newest run first; one entry per stored study.
      expect(studies.map((s) => s.runId)).toEqual([...studies.map((s) => s.runId)].sort((a, b) => b - a));
      expect(await listVersionStudies('no-such-workspace-0000', version.id)).toEqual([]);
    }
  });
});
