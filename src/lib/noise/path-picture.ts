/**
 * The "path picture" of an escape study at one parameter value (docs/noise.md, "Views of an escape
 * study"): for a model with 2 or 3 state variables, the escape graph's stable states and index-1
 * saddles, the minimum-action path (barriersAt's `path`) of every edge out of the start state, and
 * a few sample Euler–Maruyama paths from the start state, thinned for drawing.
 *
 * The sample paths are the study's own: the step, time cap, thresholds and start come from
 * prepareEscapes with the study's settings, and path i draws from the study's normal stream
 * (PathStreams(seed).select(i), rng.ts) with the same update as monte-carlo.ts,
 *   x_{k+1} = x_k + F(x_k; p) dt + sigma ⊙ sqrt(dt) Z_k,
 * in the same floating-point order, so sample path i is path i of the study (its recorded escape
 * times are the study's path-i times; tests/lib/noise/path-picture.test.ts checks this against
 * simulateEscapePaths). A path stops when every node has passed its escape threshold (the event
 * rule of monte-carlo.ts; returns do not stop it) or at the step cap, min(ceil(tMax / dt),
 * `maxSteps`); the second cap is this picture's own, so a very slow study still answers quickly
 * (such a path is marked `capped` and is a prefix of the study's path).
 *
 * Thinning: the state is recorded every m steps, m starting at 1; when the record would exceed
 * `maxPoints`, every other recorded point is dropped and m doubles. The last state is always kept.
 */
import type { CompiledSystem } from '../model/compiled-system';
import type { Diagram, Diagnostic } from '../atlas/types';
import type { NodeState } from '../regimes/types';
import type { NoiseSpec } from './types';
import { noiseGraphAt } from './graph-at';
import { barriersAt, saddleLabel, stateLabel } from './barriers';
import { prepareEscapes, type EscapeStart } from './escapes';
import { NoiseSettingError } from './noise-spec';
import { PathStreams } from './rng';

/** Most sample paths one picture draws. */
export const MAX_PICTURE_PATHS = 10;
/** Most points kept per drawn path after thinning. */
export const MAX_PICTURE_POINTS = 2000;
/** Default cap on Euler–Maruyama steps per sample path (on top of the study's tMax / dt). */
export const DEFAULT_PICTURE_STEPS = 2_000_000;

export interface PathPictureOptions {
  /** Sample paths, integer 0..10; default 3. */
  readonly paths?: number;
  readonly seed?: number;
  readonly start?: EscapeStart;
  readonly dt?: number;
  readonly tMax?: number;
  readonly thresholds?: ArrayLike<number>;
  /** Step cap per sample path; default DEFAULT_PICTURE_STEPS. */
  readonly maxSteps?: number;
  /** Points per path after thinning, 2..2000; default 2000. */
  readonly maxPoints?: number;
}

export interface PicturePoint {
  readonly x: number[];
  readonly label: string;
  readonly pattern: NodeState[];
  /** Eigenvalues (real parts) of the Jacobian there. */
  readonly eigenvalues: number[];
}

export interface PictureSaddle extends PicturePoint {
  readonly index: number;
  /** States (indices into `states`) its unstable manifold joins. */
  readonly from: number;
  readonly to: number;
}

export interface PictureBarrierPath {
  /** The saddle crossed (index into `saddles`) and the state reached beyond it. */
  readonly saddle: number;
  readonly to: number;
  readonly label: string;
  /** In units of level^2 (barriersAt). */
  readonly barrier: number;
  readonly method: 'potential' | 'minimum-action';
  readonly converged: boolean;
  /** From the start state to the saddle, thinned to at most maxPoints. */
  readonly path: number[][];
}

export interface PictureSamplePath {
  /** The study's path index. */
  readonly index: number;
  /** Recorded states, thinned (first = the start state, last = where the path stopped). */
  readonly points: number[][];
  /** Time of each recorded point. */
  readonly times: number[];
  /** Steps between recorded points at the end (1, 2, 4, ...). */
  readonly every: number;
  readonly steps: number;
  /** First escape time per node (NaN: not escaped before the path stopped). */
  readonly escapeTimes: number[];
  /** True when the path stopped at a step cap before every node escaped. */
  readonly capped: boolean;
}

export interface PathPicture {
  readonly parameter: string;
  readonly p: number;
  readonly names: string[];
  readonly start: number;
  readonly states: PicturePoint[];
  readonly saddles: PictureSaddle[];
  readonly minimumActionPaths: PictureBarrierPath[];
  readonly samples: PictureSamplePath[];
  readonly thresholds: number[];
  readonly dt: number;
  readonly tMax: number;
  readonly seed: number;
  readonly noise: number;
  readonly diagnostics: Diagnostic[];
}

/** Keeps at most `max` points of a polyline (evenly by index, first and last kept). */
export function thinPolyline(path: readonly (readonly number[])[], max: number): number[][] {
  if (path.length <= max) return path.map((q) => q.slice());
  const out: number[][] = [];
  for (let k = 0; k < max; k++) out.push(path[Math.round((k * (path.length - 1)) / (max - 1))].slice());
  return out;
}

/**
 * The path picture at p (see the file header). Throws NoiseSettingError naming the field for a
 * model with other than 2 or 3 state variables ('model'), bad `paths`, or no escape graph at p
 * ('p') or no start state ('start').
 */
