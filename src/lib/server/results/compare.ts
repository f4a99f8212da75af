/**
 * The data of the compare page: two to four finished runs of one workspace, each thinned for
 * drawing, with a label and its provenance. Read by GET /api/compare (the page's island fetches it,
 * so the HTML does not carry megabytes of diagram) and checked by the page itself before that.
 */
import { z } from 'zod';
import type { Diagram } from '../../atlas/types.ts';
import type { RegimeBand } from '../../regimes/types.ts';
import { HttpError } from '../http.ts';
import { badRequest, notFound } from '../models/service-error.ts';
import { getRunResult } from './repository.ts';
import { thinDiagram } from './thin.ts';
import { PREVIEW_POINTS } from './preview.ts';
import { overrideNote, overrideShort } from '../../plot/run-override.ts';

/** Points per diagram when several share the page (the run page draws up to 20 000 for one). */
export const COMPARE_DRAW_BUDGET = 8000;
export const COMPARE_MAX_RUNS = 4;

export interface CompareEntry {
  readonly runId: number;
  /** "Fenn lakes: restored upper lake v1 (run 3)": the table's hover text and the panel title. */
  readonly label: string;
  /** "run 3": the table's column header. */
  readonly shortLabel: string;
  readonly diagram: Diagram;
  readonly regimes: RegimeBand[];
  readonly provenance: { modelName: string; versionHash: string; runId: string; engineVersion: string; date: string; override?: string | null };
}

/** Run ids from ?runs=1,2 or repeated ?runs=: positive integers, first occurrence kept, in order. */
export function compareRunIds(url: URL): number[] {
  const out: number[] = [];
  for (const part of url.searchParams.getAll('runs').flatMap((s) => s.split(','))) {
    const t = part.trim();
    if (!/^[1-9][0-9]{0,9}$/.test(t)) continue;
    const n = Number(t);
    if (!out.includes(n)) out.push(n);
  }
  return out;
}

/** The API's query: ?runs= (2–4 run ids, comma-separated or repeated) and an optional ?points= budget per diagram. */
export const compareQuerySchema = z.object({
  runs: z.string({ required_error: 'choose two to four finished runs to compare' })
    .regex(/^[1-9][0-9]{0,9}(,[1-9][0-9]{0,9})*$/, 'run ids separated by commas, e.g. runs=3,5'),
  points: z.coerce.number().int().min(100, 'at least 100').max(100_000, 'at most 100000').optional(),
}).strict();

/** Reads the query (repeated ?runs= joined) and checks the count; throws 400 naming `runs`. */
export function parseCompareQuery(url: URL): { runIds: number[]; points: number } {
  const raw: Record<string, string> = {};
  for (const [k, v] of url.searchParams) {
    if (k === 'workspace') continue;
    raw[k] = k === 'runs' && k in raw ? `${raw[k]},${v}` : (k in raw ? raw[k] : v);
  }
  const q = compareQuerySchema.safeParse(raw);
  if (!q.success) {
    const issue = q.error.issues[0];
    const field = issue.code === 'unrecognized_keys' ? issue.keys[0] : String(issue.path[0] ?? 'runs');
    throw badRequest(issue.code === 'unrecognized_keys' ? `unknown field "${field}"` : `${field}: ${issue.message}`, [{ field, message: issue.message }]);
  }
  const runIds = [...new Set(q.data.runs.split(',').map(Number))];
  if (runIds.length < 2) throw badRequest(`runs: choose at least two different runs to compare (got ${runIds.length})`, [{ field: 'runs', message: 'at least two runs' }]);
  if (runIds.length > COMPARE_MAX_RUNS) throw badRequest(`runs: at most ${COMPARE_MAX_RUNS} runs side by side (got ${runIds.length})`, [{ field: 'runs', message: `at most ${COMPARE_MAX_RUNS} runs` }]);
  return { runIds, points: q.data.points ?? COMPARE_DRAW_BUDGET };
}

/**
 * Each run's stored result in `workspaceId`, thinned to `points`. A run of another workspace is
 * "not found" exactly like one that does not exist (404); a run without a result is a 409; runs
 * sweeping different parameters are refused (400 naming `runs`), their axes cannot be shared.
 */
export async function loadCompareEntries(workspaceId: string, runIds: readonly number[], points = COMPARE_DRAW_BUDGET): Promise<CompareEntry[]> {
  const view = points <= PREVIEW_POINTS ? 'preview' : 'full';
  const entries = await Promise.all(runIds.map(async (runId): Promise<CompareEntry> => {
    let stored;
    try {
      stored = await getRunResult(workspaceId, runId, view);
    } catch (e) {
      if (e instanceof HttpError && e.status === 404) throw notFound(`run ${runId}`);
      throw e;
    }
    const diagram = thinDiagram(stored.diagram(), points);
    const regimes = (JSON.parse(stored.regimesText || '{}') as { regimes?: RegimeBand[] } | null)?.regimes ?? [];
    // A slice (parameter overridden for the run) says so in its label and provenance.
    const override = overrideNote(stored.run);
    const short = overrideShort(stored.run);
    return {
      runId,
      label: `${stored.run.modelName} v${stored.run.versionNumber}${override ? ` with ${override}` : ''} (run ${runId})`,
      shortLabel: `run ${runId}${short ? `, ${short}` : ''}`,
      diagram,
      regimes,
      provenance: { modelName: stored.run.modelName, versionHash: stored.run.versionHash, runId: String(runId), engineVersion: stored.engineVersion, date: stored.createdAt, ...(override ? { override } : {}) },
    };
  }));
  const parameters = [...new Set(entries.map((e) => e.diagram.parameter))];
  if (parameters.length > 1) {
    throw badRequest(`runs: these runs sweep different parameters (${parameters.join(', ')}); their axes are not comparable`, [{ field: 'runs', message: 'different swept parameters' }]);
  }
  return entries;
}
