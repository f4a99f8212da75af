import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model/index';
import { traceDiagram } from '../../../src/lib/atlas/index';
import { criticalCoupling, OnsetInputError } from '../../../src/lib/onset/index';
import { cubicNetwork, cubicRoots, symmetricPairValues } from '../regimes/fixtures';

/*
 * Closed form of the downstream fold of the one-way pair (derived here):
 *   x1' = r + x1 - x1^3,   x2' = r + x2 - x2^3 + beta (x1 - x2),   x1 held at an element root u.
 * The downstream state is a root of g(x2) = r + x2 - x2^3 + beta (u - x2); it folds where also
 * g'(x2) = 1 - 3 x2^2 - beta = 0. Put beta = 1 - 3 x2^2 into g = 0:
 *   r + x2 - x2^3 + (1 - 3 x2^2)(u - x2) = 2 x2^3 - 3 u x2^2 + (r + u) = 0.
 * Since u is a root of the element, r + u = u^3, so 2 x2^3 - 3 u x2^2 + u^3 = (x2 - u)^2 (2 x2 + u) = 0.
 * The double root x2 = u is the line x2 = x1 (beta = 1 - 3 u^2 < 0 for a stable root); the fold is
 *   x2* = -u / 2,   beta* = 1 - 3 u^2 / 4.
 * Node "up" tipped (u = c, the upper root) drags "down" at beta = 1 - 3 c^2 / 4; node "down" tipped
 * with "up" at base (u = a) is pulled back at beta = 1 - 3 a^2 / 4.
 * Past either fold g has one real root left: for u = c, g(m) = beta (c - m) > 0 and g -> -inf as
 * x2 -> +inf, so it lies above the threshold m ("down" tips: next = [down]); for u = a, g(m) < 0 and
 * g -> +inf as x2 -> -inf, so it lies below m ("down" returns to base: next = [], recovered = [down]).
 */
describe('criticalCoupling(system) on a one-way cubic pair', () => {
  const r = 0.1;
  const system = compileModelJson(cubicNetwork({ r, nodes: ['up', 'down'], links: [{ from: 'up', to: 'down' }] }));
  const result = criticalCoupling(system);
  const { a, c } = cubicRoots(r);

  it('gives the closed-form downstream fold 1 - 3c^2/4 for the upstream node and its follower', () => {
    const up = result.nodes[0];
    expect(up.id).toBe('up');
    expect(up.status).toBe('fold');
    expect(up.critical!).toBeCloseTo(1 - (3 * c * c) / 4, 9);
    expect(up.foldState![0]).toBeCloseTo(c, 9);
    expect(up.foldState![1]).toBeCloseTo(-c / 2, 6);
    expect(up.next).toEqual(['down']);
    expect(up.recovered).toEqual([]);
    expect(up.located!.converged).toBe(true);
  });

  it('gives 1 - 3a^2/4 for the downstream node, which is pulled back to base', () => {
    const down = result.nodes[1];
    expect(down.critical!).toBeCloseTo(1 - (3 * a * a) / 4, 9);
    expect(down.foldState![1]).toBeCloseTo(-a / 2, 6);
    expect(down.next).toEqual([]);
    expect(down.recovered).toEqual(['down']);
    expect(result.converged).toBe(true);
    expect(result.diagnostics).toEqual([]);
  });

  it('agrees with the saddle-nodes the full diagram trace finds (engine continuation, independent path)', () => {
    const diagram = traceDiagram(system);
    const folds = diagram.bifurcations.filter((b) => b.type === 'saddle-node').map((b) => b.p);
    for (const node of result.nodes) {
      const nearest = Math.min(...folds.map((p) => Math.abs(p - node.critical!)));
      expect(nearest).toBeLessThan(1e-9);
    }
  });

  it('says "none in range" with a diagnostic when the sweep ends before the fold', () => {
    const short = compileModelJson(cubicNetwork({ r, nodes: ['up', 'down'], links: [{ from: 'up', to: 'down' }], sweep: { parameter: 'beta', from: 0, to: 0.1 } }));
    const res = criticalCoupling(short);
    expect(res.nodes.map((q) => q.status)).toEqual(['none-in-range', 'none-in-range']);
    expect(res.nodes.map((q) => q.critical)).toEqual([null, null]);
    expect(res.diagnostics.filter((d) => d.code === 'none-in-range')).toHaveLength(2);
    expect(res.converged).toBe(true);
  });

  it('reports a pattern that does not exist at the sweep start (decreasing sweep from past the fold)', () => {
    // At beta = 0.5 > 1 - 3c^2/4 the state "only up tipped" is gone; Newton from it lands elsewhere.
    const res = criticalCoupling(system, { from: 0.5, to: 0, nodes: [0] });
    expect(res.nodes[0].status).toBe('failed');
    expect(res.diagnostics.map((d) => d.code)).toContain('start-pattern-lost');
    expect(res.converged).toBe(false);
  });
});

