/**
 * Test fixtures for the regime analysis: model documents of small cubic networks and diagrams built
 * from closed-form equilibrium branches (derivations below), so the labelling can be checked
 * independently of the continuation engine. Invented toy models, no real data.
 */
import type { Branch, Diagram, SpecialPoint } from '../../../src/lib/atlas/types';

/**
 * Roots a < m < c of the cubic element f(x) = r + x - x^3 for |r| < 2/(3 sqrt 3), by Viete's
 * trigonometric formula: x^3 - x - r = 0 is t^3 + P t + Q with P = -1, Q = -r, roots
 * 2 sqrt(1/3) cos(theta/3 - 2 pi k/3), theta = arccos((3 Q / (2 P)) sqrt(-3/P)) = arccos(r 3 sqrt 3 / 2).
 */
export function cubicRoots(r: number): { a: number; m: number; c: number } {
  const theta = Math.acos((r * 3 * Math.sqrt(3)) / 2);
  const roots = [0, 1, 2].map((k) => (2 / Math.sqrt(3)) * Math.cos(theta / 3 - (2 * Math.PI * k) / 3)).sort((x, y) => x - y);
  return { a: roots[0], m: roots[1], c: roots[2] };
}

/**
 * An invented lake network (the element of docs/model-format.md, a - b P + P^8 / (1 + P^8) with
 * b = 0.6 and a per lake), diffusive links `source - target` (cooperative for beta >= 0), swept over
 * the coupling beta from 0 to `to`.
 */
export function lakeNetwork(a: number[], links: { from: number; to: number; weight: number; twoWay?: boolean }[], to = 1) {
  return {
    format: 'brinkmap/network-1', name: 'invented lakes',
    element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
    nodes: a.map((v, i) => ({ id: `lake${i + 1}`, parameters: { a: v } })),
    links: links.map((l) => ({ from: `lake${l.from + 1}`, to: `lake${l.to + 1}`, weight: l.weight, ...(l.twoWay ? { twoWay: true } : {}) })),
    coupling: { parameter: 'beta', value: 0, term: 'source - target' },
    sweep: { parameter: 'beta', from: 0, to },
  };
}

export function cubicNetwork(opts: {
  r: number;
  nodes: string[];
  links: { from: string; to: string; twoWay?: boolean; weight?: number }[];
  sweep?: { parameter: string; from: number; to: number };
  couplingValue?: number;
  nodeR?: Record<string, number>;
  term?: string;
}) {
  return {
    format: 'brinkmap/network-1',
    name: 'cubic test network (invented)',
    element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: opts.r } },
    nodes: opts.nodes.map((id) => (opts.nodeR && id in opts.nodeR ? { id, parameters: { r: opts.nodeR[id] } } : { id })),
    links: opts.links.map((l) => ({ from: l.from, to: l.to, weight: l.weight ?? 1, twoWay: l.twoWay ?? false })),
    coupling: { parameter: 'beta', value: opts.couplingValue ?? 0, ...(opts.term ? { term: opts.term } : {}) },
    sweep: opts.sweep ?? { parameter: 'beta', from: 0, to: 1 },
  };
}

/**
 * Analytic equilibria of two identical cubic elements with symmetric diffusive coupling,
 *   x1' = r + x1 - x1^3 + beta (x2 - x1),  x2' = r + x2 - x2^3 + beta (x1 - x2),  r > 0.
 * Symmetric states x1 = x2 = a, m or c for every beta. Asymmetric ones: with s = x1 + x2,
 * d = x1 - x2, the sum of the equations gives 2r + s - (x1^3 + x2^3) = 0 with
 * x1^3 + x2^3 = s (s^2 + 3 d^2) / 4, the difference (divided by d != 0) gives
 * 1 - 2 beta - (3 s^2 + d^2) / 4 = 0. Eliminating d^2 = (8 r / s + 4 - s^2) / 3 from the first:
 *   beta(s) = (1 - s^2 - r/s) / 3.
 * Fold (saddle-node) where d beta / ds = (-2 s + r / s^2) / 3 = 0: s* = (r/2)^(1/3),
 *   beta_sn = (1 - 3 s*^2) / 3 = 1/3 - (r/2)^(2/3)
 * (this is where the stable partially tipped states (a, c)-like meet the (m, c)-like saddles).
 * Pitchfork of the symmetric middle state (m, m): J = (1 - 3 m^2) I + beta [[-1, 1], [1, -1]] has
 * eigenvalues 1 - 3m^2 (direction (1, 1)) and 1 - 3m^2 - 2 beta (direction (1, -1)); the second
 * crosses zero at beta_pf = (1 - 3 m^2) / 2, where the asymmetric s < 0 saddles (d^2 -> 0 at s = 2m)
 * join it.
 */
