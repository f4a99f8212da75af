/**
 * Demo seed, INVENTED DATA: three variants of a fictional chain of three shallow lakes (Upper,
 * Middle and Lower Fenn) in the imaginary Fennmoor watershed of seeds/01_demo_workspace.ts. The
 * lakes, their loadings and the comments below are made up to show the product; they describe no
 * real place and no real measurement.
 *
 * Each lake's phosphorus follows the shallow-lake model P' = a - b P + P^8 / (1 + P^8)
 * (Carpenter, Ludwig & Brock 1999, Ecological Applications 9:751-771) with its own loading a;
 * b = 0.6 makes every lake bistable for a in about (-0.111, 0.366) (the two folds of
 * a = bP - P^8/(1+P^8), located numerically). The coupling strength beta is swept.
 *
 * Every variant gets a FINISHED run computed here by the real engine (the same computeTrace the
 * worker threads run, in a child process), a few band tags by the demo modeler and a comment by the demo reviewer, so
 * the product shows real diagrams on first start. Re-runnable: the demo workspace's models are
 * replaced; stored results with the same (document hash, settings, engine version) are reused.
 */
import type { Knex } from 'knex';
import { DEMO } from './01_demo_workspace.ts';
import { checkDocument } from '../src/lib/server/models/document.ts';
import { execFileSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import type { ComputeOutput } from '../src/lib/server/runs/compute.ts';
import { resultRow } from '../src/lib/server/results/row.ts';
import { resultCacheKey } from '../src/lib/server/runs/cache-key.ts';
import { ENGINE_VERSION } from '../src/lib/atlas/engine-version.ts';

const element = { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } };
// Up to 1.2: the two-way variant reaches its strong band (from about beta = 0.52) and the one-way
// variants show their long intermediate band; a width of at most 1.2 keeps the engine's parameter
// step (width / 600) under 0.002, so special points that close are not stepped over (docs/numerics.md).
const sweep = { parameter: 'beta', from: 0, to: 1.2 };
const coupling = { parameter: 'beta', value: 0, term: 'source - target' };

export const DEMO_VARIANTS = [
  {
    name: 'Fenn lakes: downstream flow only',
    description: 'Invented demo. Three lakes in one fictional watershed; water (and phosphorus) flows from Upper to Middle to Lower Fenn only.',
    tags: ['demo', 'lakes', 'one-way'],
    document: {
      format: 'brinkmap/network-1', name: 'Fenn lakes, downstream flow only', element,
      nodes: [{ id: 'upper', parameters: { a: 0.08 } }, { id: 'middle', parameters: { a: 0.06 } }, { id: 'lower', parameters: { a: 0.05 } }],
      links: [{ from: 'upper', to: 'middle', weight: 1 }, { from: 'middle', to: 'lower', weight: 1 }],
      coupling, sweep,
    },
    comment: 'Upper Fenn tipping first and dragging the others along matches what the (invented) field team expected. Check the intermediate band edge against the loading estimate.',
  },
  {
    name: 'Fenn lakes: flow plus groundwater exchange',
    description: 'Invented demo. Same lakes; groundwater exchange makes every link two-way.',
    tags: ['demo', 'lakes', 'two-way'],
    document: {
      format: 'brinkmap/network-1', name: 'Fenn lakes, flow plus groundwater exchange', element,
      nodes: [{ id: 'upper', parameters: { a: 0.08 } }, { id: 'middle', parameters: { a: 0.06 } }, { id: 'lower', parameters: { a: 0.05 } }],
      links: [{ from: 'upper', to: 'middle', weight: 1, twoWay: true }, { from: 'middle', to: 'lower', weight: 1, twoWay: true }],
      coupling, sweep,
    },
    comment: 'With two-way exchange the lower lakes also pull the upper one back; please state the exchange weight assumption in the report.',
  },
  {
    name: 'Fenn lakes: restored upper lake',
    description: 'Invented demo. Downstream flow only, with a lower phosphorus loading on Upper Fenn after a (fictional) restoration.',
    tags: ['demo', 'lakes', 'restoration'],
    document: {
      format: 'brinkmap/network-1', name: 'Fenn lakes, restored upper lake', element,
      nodes: [{ id: 'upper', parameters: { a: 0.02 } }, { id: 'middle', parameters: { a: 0.06 } }, { id: 'lower', parameters: { a: 0.05 } }],
      links: [{ from: 'upper', to: 'middle', weight: 1 }, { from: 'middle', to: 'lower', weight: 1 }],
      coupling, sweep,
    },
    comment: 'The restored loading widens the contained band; worth comparing side by side with the downstream-only variant.',
  },
] as const;

