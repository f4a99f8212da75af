/**
 * Escape studies over a list of parameter values (docs/noise.md, "Sweeps"): at every p the Monte
 * Carlo report (escapesAt, with its weak-noise prediction), plus, on the same axis, the exit
 * switches along the range (exit-switches.ts) and the deterministic band edges (regimes'
 * labelRegimes). One seed for all points: path i at every p uses the stream (seed, i), so the
 * curves vs p are common-random-number comparisons (smoother differences, correlated errors).
 */
import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic, Diagram } from '../atlas/types';
import { labelRegimes } from '../regimes/label-regimes';
import type { CancelSignal, ExitSwitch, NoiseSpec, Progress } from './types';
import { escapeReport, escapesAt, prepareEscapes, type EscapeReport, type EscapeStudyOptions } from './escapes';
import type { EscapeSetup, PathBatch } from './monte-carlo';
import { exitSwitches } from './exit-switches';
import { NoiseSettingError } from './noise-spec';

/** `count` equally spaced values from `from` to `to` inclusive (count >= 2; count 1 gives [from]). */
export function parameterGrid(from: number, to: number, count: number): number[] {
  if (!Number.isInteger(count) || count < 1) throw new NoiseSettingError('count', `must be a positive integer, got ${count}`);
  if (count === 1) return [from];
  return Array.from({ length: count }, (_, i) => from + ((to - from) * i) / (count - 1));
}

export interface SweepPoint {
  readonly p: number;
  /** null when no study was possible at p (no escape graph, no start state, over the budget): see `reason`. */
  readonly report: EscapeReport | null;
  readonly reason?: string;
}

export interface EscapeSweep {
  readonly parameter: string;
  readonly points: SweepPoint[];
  readonly exitSwitches: ExitSwitch[];
  /** Deterministic band edges (from / to of every regime band) on the same axis. */
  readonly bandEdges: { p: number; regime: string; side: 'from' | 'to' }[];
  readonly cancelled: boolean;
  readonly diagnostics: Diagnostic[];
}

/**
 * escapesAt at every value of `ps` (in this thread), with exit switches over [min ps, max ps] and
 * the band edges of labelRegimes. Settings errors at one p (NoiseSettingError, budget) become that
 * point's `reason`; progress is reported per point and the cancel signal is checked between and
 * inside points.
 */
export function sweepEscapes(
  system: CompiledSystem,
  diagram: Diagram,
  spec: NoiseSpec,
  ps: readonly number[],
  options: EscapeStudyOptions & { progress?: Progress; signal?: CancelSignal; exitSwitches?: boolean } = {},
): EscapeSweep {
  const points: SweepPoint[] = [];
  const diagnostics: Diagnostic[] = [];
  let cancelled = false;
  ps.forEach((p, i) => {
    if (cancelled || options.signal?.aborted) {
      cancelled = true;
      return;
    }
    try {
      const report = escapesAt(system, diagram, spec, p, { ...options, progress: undefined });
      points.push({ p, report });
      if (report.diagnostics.some((d) => d.code === 'cancelled')) cancelled = true;
    } catch (e) {
      if (!(e instanceof Error) || !/^(NoiseSettingError|BudgetExceededError)$/.test(e.name)) throw e;
      points.push({ p, report: null, reason: e.message });
      diagnostics.push({ level: 'warning', code: 'sweep-point-skipped', message: e.message, p });
    }
    options.progress?.({ fraction: (i + 1) / ps.length, pathsDone: (i + 1) * (options.paths ?? 1000), stage: 'sweep' });
  });
  return finishSweep(system, diagram, spec, ps, points, diagnostics, cancelled, options);
}

/**
 * Runs paths first .. first + count - 1 of a setup somewhere (e.g. the escape pool of
 * src/worker/escape-pool.ts, on every core); it must return the records simulateEscapePaths would
 * (path i from the stream (seed, i)), so a sweep gives the same numbers on any number of threads.
 */
export type PathRunner = (setup: EscapeSetup, run: { dt: number; tMax: number; seed: number; count: number }) => Promise<PathBatch>;

/**
 * sweepEscapes with the paths (and the dt / 2 reruns) of every point run by `runner`, one point
 * after another, so one warm pool serves every parameter value. The same result as sweepEscapes
 * whatever the runner's thread count (tests/lib/noise/sweep.test.ts checks it).
 */
export async function sweepEscapesWith(
  system: CompiledSystem,
  diagram: Diagram,
  spec: NoiseSpec,
  ps: readonly number[],
  runner: PathRunner,
  options: EscapeStudyOptions & { progress?: Progress; signal?: CancelSignal; exitSwitches?: boolean } = {},
): Promise<EscapeSweep> {
  const points: SweepPoint[] = [];
  const diagnostics: Diagnostic[] = [];
  let cancelled = false;
  for (let i = 0; i < ps.length; i++) {
    const p = ps[i];
    if (cancelled || options.signal?.aborted) {
      cancelled = true;
      break;
    }
    try {
      const prep = prepareEscapes(system, diagram, spec, p, options);
      const batch = await runner(prep.setup, { dt: prep.dt, tMax: prep.tMax, seed: prep.seed, count: prep.paths });
      const half = prep.stepCheckPaths > 0 && !batch.cancelled ? await runner(prep.setup, { dt: prep.dt / 2, tMax: prep.tMax, seed: prep.seed, count: prep.stepCheckPaths }) : null;
      const report = escapeReport(system, prep, spec.level, batch, half);
      points.push({ p, report });
      if (report.diagnostics.some((d) => d.code === 'cancelled')) cancelled = true;
    } catch (e) {
      if (!(e instanceof Error) || !/^(NoiseSettingError|BudgetExceededError)$/.test(e.name)) throw e;
      points.push({ p, report: null, reason: e.message });
      diagnostics.push({ level: 'warning', code: 'sweep-point-skipped', message: e.message, p });
    }
    options.progress?.({ fraction: (i + 1) / ps.length, pathsDone: (i + 1) * (options.paths ?? 1000), stage: 'sweep' });
  }
  return finishSweep(system, diagram, spec, ps, points, diagnostics, cancelled, options);
}

function finishSweep(
  system: CompiledSystem,
  diagram: Diagram,
  spec: NoiseSpec,
  ps: readonly number[],
  points: SweepPoint[],
  diagnostics: Diagnostic[],
  cancelled: boolean,
  options: { exitSwitches?: boolean },
): EscapeSweep {
  let switches: ExitSwitch[] = [];
  if (options.exitSwitches !== false && ps.length > 1) {
    const r = exitSwitches(system, diagram, Math.min(...ps), Math.max(...ps), spec.weights);
    switches = r.switches;
    diagnostics.push(...r.diagnostics);
  }
  const regimes = labelRegimes(system, diagram);
  const bandEdges = regimes.regimes.flatMap((b) => [
    { p: b.from, regime: b.regime, side: 'from' as const },
    { p: b.to, regime: b.regime, side: 'to' as const },
  ]);
  return { parameter: system.parameter, points, exitSwitches: switches, bandEdges, cancelled, diagnostics };
}