describe('criticalCoupling(system) on a symmetric cubic pair', () => {
  it.each([0.05, 0.1, 0.2])('gives 1/3 - (r/2)^(2/3) for both nodes (r = %s; derivation in tests/lib/regimes/fixtures.ts)', (r) => {
    const system = compileModelJson(cubicNetwork({ r, nodes: ['p', 'q'], links: [{ from: 'p', to: 'q', twoWay: true }] }));
    const res = criticalCoupling(system);
    const expected = 1 / 3 - Math.pow(r / 2, 2 / 3);
    expect(symmetricPairValues(r).betaSaddleNode).toBe(expected);
    for (const node of res.nodes) expect(node.critical!).toBeCloseTo(expected, 9);
  });

  it('names the other node as next, as an independent fixed-step RK4 integration from the fold state confirms', () => {
    const r = 0.1;
    const system = compileModelJson(cubicNetwork({ r, nodes: ['p', 'q'], links: [{ from: 'p', to: 'q', twoWay: true }] }));
    const res = criticalCoupling(system);
    expect(res.nodes[0].next).toEqual(['q']);
    expect(res.nodes[1].next).toEqual(['p']);
    // Classical RK4, dt = 0.05, written here (no library): x' = r + x - x^3 + beta (y - x), and y likewise.
    const beta = res.nodes[0].critical! + 1e-4;
    const f = (x: number, y: number) => [r + x - x ** 3 + beta * (y - x), r + y - y ** 3 + beta * (x - y)];
    let [x, y] = res.nodes[0].foldState!;
    const dt = 0.05;
    for (let k = 0; k < 40000; k++) {
      const k1 = f(x, y);
      const k2 = f(x + 0.5 * dt * k1[0], y + 0.5 * dt * k1[1]);
      const k3 = f(x + 0.5 * dt * k2[0], y + 0.5 * dt * k2[1]);
      const k4 = f(x + dt * k3[0], y + dt * k3[1]);
      x += (dt / 6) * (k1[0] + 2 * k2[0] + 2 * k3[0] + k4[0]);
      y += (dt / 6) * (k1[1] + 2 * k2[1] + 2 * k3[1] + k4[1]);
    }
    const { c } = cubicRoots(r);
    // Past the fold only the symmetric states remain stable; the flow ends at (c, c), both tipped.
    expect(x).toBeCloseTo(c, 6);
    expect(y).toBeCloseTo(c, 6);
    expect(res.nodes[0].destination!.x[0]).toBeCloseTo(c, 8);
    expect(res.nodes[0].destination!.x[1]).toBeCloseTo(c, 8);
  });
});

describe('criticalCoupling(system) on a three-node chain with mixed links', () => {
  it('finds for every node a saddle-node that the full diagram trace (engine continuation) also lists', () => {
    const doc = cubicNetwork({ r: 0.1, nodes: ['a', 'b', 'c'], nodeR: { a: 0.05, c: 0.15 }, links: [{ from: 'a', to: 'b', twoWay: true }, { from: 'b', to: 'c', weight: 0.7 }] });
    const system = compileModelJson(doc);
    const res = criticalCoupling(system);
    const folds = traceDiagram(system).bifurcations.filter((b) => b.type === 'saddle-node');
    expect(res.nodes.every((q) => q.status === 'fold')).toBe(true);
    for (const node of res.nodes) {
      // The one-way link b -> c makes every fold of the (a, b) pair appear once per state of c (same p,
      // different x_c), so a match needs the state too.
      const match = folds.find((f) => Math.abs(f.p - node.critical!) < 1e-8 && f.x.every((v, j) => Math.abs(v - node.foldState![j]) < 1e-5));
      expect(match, `node ${node.id} at ${node.critical}`).toBeDefined();
      expect(node.next).not.toBeNull();
    }
  });
});

