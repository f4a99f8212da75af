/**
 * Makes seeds/demo-escape-studies.json: the demo workspace's escape studies (INVENTED DEMO DATA, the
 * fictional Fenn lakes of seeds/02_demo_models.ts), one per lake variant, computed by the engine
 * exactly as the worker computes an escape run with threads = 1: the variant's diagram by
 * computeTrace (the seed's trace run: no settings), then computeEscapeStudy
 * (src/lib/server/escapes/compute.ts) with the paths simulated in this thread by
 * simulateEscapePaths (as src/worker/compute-task.ts does), every value as its escape_points row.
 * seeds/03_demo_escape_studies.ts stores these rows. Computing them takes a few minutes (mostly the
 * exit switches over the range), too slow for every `npm test` set-up, hence the file.
 *
 *   node --import tsx scripts/demo-escape-studies.ts           writes the file (after an engine version change)
 *   node --import tsx scripts/demo-escape-studies.ts --stdin   one study: { documentText, diagramJson, settings } on
 *                                                              stdin, { points, summary } on stdout (the seed's
 *                                                              fallback when the file does not fit the demo models)
 */
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { DEMO_VARIANTS } from '../seeds/02_demo_models.ts';
import { ENGINE_VERSION } from '../src/lib/atlas/engine-version.ts';
import { compileModelJson } from '../src/lib/model/index.ts';
import { simulateEscapePaths } from '../src/lib/noise/monte-carlo.ts';
import { computeEscapeStudy, type EscapeStudySummary } from '../src/lib/server/escapes/compute.ts';
import type { EscapePointDbRow } from '../src/lib/server/escapes/rows.ts';
import { escapeSettingsSchema, type EscapeSettingsInput, type StoredEscapeSettings } from '../src/lib/server/escapes/schema.ts';
import { normalizeEscapeSettings } from '../src/lib/server/escapes/settings.ts';
import { checkDocument } from '../src/lib/server/models/document.ts';
import { resultCacheKey } from '../src/lib/server/runs/cache-key.ts';
import { computeTrace } from '../src/lib/server/runs/compute.ts';
import { decodeDiagramText } from '../src/lib/storage/index.ts';

/**
 * The demo studies' settings (invented): five couplings across the variants' bands (weak near 0.05,
 * the two-way variant's second weak band at 0.4, strong above 1.1 where the two-way and restored
 * variants have one), 300 paths each, a fixed seed; the step and the time cap are the worker's
 * defaults. Seed 11 differs from the e2e tests' seeds, so their studies are computed, not reused.
 */
export const DEMO_ESCAPE_SETTINGS: EscapeSettingsInput = { noise: 0.45, start: 'all-base', values: [0.05, 0.25, 0.4, 0.7, 1.15], paths: 300, seed: 11 };

export interface DemoEscapeFile {
  note: string;
  engineVersion: string;
  settings: EscapeSettingsInput;
  studies: { model: string; versionHash: string; cacheKey: string; summary: EscapeStudySummary; points: EscapePointDbRow[] }[];
}

/** One study in this thread, as a worker thread with threads = 1 computes it. */
export async function computeDemoStudy(documentText: string, diagramJson: string, settings: StoredEscapeSettings) {
  const system = compileModelJson(JSON.parse(documentText));
  const points: EscapePointDbRow[] = [];
  const out = await computeEscapeStudy(documentText, diagramJson, settings, [],
    async (setup, run) => simulateEscapePaths(system, setup, { dt: run.dt, tMax: run.tMax, seed: run.seed, count: run.count }),
    { onProgress: () => undefined, isCancelled: () => false, onPoint: (row) => { points.push(row); } });
  if (!out.summary) throw new Error('the study ended without a summary');
  return { points, summary: out.summary };
}

async function readStdin(): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const c of process.stdin) chunks.push(c as Buffer);
  return Buffer.concat(chunks).toString('utf8');
}

async function main(): Promise<void> {
  if (process.argv.includes('--stdin')) {
    const input = JSON.parse(await readStdin()) as { documentText: string; diagramJson: string; settings: StoredEscapeSettings };
    process.stdout.write(JSON.stringify(await computeDemoStudy(input.documentText, input.diagramJson, input.settings)));
    return;
  }
  const file: DemoEscapeFile = {
    note: 'INVENTED DEMO DATA: escape studies of the fictional Fenn lakes (seeds/02_demo_models.ts), computed by scripts/demo-escape-studies.ts; no real place or measurement.',
    engineVersion: ENGINE_VERSION, settings: DEMO_ESCAPE_SETTINGS, studies: [],
  };
  for (const variant of DEMO_VARIANTS) {
    const t0 = performance.now();
    const checked = checkDocument(variant.document);
    const trace = computeTrace(checked.text, {}, { onProgress: () => undefined, isCancelled: () => false });
    const n = normalizeEscapeSettings(JSON.parse(checked.text), escapeSettingsSchema.parse(DEMO_ESCAPE_SETTINGS));
    const study = await computeDemoStudy(checked.text, decodeDiagramText(trace.diagramBlob), n.stored);
    file.studies.push({ model: variant.name, versionHash: checked.hash, cacheKey: resultCacheKey('escapes', checked.hash, n.identity, ENGINE_VERSION), ...study });
    console.error(`${variant.name}: ${study.points.length} values in ${Math.round(performance.now() - t0)} ms`);
  }
  const out = fileURLToPath(new URL('../seeds/demo-escape-studies.json', import.meta.url));
  writeFileSync(out, `${JSON.stringify(file, null, 1)}\n`);
  console.error(`wrote ${out}`);
}

await main();
