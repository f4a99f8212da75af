/**
 * The computation behind an escape run, from stored document text and the atlas' diagram to one
 * compact row per parameter value (rows.ts) and the study summary. No database and no I/O: the
 * worker thread (src/worker/compute-task.ts) runs exactly this, with the paths on the escape pool,
 * and hands every finished row to `onPoint` at once, so the worker stores it before the next value
 * starts and a retry resumes after it (`done` lists the values stored already).
 *
 * The same steps as the engine's sweepEscapesWith (src/lib/noise/sweep.ts): per value
 * prepareEscapes, the paths, the dt / 2 step check, escapeReport; then the exit switches over the
 * range and the deterministic band edges. One difference: every value is prepared (escape graph,
 * barriers, prediction, budget) before any path is simulated, so a value over the budget fails the
 * whole run at once, with the estimate, instead of after hours of other values.
 */
import { compileModelJson } from '../../model/index.ts';
import type { ModelDocument } from '../../model/schema.ts';
import type { Diagram, Diagnostic } from '../../atlas/types.ts';
import { labelRegimes } from '../../regimes/label-regimes.ts';
import { resolveNoise } from '../../noise/noise-spec.ts';
import { escapeReport, prepareEscapes, type PreparedEscapes } from '../../noise/escapes.ts';
import { BudgetExceededError } from '../../noise/budget.ts';
import { noiseGraphAt } from '../../noise/graph-at.ts';
import { saddleLabel, stateLabel } from '../../noise/barriers.ts';
import { exitSwitches } from '../../noise/exit-switches.ts';
import type { EscapeSetup, PathBatch } from '../../noise/monte-carlo.ts';
import type { ExitSwitch } from '../../noise/types.ts';
import { barrierRows, encodePoint, encodeSkipped, type EscapePointDbRow } from './rows.ts';
import type { StoredEscapeSettings } from './schema.ts';
import { ESCAPE_BUDGET_PER_VALUE } from './budget-constant.ts';

/** Runs paths first..first+count-1 of a setup (in this thread, or on the escape pool); reports paths done. */
export type StudyRunner = (setup: EscapeSetup, run: { dt: number; tMax: number; seed: number; count: number; onPaths?: (done: number) => void }) => Promise<PathBatch>;

export interface ValueProgress { p: number; paths: number; pathsDone: number; status: 'waiting' | 'running' | 'done' | 'skipped' }

export interface EscapeStudyHooks {
  /** Whole-run fraction 0..1, a phrase, and paths done per parameter value. */
  onProgress(fraction: number, phrase: string, values: ValueProgress[]): void;
  isCancelled(): boolean;
  /** A finished (or skipped) value; the caller stores it before the next one starts. */
  onPoint(row: EscapePointDbRow): Promise<void> | void;
}

export interface EscapeStudySummary {
  readonly parameter: string;
  readonly noise: number;
  readonly start: string;
  readonly valueCount: number;
  readonly exitSwitches: ExitSwitch[];
  readonly bandEdges: { p: number; regime: string; side: 'from' | 'to' }[];
  readonly diagnostics: { level: string; code: string; message: string }[];
  readonly computeMs: number;
}

/** A failure that is a property of the input (over the budget): the run fails without retrying. */
export class EscapeStudyRefused extends Error {
  constructor(readonly code: string, message: string) {
    super(message);
    this.name = 'EscapeStudyRefused';
  }
}