export function symmetricPairValues(r: number) {
  const { m } = cubicRoots(r);
  return { betaSaddleNode: 1 / 3 - Math.pow(r / 2, 2 / 3), betaPitchfork: (1 - 3 * m * m) / 2 };
}

export function symmetricPairDiagram(r: number, from = 0, to = 1): Diagram {
  const { a, m, c } = cubicRoots(r);
  const { betaSaddleNode, betaPitchfork } = symmetricPairValues(r);
  const branches: Branch[] = [];
  let id = 0;
  const add = (points: { p: number; x: number[] }[]) => {
    if (points.length > 1) branches.push({ id: `b${++id}`, points: points.map((q) => ({ ...q, unstable: 0 })), origin: { kind: 'start' }, ends: ['sweep-bound', 'sweep-bound'] });
  };
  const grid = (n: number) => Array.from({ length: n }, (_, k) => from + ((to - from) * k) / (n - 1));
  for (const v of [a, m, c]) add(grid(201).map((p) => ({ p, x: [v, v] })));
  const betaOf = (s: number) => (1 - s * s - r / s) / 3;
  const dOf = (s: number) => Math.sqrt(Math.max(0, (8 * r / s + 4 - s * s) / 3));
  for (const sign of [1, -1]) {
    for (const [s0, s1] of [[1e-3, 2 * c], [-c - 1, 2 * m]]) {
      const pts: { p: number; x: number[] }[] = [];
      const N = 4000;
      for (let k = 0; k <= N; k++) {
        const s = s0 + ((s1 - s0) * k) / N;
        const b = betaOf(s);
        if (b < from - 0.05 || b > to + 0.05) continue;
        const d = sign * dOf(s);
        pts.push({ p: b, x: [(s + d) / 2, (s - d) / 2] });
      }
      add(pts);
    }
  }
  const bif: SpecialPoint[] = [];
  const sStar = Math.cbrt(r / 2);
  for (const sign of [1, -1]) {
    const d = sign * dOf(sStar);
    bif.push({ id: `sn${sign}`, type: 'saddle-node', p: betaSaddleNode, x: [(sStar + d) / 2, (sStar - d) / 2], branches: [], evidence: { reason: 'analytic' } });
  }
  bif.push({ id: 'pf', type: 'pitchfork', p: betaPitchfork, x: [m, m], branches: [], evidence: { reason: 'analytic' } });
  return { parameter: 'beta', variables: ['x1', 'x2'], branches, bifurcations: bif, diagnostics: [], settings: { from, to }, engineVersion: 'test-analytic' };
}

/**
 * Analytic equilibria of one-way diffusive coupling from node 1 to node 2:
 *   x1' = r + x1 - x1^3,  x2' = r + x2 - x2^3 + beta (x1 - x2).
 * x1 is a root a, m or c of the element; for x2 != x1 the second equation solved for beta gives
 *   beta(x2) = (x2^3 - x2 - r) / (x1 - x2),
 * so every branch is a curve parametrized by x2, plus the line x2 = x1 (for every beta). Saddle-nodes
 * are the zeros of d beta / d x2 = [(3 x2^2 - 1)(x1 - x2) + (x2^3 - x2 - r)] / (x1 - x2)^2, located
 * here by bisection on a fine x2 grid (a different route from the fold equations derived in the test).
 */