export function pathPicture(system: CompiledSystem, diagram: Diagram, spec: NoiseSpec, p: number, options: PathPictureOptions = {}): PathPicture {
  const n = system.dimension;
  if (n !== 2 && n !== 3) throw new NoiseSettingError('model', `the path picture needs 2 or 3 state variables, the model has ${n}`);
  const count = options.paths ?? 3;
  if (!Number.isInteger(count) || count < 0 || count > MAX_PICTURE_PATHS) throw new NoiseSettingError('paths', `must be an integer from 0 to ${MAX_PICTURE_PATHS}, got ${count}`);
  const maxPoints = options.maxPoints ?? MAX_PICTURE_POINTS;
  if (!Number.isInteger(maxPoints) || maxPoints < 2 || maxPoints > MAX_PICTURE_POINTS) throw new NoiseSettingError('maxPoints', `must be an integer from 2 to ${MAX_PICTURE_POINTS}, got ${maxPoints}`);
  const stepCap = options.maxSteps ?? DEFAULT_PICTURE_STEPS;
  if (!Number.isInteger(stepCap) || stepCap < 1) throw new NoiseSettingError('maxSteps', `must be a positive integer, got ${stepCap}`);
  if (!Number.isFinite(p)) throw new NoiseSettingError('p', `must be a finite number, got ${p}`);

  const graph = noiseGraphAt(system, diagram, p);
  if (!graph.ok) throw new NoiseSettingError('p', `no escape graph at ${p}: ${graph.reason}`);
  const names = [...(system.network?.nodeIds ?? system.variables)];
  // The study's step, cap, thresholds and start (budget not checked: a handful of paths).
  const prep = prepareEscapes(system, diagram, spec, p, {
    paths: Math.max(1, count), seed: options.seed, start: options.start, dt: options.dt, tMax: options.tMax,
    thresholds: options.thresholds, stepCheckPaths: 0, budget: Number.POSITIVE_INFINITY,
  });
  const want = (options.start ?? 'all-base') === 'all-base' ? 'base' : 'tipped';
  const start = graph.graph.states.findIndex((s) => s.pattern.every((q) => q === want));
  const diagnostics: Diagnostic[] = [...graph.diagnostics];
  const b = barriersAt(system, graph, spec.weights, { pairs: (from) => from === start });
  diagnostics.push(...b.diagnostics);

  const re = (e: { eigenvalues: readonly { re: number }[] }) => e.eigenvalues.map((v) => v.re);
  const states: PicturePoint[] = graph.graph.states.map((s, k) => ({ x: s.x.slice(), label: stateLabel(s.pattern, names), pattern: [...s.pattern], eigenvalues: re(graph.states[k]) }));
  const saddles: PictureSaddle[] = graph.graph.saddles.map((e, k) => ({
    index: k, x: e.x.slice(), label: saddleLabel(graph, k, names), pattern: [...e.pattern], eigenvalues: re(graph.saddles[k]), from: e.from, to: e.to,
  }));
  const minimumActionPaths: PictureBarrierPath[] = b.barriers.filter((r) => r.from === start).map((r) => ({
    saddle: r.saddle, to: r.to, label: saddles[r.saddle].label, barrier: r.barrier, method: r.method, converged: r.converged, path: thinPolyline(r.path, maxPoints),
  }));

  const samples: PictureSamplePath[] = [];
  const streams = new PathStreams(prep.seed);
  const setup = prep.setup;
  const sign = setup.direction === 'up' ? 1 : -1;
  const noise = Float64Array.from(setup.sigma, (s) => s * Math.sqrt(prep.dt));
  const studyCap = Math.ceil(prep.tMax / prep.dt - 1e-9);
  const cap = Math.min(studyCap, stepCap);
  for (let i = 0; i < count; i++) {
    const z = streams.select(i);
    const x = Float64Array.from(setup.start);
    const f = new Float64Array(n);
    const escapeTimes = new Array<number>(n).fill(Number.NaN);
    let nEscaped = 0;
    let every = 1;
    let step = 0;
    const points: number[][] = [Array.from(x)];
    const times: number[] = [0];
    while (nEscaped < n && step < cap) {
      system.rates(x, p, f);
      for (let j = 0; j < n; j++) x[j] += f[j] * prep.dt + noise[j] * z();
      step++;
      for (let j = 0; j < n; j++) {
        if (Number.isNaN(escapeTimes[j]) && sign * x[j] > sign * setup.thresholds[j]) {
          escapeTimes[j] = step * prep.dt;
          nEscaped++;
        }
      }
      if (step % every === 0) {
        points.push(Array.from(x));
        times.push(step * prep.dt);
        if (points.length > maxPoints - 1) {
          // Keep the even-numbered records (the start stays); record half as often from now on.
          let w = 0;
          for (let r = 0; r < points.length; r += 2) { points[w] = points[r]; times[w] = times[r]; w++; }
          points.length = w;
          times.length = w;
          every *= 2;
        }
      }
    }
    if (times[times.length - 1] !== step * prep.dt) { points.push(Array.from(x)); times.push(step * prep.dt); }
    const capped = nEscaped < n;
    if (capped && step >= stepCap && stepCap < studyCap) {
      diagnostics.push({ level: 'info', code: 'picture-step-cap', p, message: `sample path ${i} stopped at the picture's cap of ${stepCap} steps (t = ${step * prep.dt}) before every node escaped; the study ran it up to tMax = ${prep.tMax}` });
    }
    samples.push({ index: i, points, times, every, steps: step, escapeTimes, capped });
  }
  return {
    parameter: system.parameter, p, names, start, states, saddles, minimumActionPaths, samples,
    thresholds: Array.from(setup.thresholds), dt: prep.dt, tMax: prep.tMax, seed: prep.seed, noise: spec.level, diagnostics,
  };
}
