import type { CompiledSystem, NetworkStructure } from '../../../src/lib/model/compiled-system.js';

/**
 * Hand-written CompiledSystem for engine tests that should not depend on the model compiler:
 * rates, Jacobian and parameter derivative given as plain functions of (x, p).
 */
export interface HandSystemSpec {
  variables: string[];
  parameter?: string;
  sweep: { from: number; to: number };
  start?: number[][];
  rates: (x: Float64Array, p: number) => number[];
  jacobian: (x: Float64Array, p: number) => number[][];
  dp: (x: Float64Array, p: number) => number[];
  network?: NetworkStructure;
}

export function handSystem(spec: HandSystemSpec): CompiledSystem {
  const n = spec.variables.length;
  return {
    dimension: n,
    variables: spec.variables,
    parameter: spec.parameter ?? 'p',
    sweep: spec.sweep,
    start: (spec.start ?? []).map((s) => Float64Array.from(s)),
    rates(x, p, out) {
      const r = spec.rates(x, p);
      for (let i = 0; i < n; i++) out[i] = r[i];
      return out;
    },
    jacobian(x, p, out) {
      const j = spec.jacobian(x, p);
      for (let i = 0; i < n; i++) for (let k = 0; k < n; k++) out[i * n + k] = j[i][k];
      return out;
    },
    parameterDerivative(x, p, out) {
      const d = spec.dp(x, p);
      for (let i = 0; i < n; i++) out[i] = d[i];
      return out;
    },
    ...(spec.network ? { network: spec.network } : {}),
  };
}

/** x' = f(x, p) in one dimension. */
export function scalarSystem(f: (x: number, p: number) => number, fx: (x: number, p: number) => number, fp: (x: number, p: number) => number, sweep: { from: number; to: number }, start: number[][] = []): CompiledSystem {
  return handSystem({
    variables: ['x'],
    sweep,
    start,
    rates: (x, p) => [f(x[0], p)],
    jacobian: (x, p) => [[fx(x[0], p)]],
    dp: (x, p) => [fp(x[0], p)],
  });
}

/**
 * Diffusively coupled network dx_i/dt = g(x_i) + beta * sum_{links j->i} w (x_j - x_i), swept in beta,
 * hand-compiled (g, g' given). Links are directed (from, to, weight).
 */
export function diffusiveNetwork(g: (x: number) => number, dg: (x: number) => number, links: { from: number; to: number; weight: number }[], nodes: number, sweep: { from: number; to: number }): CompiledSystem {
  const rates = (x: Float64Array, beta: number) => {
    const r = Array.from(x, (v) => g(v));
    for (const l of links) r[l.to] += beta * l.weight * (x[l.from] - x[l.to]);
    return r;
  };
  const jac = (x: Float64Array, beta: number) => {
    const j = Array.from({ length: nodes }, (_, i) => Array.from({ length: nodes }, (_, k) => (i === k ? dg(x[i]) : 0)));
    for (const l of links) {
      j[l.to][l.from] += beta * l.weight;
      j[l.to][l.to] -= beta * l.weight;
    }
    return j;
  };
  const dp = (x: Float64Array) => {
    const r = new Array<number>(nodes).fill(0);
    for (const l of links) r[l.to] += l.weight * (x[l.from] - x[l.to]);
    return r;
  };
  return handSystem({
    variables: Array.from({ length: nodes }, (_, i) => `x${i + 1}`),
    parameter: 'beta',
    sweep,
    rates,
    jacobian: jac,
    dp,
    network: {
      nodeIds: Array.from({ length: nodes }, (_, i) => `n${i + 1}`),
      links,
      sweepIsCoupling: true,
      couplingValue: 0,
      elementRate: (_i, x) => g(x),
      elementDerivative: (_i, x) => dg(x),
    },
  });
}
