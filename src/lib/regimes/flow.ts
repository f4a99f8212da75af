import { Solver, Outcome } from './odex-solver.js';
import type { CompiledSystem } from '../model/compiled-system';

export interface FlowSettings {
  readonly relativeTolerance: number;
  readonly absoluteTolerance: number;
  readonly timeCap: number;
  readonly maxSteps: number;
  readonly stateBound: number;
}

export type FlowEnd = 'stopped' | 'time-cap' | 'step-cap' | 'escaped' | 'failed';

export interface FlowResult {
  readonly end: FlowEnd;
  readonly t: number;
  readonly x: number[];
  readonly steps: number;
}

/**
 * Integrates dx/dt = F(x, p) forward from x0 with Hairer's GBS extrapolation code ODEX (package
 * odex; Hairer, Nørsett & Wanner, Solving Ordinary Differential Equations I, 2nd ed., section II.9).
 * `observe(t, x)` sees the start and the end of every accepted step; returning true stops the run
 * ('stopped'). Dense output is not used: in odex 2.0.4 it costs about twenty times the integration
 * itself, and step ends are enough for arrival tests and the slow-passage sum. Also stops at `timeCap`, after `maxSteps`
 * steps, when a component leaves |x_i| <= stateBound or turns non-finite ('escaped'), or when the
 * integrator throws ('failed'). Never throws itself.
 */
export function integrateFlow(
  system: CompiledSystem,
  p: number,
  x0: ArrayLike<number>,
  settings: FlowSettings,
  observe: (t: number, x: number[]) => boolean,
): FlowResult {
  const n = system.dimension;
  const xin = new Float64Array(n);
  const out = new Float64Array(n);
  // odex copies the returned array into its own storage at once, so one array serves every call.
  const ret: number[] = new Array<number>(n).fill(0);
  const rhs = (_t: number, y: number[]) => {
    for (let i = 0; i < n; i++) xin[i] = y[i];
    system.rates(xin, p, out);
    for (let i = 0; i < n; i++) ret[i] = out[i];
    return ret;
  };
  const solver = new Solver(n);
  solver.relativeTolerance = settings.relativeTolerance;
  solver.absoluteTolerance = settings.absoluteTolerance;
  solver.maxSteps = settings.maxSteps;
  solver.denseOutput = false;
  solver.initialStepSize = 1e-3;

  let end: FlowEnd | null = null;
  let lastT = 0;
  let lastX = Array.from(x0 as ArrayLike<number>);
  const check = (t: number, x: number[]): boolean => {
    lastT = t;
    lastX = x.slice();
    for (let i = 0; i < n; i++) {
      if (!(Math.abs(x[i]) <= settings.stateBound)) { end = 'escaped'; return true; }
    }
    if (observe(t, x)) { end = 'stopped'; return true; }
    return false;
  };
  try {
    const result = solver.solve(rhs, 0, lastX.slice(), settings.timeCap, (_nr, _tOld, t, y) => (check(t, y) ? false : undefined));
    if (end) return { end, t: lastT, x: lastX, steps: result.nStep };
    if (result.outcome === Outcome.MaxStepsExceeded) return { end: 'step-cap', t: lastT, x: lastX, steps: result.nStep };
    return { end: 'time-cap', t: result.xEnd, x: result.y, steps: result.nStep };
  } catch {
    return { end: 'failed', t: lastT, x: lastX, steps: 0 };
  }
}