/** computeTrace in a plain ESM child process (see src/worker/compute-once.ts for why). */
function computeInChild(documentText: string, settings: Record<string, unknown>): ComputeOutput {
  const script = fileURLToPath(new URL('../src/worker/compute-once.ts', import.meta.url));
  const stdout = execFileSync(process.execPath, ['--import', 'tsx', script], {
    input: JSON.stringify({ documentText, settings }), maxBuffer: 512 * 1024 * 1024, stdio: ['pipe', 'pipe', 'inherit'],
  });
  const out = JSON.parse(stdout.toString('utf8'));
  return { ...out, diagramBlob: new Uint8Array(Buffer.from(out.diagramBlob, 'base64')) };
}

const TAG_COLOURS = ['#3d7a8c', '#b0623a', '#6b5ca5'];

export async function seed(knex: Knex): Promise<void> {
  const workspaceId = DEMO.workspace.id;
  const modeler = DEMO.users.find((u) => u.role === 'modeler')!;
  const reviewer = DEMO.users.find((u) => u.role === 'reviewer')!;
  // Cascades remove versions, runs, tags and comments; results stay and are reused below.
  await knex('models').where({ workspace_id: workspaceId }).delete();

  for (const variant of DEMO_VARIANTS) {
    const checked = checkDocument(variant.document);
    const settings = {};
    const cacheKey = resultCacheKey('trace', checked.hash, settings, ENGINE_VERSION);
    let result: { id: number; regimes: string; compute_ms: number } | null =
      (await knex('results').where({ cache_key: cacheKey }).first('id', 'regimes', 'compute_ms')) ?? null;
    if (!result) {
      try {
        const out = computeInChild(checked.text, settings);
        // The same row a worker writes (the encoded diagram, docs/storage.md).
        const [id] = await knex('results').insert({ cache_key: cacheKey, ...resultRow(out, ENGINE_VERSION) });
        result = { id, regimes: out.regimesJson, compute_ms: out.computeMs };
      } catch (e) {
        // Never block set-up on the engine: the run is queued instead and the worker computes it on start.
        console.warn(`[seed] computing "${variant.name}" here failed (${(e as Error).message.split('\n')[0]}); queued it for the worker instead`);
      }
    }
    await knex.transaction(async (trx) => {
      const [modelId] = await trx('models').insert({
        workspace_id: workspaceId, name: variant.name, description: variant.description,
        tags: JSON.stringify(variant.tags), created_by: modeler.id, latest_version: 1,
      });
      const [versionId] = await trx('model_versions').insert({
        model_id: modelId, number: 1, format: checked.format, document: checked.text, hash: checked.hash,
        parent_version_id: null, change_note: 'first version (invented demo data)', created_by: modeler.id,
      });
      const base = {
        workspace_id: workspaceId, model_id: modelId, model_version_id: versionId, kind: 'trace',
        settings: JSON.stringify(settings), cache_key: cacheKey, created_by: modeler.id, engine_version: ENGINE_VERSION,
      };
      const [runId] = await trx('runs').insert(result
        ? { ...base, status: 'done', progress: 1, phrase: 'finished (computed by the demo seed)', attempts: 1, result_id: result.id,
            // The run took as long as the seed's computation did, so the runs list shows a real duration.
            started_at: trx.raw('NOW(3) - INTERVAL ? MICROSECOND', [Math.round(Number(result.compute_ms) * 1000)]), finished_at: trx.raw('NOW(3)') }
        : { ...base, status: 'queued', phrase: 'waiting for a worker (queued by the demo seed)' });
      // Tags follow the automatic bands where there are any, so the demo shows both layers together.
      const bands: { from: number; to: number; regime: string }[] = result ? (JSON.parse(result.regimes).regimes ?? []) : [];
      const tagged = bands.length
        ? bands.slice(0, 3).map((b, i) => ({ from: Math.min(b.from, b.to), to: Math.max(b.from, b.to), name: `Field team view: ${b.regime}`, colour: TAG_COLOURS[i % 3], note: 'Invented demo tag beside the automatic label.' }))
        : [{ from: 0, to: 0.1, name: 'Present-day coupling (guess)', colour: TAG_COLOURS[0], note: 'Invented demo tag.' }];
      for (const t of tagged) {
        if (!(t.from < t.to)) continue;
        await trx('band_tags').insert({ workspace_id: workspaceId, run_id: runId, range_from: t.from, range_to: t.to, name: t.name, colour: t.colour, note: t.note, created_by: modeler.id });
      }
      await trx('comments').insert({ workspace_id: workspaceId, run_id: runId, target_kind: 'run', target_ref: null, body: variant.comment, created_by: reviewer.id });
      await trx('audit_log').insert({
        workspace_id: workspaceId, actor_id: modeler.id, action: 'model.create', target_type: 'model', target_id: String(modelId),
        details: JSON.stringify({ name: variant.name, seeded: true, note: 'invented demo data' }),
      });
    });
  }
}
