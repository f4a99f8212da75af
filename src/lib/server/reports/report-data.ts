/**
 * Everything the printable report shows for the chosen runs, read in the workspace of the caller:
 * the stored diagram and bands, the band tags, the model document of the run's exact version
 * (equations, parameters, network), the open review comments, and the finished runs to choose from.
 */
import { overrideNote } from '../../plot/run-override.ts';
import { getRunResult } from '../results/repository.ts';
import { listBandTags, listComments, type StoredComment } from '../reviews/repository.ts';
import { getVersionById } from '../models/repository.ts';
import { listRuns, type RunInfo } from '../runs/repository.ts';
import { modelDocumentSchema } from '../../model/schema.ts';
import type { Diagram } from '../../atlas/types.ts';
import type { RegimeBand } from '../../regimes/types.ts';
import { describeModel, type ModelDescription } from './model-description.ts';
import { getRunEscapes, type StoredEscapeStudy } from '../escapes/repository.ts';
import { getRunMap, type StoredRunMap } from '../maps/repository.ts';

/** At most this many runs in one report. */
export const REPORT_MAX_RUNS = 8;

export interface ReportRun {
  run: RunInfo;
  engineVersion: string;
  resultCreatedAt: string;
  diagram: Diagram;
  regimes: RegimeBand[];
  tags: { from: number; to: number; name: string; colour: string; note: string }[];
  /** Null when the stored document no longer parses (it was valid when stored; never expected). */
  model: ModelDescription | null;
  /** Names of the state components in the order of a special point's state: node ids for a network. */
  stateNames: string[];
  openComments: StoredComment[];
  /** The newest finished escape study of the same model version (docs/noise.md, "Views of an escape study"), or null. */
  escapes: StoredEscapeStudy | null;
  /** The newest finished two-parameter map of the same model version (docs/maps.md, "Maps in the workspace"), or null. */
  map: StoredRunMap | null;
}

export interface ReportChoice { id: number; modelId: number; modelName: string; versionNumber: number; finishedAt: string | null
  /** A slice of a map (a parameter overridden for the run): src/lib/plot/run-override.ts. */
  override?: string | null;
}

/** Run ids from ?runs=1,2 and repeated runs= parameters: positive integers, first occurrence kept, at most REPORT_MAX_RUNS. */
export function reportRunIds(params: URLSearchParams): number[] {
  const ids = params.getAll('runs').flatMap((s) => s.split(',')).map((s) => s.trim()).filter((s) => /^\d{1,15}$/.test(s)).map(Number);
  return [...new Set(ids.filter((n) => Number.isSafeInteger(n) && n > 0))].slice(0, REPORT_MAX_RUNS);
}

/** The finished trace runs of the workspace, newest first (the report's run picker; escape studies have no figure yet). */
export async function listReportChoices(workspaceId: string): Promise<ReportChoice[]> {
  const { items } = await listRuns(workspaceId, { status: 'done', kind: 'trace', pageSize: 100 });
  return items.map((r) => ({ id: r.id, modelId: r.modelId, modelName: r.modelName, versionNumber: r.versionNumber, finishedAt: r.finishedAt, override: overrideNote(r) }));
}

/**
 * One report entry per run id, in the given order. A run of another workspace, a missing run or one
 * without a result is a problem in words ("Run 7: no such run"), not an entry.
 */
export async function gatherReport(workspaceId: string, runIds: readonly number[]): Promise<{ runs: ReportRun[]; problems: string[] }> {
  const runs: ReportRun[] = [];
  const problems: string[] = [];
  for (const id of runIds) {
    try {
      const stored = await getRunResult(workspaceId, id);
      const diagram = JSON.parse(stored.diagramText) as Diagram;
      const regimes = (JSON.parse(stored.regimesText || '{}') as { regimes?: RegimeBand[] }).regimes ?? [];
      const tags = (await listBandTags(workspaceId, id)).map((t) => ({ from: t.from, to: t.to, name: t.name, colour: t.colour, note: t.note }));
      const version = await getVersionById(workspaceId, stored.run.versionId);
      const parsed = version ? modelDocumentSchema.safeParse(version.document) : null;
      const model = parsed?.success ? describeModel(parsed.data, diagram.settings) : null;
      const openComments = (await listComments(workspaceId, { runId: id, open: true })).sort((a, b) => a.createdAt.localeCompare(b.createdAt) || a.id - b.id);
      const studies = await listRuns(workspaceId, { modelId: stored.run.modelId, kind: 'escapes', status: 'done', pageSize: 50 });
      const study = studies.items.find((r) => r.versionId === stored.run.versionId);
      const escapes = study ? await getRunEscapes(workspaceId, study.id) : null;
      const maps = await listRuns(workspaceId, { modelId: stored.run.modelId, kind: 'map', status: 'done', pageSize: 50 });
      const mapRun = maps.items.find((r) => r.versionId === stored.run.versionId);
      const map = mapRun ? await getRunMap(workspaceId, mapRun.id) : null;
      runs.push({
        escapes,
        map,
        run: stored.run, engineVersion: stored.engineVersion, resultCreatedAt: stored.createdAt, diagram, regimes, tags, model,
        stateNames: diagram.variables?.length ? diagram.variables : (diagram.bifurcations[0]?.x ?? []).map((_, k) => `component ${k + 1}`),
        openComments,
      });
    } catch (e) {
      const status = (e as { status?: number }).status;
      problems.push(`Run ${id}: ${status === 404 ? 'no such run in this workspace' : e instanceof Error ? e.message : String(e)}`);
    }
  }
  return { runs, problems };
}