describe('criticalCoupling(system) input checks', () => {
  it('throws OnsetInputError naming sweep.parameter when the sweep is not over the coupling', () => {
    const system = compileModelJson(cubicNetwork({ r: 0.1, nodes: ['p', 'q'], links: [{ from: 'p', to: 'q' }], sweep: { parameter: 'r', from: 0, to: 0.3 }, couplingValue: 0.1 }));
    expect(() => criticalCoupling(system)).toThrow(OnsetInputError);
    try {
      criticalCoupling(system);
    } catch (e) {
      expect((e as OnsetInputError).field).toBe('sweep.parameter');
    }
  });

  it('throws OnsetInputError naming format for a plain ODE document', () => {
    const system = compileModelJson({ format: 'brinkmap/ode-1', name: 'ode', variables: ['x'], parameters: { k: 0 }, rates: { x: 'k + x - x^3' }, sweep: { parameter: 'k', from: 0, to: 1 } });
    expect(() => criticalCoupling(system)).toThrow(/^format: /);
  });

  it('names the option in a bad-option error and rejects node indices out of range', () => {
    const system = compileModelJson(cubicNetwork({ r: 0.1, nodes: ['p', 'q'], links: [{ from: 'p', to: 'q' }] }));
    expect(() => criticalCoupling(system, { pastFold: 0 })).toThrow(/^pastFold: /);
    expect(() => criticalCoupling(system, { nodes: [2] })).toThrow(/^nodes: /);
    expect(() => criticalCoupling(system, { from: 0.3, to: 0.3 })).toThrow(/^to: /);
    expect(() => criticalCoupling(system, { trace: { maxStep: -1 } })).toThrow(/^trace\.maxStep: /);
  });

  it('fails every node with an error diagnostic when an element is not bistable', () => {
    // r = 0.5 > 2/(3 sqrt 3) = 0.385: the cubic element has a single root.
    const system = compileModelJson(cubicNetwork({ r: 0.5, nodes: ['p', 'q'], links: [{ from: 'p', to: 'q' }] }));
    const res = criticalCoupling(system);
    expect(res.nodes.map((q) => q.status)).toEqual(['failed', 'failed']);
    expect(res.diagnostics.map((d) => d.code)).toContain('onset-undefined');
  });

  it('marks every node cancelled when the cancel hook answers true, and reports progress up to 1 otherwise', () => {
    const system = compileModelJson(cubicNetwork({ r: 0.1, nodes: ['p', 'q'], links: [{ from: 'p', to: 'q' }] }));
    const stopped = criticalCoupling(system, {}, { isCancelled: () => true });
    expect(stopped.nodes.map((q) => q.status)).toEqual(['cancelled', 'cancelled']);
    expect(stopped.diagnostics.map((d) => d.code)).toEqual(['cancelled']);
    expect(stopped.converged).toBe(false);
    const seen: number[] = [];
    criticalCoupling(system, {}, { onProgress: (f) => seen.push(f) });
    expect(seen).toEqual([0, 0.5, 1]);
  });

  it('does not mutate the options object and analyses only the nodes asked for', () => {
    const system = compileModelJson(cubicNetwork({ r: 0.1, nodes: ['p', 'q'], links: [{ from: 'p', to: 'q' }] }));
    const options = Object.freeze({ nodes: Object.freeze([1]), trace: Object.freeze({}) });
    const res = criticalCoupling(system, options);
    expect(res.nodes.map((q) => q.id)).toEqual(['q']);
  });
});
