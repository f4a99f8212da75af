/**
 * Demo seed, INVENTED DATA: a finished escape study (run kind 'escapes', docs/noise.md "Escape
 * studies as runs") on the seeded version of each of the three fictional Fenn lake variants of
 * seeds/02_demo_models.ts, so the product shows escape views, band links and the report's escapes
 * section on first start. The lakes and their noise level are made up; no real place or measurement.
 *
 * The rows are the engine's: scripts/demo-escape-studies.ts computed them with the worker's own
 * computeEscapeStudy (paths in one thread) on each variant's diagram and wrote them to
 * seeds/demo-escape-studies.json, because computing them takes minutes. This seed stores them the
 * way the worker does (storeValue per value, then completeEscapeRun on a run it holds), under the
 * cache key of the same (version hash, normalized settings, engine version), with the study row
 * naming the engine version that computed it. When the file does not fit a variant (its document
 * or the settings' normalization changed) the seed computes that study itself in a child process
 * (slow; regenerate the file). Re-runnable: seed 02 replaces the models (and so these runs); stored
 * studies and rows with the same key are reused, not written again, and a variant that has its seeded
 * study already is skipped.
 */
import type { Knex } from 'knex';
import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { DEMO } from './01_demo_workspace.ts';
import { DEMO_VARIANTS } from './02_demo_models.ts';
import { ENGINE_VERSION } from '../src/lib/atlas/engine-version.ts';
import { atlasCacheKey, completeEscapeRun, findStudyId, storeValue } from '../src/lib/server/escapes/repository.ts';
import type { EscapeStudySummary } from '../src/lib/server/escapes/compute.ts';
import type { EscapePointDbRow } from '../src/lib/server/escapes/rows.ts';
import { escapeSettingsSchema, type EscapeSettingsInput } from '../src/lib/server/escapes/schema.ts';
import { normalizeEscapeSettings } from '../src/lib/server/escapes/settings.ts';
import { storedDiagramText } from '../src/lib/server/results/stored-diagram.ts';
import { resultCacheKey } from '../src/lib/server/runs/cache-key.ts';
import { insertOrReuse, type ClaimedRun } from '../src/lib/server/runs/queue.ts';

interface DemoEscapeFile {
  engineVersion: string;
  settings: EscapeSettingsInput;
  studies: { model: string; versionHash: string; cacheKey: string; summary: EscapeStudySummary; points: EscapePointDbRow[] }[];
}

/** The lease owner this seed claims its runs as (completeEscapeRun finishes only a run its owner holds). */
const SEED_OWNER = 'demo-seed';

const readFile = (): DemoEscapeFile => JSON.parse(readFileSync(new URL('./demo-escape-studies.json', import.meta.url), 'utf8'));

/** The study computed here, in a plain ESM child process (the knex CLI cannot load the engine's ODE integrator; see seed 02). */
function computeInChild(documentText: string, diagramJson: string, settings: unknown): { points: EscapePointDbRow[]; summary: EscapeStudySummary } {
  const script = fileURLToPath(new URL('../scripts/demo-escape-studies.ts', import.meta.url));
  const stdout = execFileSync(process.execPath, ['--import', 'tsx', script, '--stdin'], {
    input: JSON.stringify({ documentText, diagramJson, settings }), maxBuffer: 256 * 1024 * 1024, stdio: ['pipe', 'pipe', 'inherit'],
  });
  return JSON.parse(stdout.toString('utf8'));
}