export async function computeEscapeStudy(
  documentText: string,
  diagramJson: string,
  settings: StoredEscapeSettings,
  done: readonly number[],
  runner: StudyRunner,
  hooks: EscapeStudyHooks,
): Promise<{ cancelled: boolean; summary: EscapeStudySummary | null }> {
  const started = performance.now();
  const document = JSON.parse(documentText) as ModelDocument;
  const system = compileModelJson(document);
  const diagram = JSON.parse(diagramJson) as Diagram;
  const spec = resolveNoise(document, settings.noise);
  const names = [...(system.network?.nodeIds ?? system.variables)];
  const values = settings.values;
  const already = new Set(done);
  const progress: ValueProgress[] = values.map((p, i) => ({ p, paths: settings.paths, pathsDone: already.has(i) ? settings.paths : 0, status: already.has(i) ? 'done' : 'waiting' }));
  const fraction = () => progress.reduce((s, v) => s + (v.status === 'done' || v.status === 'skipped' ? 1 : v.pathsDone / Math.max(1, v.paths)), 0) / values.length;
  const options = { paths: settings.paths, dt: settings.dt, tMax: settings.tMax, seed: settings.seed, start: settings.start, budget: ESCAPE_BUDGET_PER_VALUE };

  // 1. Prepare every value still to do (escape graph, barriers, prediction, step, cap, budget).
  const prepared = new Map<number, PreparedEscapes | { reason: string }>();
  for (let i = 0; i < values.length; i++) {
    if (already.has(i)) continue;
    if (hooks.isCancelled()) return { cancelled: true, summary: null };
    hooks.onProgress(0.9 * fraction(), `preparing p = ${values[i]} (value ${i + 1} of ${values.length}): barriers and prediction`, progress);
    try {
      prepared.set(i, prepareEscapes(system, diagram, spec, values[i], options));
    } catch (e) {
      if (e instanceof BudgetExceededError) {
        throw new EscapeStudyRefused('over-budget', `at p = ${values[i]}, ${e.message.replace(/^budget: /, '').replace(/t-max/g, 'tMax')}`);
      }
      if (!(e instanceof Error) || e.name !== 'NoiseSettingError') throw e;
      prepared.set(i, { reason: e.message.replace(/^at: /, '') });
    }
  }

  // 2. Simulate value by value; each finished value goes to the caller (stored) before the next.
  for (let i = 0; i < values.length; i++) {
    const prep = prepared.get(i);
    if (!prep) continue;
    if (hooks.isCancelled()) return { cancelled: true, summary: null };
    const v = progress[i];
    const t0 = performance.now();
    if ('reason' in prep) {
      await hooks.onPoint(encodeSkipped(i, values[i], prep.reason));
      v.status = 'skipped';
      continue;
    }
    v.status = 'running';
    const phrase = (n: number) => `p = ${values[i]} (value ${i + 1} of ${values.length}): ${n} of ${prep.paths} paths`;
    hooks.onProgress(0.9 * fraction(), phrase(0), progress);
    const batch = await runner(prep.setup, {
      dt: prep.dt, tMax: prep.tMax, seed: prep.seed, count: prep.paths,
      onPaths: (n) => { v.pathsDone = n; hooks.onProgress(0.9 * fraction(), phrase(n), progress); },
    });
    if (batch.cancelled || hooks.isCancelled()) return { cancelled: true, summary: null };
    hooks.onProgress(0.9 * fraction(), `p = ${values[i]}: step check at dt / 2 (${prep.stepCheckPaths} paths)`, progress);
    const half = prep.stepCheckPaths > 0 ? await runner(prep.setup, { dt: prep.dt / 2, tMax: prep.tMax, seed: prep.seed, count: prep.stepCheckPaths }) : null;
    if (half?.cancelled || hooks.isCancelled()) return { cancelled: true, summary: null };
    const report = escapeReport(system, prep, spec.level, batch, half);
    const graph = noiseGraphAt(system, diagram, values[i]);
    const labels = graph.ok
      ? { states: graph.graph.states.map((s) => stateLabel(s.pattern, names)), saddles: graph.graph.saddles.map((_, k) => saddleLabel(graph, k, names)) }
      : { states: [], saddles: [] };
    await hooks.onPoint(encodePoint(i, report, barrierRows(prep.prediction.rates, labels), performance.now() - t0));
    v.pathsDone = prep.paths;
    v.status = 'done';
    hooks.onProgress(0.9 * fraction(), `p = ${values[i]} done (value ${i + 1} of ${values.length})`, progress);
  }

  // 3. On the same axis: exit switches over the range and the deterministic band edges.
  hooks.onProgress(0.9, 'exit switches and band edges over the range', progress);
  const diagnostics: Diagnostic[] = [];
  let switches: ExitSwitch[] = [];
  const lo = Math.min(...values);
  const hi = Math.max(...values);
  if (hi > lo) {
    // Only the start state's switches are shown and kept; the barriers of other states' edges would
    // be most of the cost (gMAM per edge on non-gradient networks).
    const r = exitSwitches(system, diagram, lo, hi, spec.weights, { states: [settings.start], signal: { get aborted() { return hooks.isCancelled(); } } });
    switches = r.switches;
    diagnostics.push(...r.diagnostics);
  }
  if (hooks.isCancelled()) return { cancelled: true, summary: null };
  const regimes = labelRegimes(system, diagram);
  const bandEdges = regimes.regimes.flatMap((b) => [
    { p: b.from, regime: b.regime, side: 'from' as const },
    { p: b.to, regime: b.regime, side: 'to' as const },
  ]);
  hooks.onProgress(1, 'storing the study', progress);
  return {
    cancelled: false,
    summary: {
      parameter: system.parameter, noise: spec.level, start: settings.start, valueCount: values.length,
      exitSwitches: switches, bandEdges, diagnostics: diagnostics.map((d) => ({ level: d.level, code: d.code, message: d.message })),
      computeMs: Math.round(performance.now() - started),
    },
  };
}