export function oneWayPairDiagram(r: number, from: number, to: number): { diagram: Diagram; folds: { p: number; x: number[] }[] } {
  const roots = cubicRoots(r);
  const branches: Branch[] = [];
  const folds: { p: number; x: number[] }[] = [];
  let id = 0;
  const add = (points: { p: number; x: number[] }[]) => {
    if (points.length > 1) branches.push({ id: `b${++id}`, points: points.map((q) => ({ ...q, unstable: 0 })), origin: { kind: 'start' }, ends: ['sweep-bound', 'sweep-bound'] });
  };
  const grid = (n: number) => Array.from({ length: n }, (_, k) => from + ((to - from) * k) / (n - 1));
  for (const x1 of [roots.a, roots.m, roots.c]) {
    add(grid(201).map((p) => ({ p, x: [x1, x1] })));
    const beta = (x2: number) => (x2 ** 3 - x2 - r) / (x1 - x2);
    const dbeta = (x2: number) => ((3 * x2 * x2 - 1) * (x1 - x2) + (x2 ** 3 - x2 - r)) / (x1 - x2) ** 2;
    for (const [lo, hi] of [[-2.5, x1 - 1e-3], [x1 + 1e-3, 2.5]]) {
      const N = 6000;
      let pts: { p: number; x: number[] }[] = [];
      let prev = lo;
      for (let k = 0; k <= N; k++) {
        const x2 = lo + ((hi - lo) * k) / N;
        const b = beta(x2);
        if (k > 0 && dbeta(prev) * dbeta(x2) < 0) {
          let u = prev; let v = x2;
          for (let it = 0; it < 200; it++) { const w = 0.5 * (u + v); if (dbeta(u) * dbeta(w) <= 0) v = w; else u = w; }
          const xf = 0.5 * (u + v);
          if (beta(xf) > from && beta(xf) < to) folds.push({ p: beta(xf), x: [x1, xf] });
        }
        prev = x2;
        if (b < from - 0.05 || b > to + 0.05) { add(pts); pts = []; continue; }
        pts.push({ p: b, x: [x1, x2] });
      }
      add(pts);
    }
  }
  folds.sort((u, v) => u.p - v.p);
  const bifurcations: SpecialPoint[] = folds.map((f, k) => ({ id: `f${k}`, type: 'saddle-node', p: f.p, x: f.x, branches: [], evidence: { reason: 'analytic' } }));
  return { diagram: { parameter: 'beta', variables: ['up', 'down'], branches, bifurcations, diagnostics: [], settings: { from, to }, engineVersion: 'test-analytic' }, folds };
}

/**
 * Uncoupled cubic nodes (coupling 0) swept over the element parameter r: every combination of the
 * element's three roots (Viete, cubicRoots) is an equilibrium, one branch per combination.
 */
export function uncoupledDiagram(nodes: number, from: number, to: number): Diagram {
  const branches: Branch[] = [];
  const grid = Array.from({ length: 101 }, (_, k) => from + ((to - from) * k) / 100);
  for (let code = 0; code < 3 ** nodes; code++) {
    const pick = Array.from({ length: nodes }, (_, i) => Math.floor(code / 3 ** i) % 3);
    branches.push({
      id: `b${code}`, origin: { kind: 'start' }, ends: ['sweep-bound', 'sweep-bound'],
      points: grid.map((p) => {
        const r = cubicRoots(p);
        const vals = [r.a, r.m, r.c];
        return { p, x: pick.map((k) => vals[k]), unstable: pick.filter((k) => k === 1).length };
      }),
    });
  }
  return { parameter: 'r', variables: Array.from({ length: nodes }, (_, i) => `n${i}`), branches, bifurcations: [], diagnostics: [], settings: { from, to }, engineVersion: 'test-analytic' };
}

/** Invented cubic elements x' = r_i + x - x^3 (r_i spread over [0.05, 0.15]) with diffusive links, as in `npm run bench`. */
export function benchCubicNetwork(nodes: number, links: { from: number; to: number; twoWay?: boolean }[]) {
  return {
    format: 'brinkmap/network-1', name: 'invented cubic network',
    element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
    nodes: Array.from({ length: nodes }, (_, i) => ({ id: `n${i + 1}`, parameters: { r: 0.05 + (0.1 * i) / (nodes - 1) } })),
    links: links.map((l) => ({ from: `n${l.from + 1}`, to: `n${l.to + 1}`, weight: 1, ...(l.twoWay ? { twoWay: true } : {}) })),
    coupling: { parameter: 'beta', value: 0, term: 'source - target' },
    sweep: { parameter: 'beta', from: 0, to: 1 },
  };
}