export async function seed(knex: Knex): Promise<void> {
  const file = readFile();
  const workspaceId = DEMO.workspace.id;
  const modeler = DEMO.users.find((u) => u.role === 'modeler')!;
  for (const variant of DEMO_VARIANTS) {
    const model = await knex('models').where({ workspace_id: workspaceId, name: variant.name }).orderBy('id', 'desc').first('id');
    if (!model) continue;
    const version = await knex('model_versions').where({ model_id: model.id, number: 1 }).first('id', 'hash', 'document');
    const document = typeof version.document === 'string' ? JSON.parse(version.document) : version.document;
    const documentText = typeof version.document === 'string' ? version.document : JSON.stringify(version.document);
    const n = normalizeEscapeSettings(document, escapeSettingsSchema.parse(file.settings));

    // The stored rows when the file fits this version and these settings; else computed here, by today's engine.
    const entry = file.studies.find((s) => s.model === variant.name && s.versionHash === version.hash
      && s.cacheKey === resultCacheKey('escapes', version.hash, n.identity, file.engineVersion));
    const engineVersion = entry ? file.engineVersion : ENGINE_VERSION;
    const cacheKey = resultCacheKey('escapes', version.hash, n.identity, engineVersion);
    // The atlas: the seed's trace result of this version (a trace run's key), when today's engine computes the study.
    const atlasKey = atlasCacheKey(version.hash, document, n.atlas);
    const atlas = engineVersion === ENGINE_VERSION ? await knex('results').where({ cache_key: atlasKey }).first('id', 'diagram', 'diagram_blob') : null;
    // Already seeded (this file run again without seed 02): nothing to add.
    if (await knex('runs').where({ model_version_id: version.id, kind: 'escapes', cache_key: cacheKey, created_by: modeler.id, status: 'done' }).andWhere('phrase', 'like', '%by the demo seed)').first('id')) continue;
    let studyId = await findStudyId(cacheKey, knex);
    let computed: { points: EscapePointDbRow[]; summary: EscapeStudySummary } | null = entry ?? null;
    if (studyId === null && !computed) {
      if (!atlas) {
        console.warn(`[seed] no stored diagram of "${variant.name}" to stand an escape study on; none seeded`);
        continue;
      }
      console.warn(`[seed] seeds/demo-escape-studies.json does not fit "${variant.name}"; computing its escape study here (slow: regenerate the file with node --import tsx scripts/demo-escape-studies.ts)`);
      try {
        computed = computeInChild(documentText, storedDiagramText({ blob: atlas.diagram_blob, text: atlas.diagram }, 'full'), n.stored);
      } catch (e) {
        console.warn(`[seed] computing the escape study of "${variant.name}" failed (${(e as Error).message.split('\n')[0]}); none seeded`);
        continue;
      }
    }
    const computeMs = computed?.summary.computeMs ?? Number((await knex('escape_studies').where({ id: studyId }).first('compute_ms'))?.compute_ms ?? 0);

    // A run this seed holds, finished the way the worker finishes one.
    const [runId] = await knex('runs').insert({
      workspace_id: workspaceId, model_id: model.id, model_version_id: version.id, kind: 'escapes',
      settings: JSON.stringify(n.stored), cache_key: cacheKey, created_by: modeler.id, engine_version: engineVersion,
      status: 'running', attempts: 1, lease_owner: SEED_OWNER, lease_expires_at: knex.raw('DATE_ADD(NOW(3), INTERVAL 10 MINUTE)'),
      phrase: 'stored by the demo seed', started_at: knex.raw('NOW(3) - INTERVAL ? MICROSECOND', [Math.round(computeMs * 1000)]),
    });
    const run = { id: runId, workspaceId, modelId: model.id, versionId: version.id, kind: 'escapes', versionHash: version.hash, cacheKey,
      settings: n.stored, attempt: 1, documentText, createdBy: modeler.id, notify: false } as unknown as ClaimedRun;
    if (studyId === null && computed) {
      for (const row of computed.points) await storeValue(cacheKey, row, knex);
      if (engineVersion !== ENGINE_VERSION) {
        // completeEscapeRun writes today's engine version; a study of an earlier engine keeps its own.
        const s = computed.summary;
        studyId = (await insertOrReuse(knex, 'escape_studies', cacheKey, {
          engine_version: engineVersion, atlas_result_id: null, parameter: s.parameter, noise: s.noise, start: s.start, value_count: s.valueCount,
          exit_switches: JSON.stringify(s.exitSwitches), band_edges: JSON.stringify(s.bandEdges), diagnostics: JSON.stringify(s.diagnostics), compute_ms: s.computeMs,
        })).id;
      }
    }
    const ok = studyId === null && computed
      ? await completeEscapeRun(run, SEED_OWNER, computed.summary, atlas?.id ?? null, knex)
      : await completeEscapeRun(run, SEED_OWNER, { reuse: studyId! }, null, knex);
    if (!ok) throw new Error(`seed: could not finish the demo escape run ${runId}`);
    // Seeded, not reused from another run: say where it came from (the stored study may be reused across re-seeds).
    await knex('runs').where({ id: runId }).update({ reused: false, phrase: `finished (${entry ? 'stored' : 'computed'} by the demo seed)` });
  }
}
