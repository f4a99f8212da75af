import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas/index.js';
import { compileModelJson, ModelError } from '../../../src/lib/model/index.js';

const ode = (rate: string, sweep: { from: number; to: number }, start?: number[][]) => ({
  format: 'brinkmap/ode-1',
  name: 'robustness case (invented)',
  variables: ['x'],
  parameters: { p: 0 },
  rates: { x: rate },
  sweep: { parameter: 'p', ...sweep },
  ...(start ? { start } : {}),
});

const chain = (nodes: number) => ({
  format: 'brinkmap/network-1',
  name: `Chain of ${nodes} cubic elements (invented)`,
  element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
  nodes: Array.from({ length: nodes }, (_, i) => ({ id: `n${i + 1}` })),
  links: Array.from({ length: nodes - 1 }, (_, i) => ({ from: `n${i + 1}`, to: `n${i + 2}`, weight: 1, twoWay: true })),
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 1 },
});

describe('traceDiagram robustness', () => {
  it('returns an empty diagram with a diagnostic when there is no equilibrium at the sweep start', () => {
    // x' = p + x^2 + 1 > 0 for p in [0, 1]: no real equilibrium anywhere in range.
    const d = traceDiagram(compileModelJson(ode('p + x^2 + 1', { from: 0, to: 1 })));
    expect(d.branches).toEqual([]);
    expect(d.bifurcations).toEqual([]);
    expect(d.diagnostics.map((g) => g.code)).toContain('no-starting-equilibrium');
  });

  it('traces from a singular start (a fold exactly on the sweep bound) and says so', () => {
    // x' = p + x^2 at p = 0: x = 0 is a double root, J_x = 0; for p < 0 the branch is x = +-sqrt(-p).
    const d = traceDiagram(compileModelJson(ode('p + x^2', { from: 0, to: -1 }, [[0]])));
    expect(d.diagnostics.map((g) => g.code)).toContain('singular-start');
    expect(d.branches).toHaveLength(1);
    const xs = d.branches[0].points.map((q) => q.x[0]);
    expect(Math.min(...xs)).toBeCloseTo(-1, 9);
    expect(Math.max(...xs)).toBeCloseTo(1, 9);
    for (const q of d.branches[0].points) expect(q.x[0] ** 2).toBeCloseTo(-q.p, 9);
  });

  it('runs a 64-node chain within the caps from one starting pattern, saying the patterns were limited', () => {
    // 3^64 uncoupled combinations exceed the enumeration limit: patterns only, and one traced here.
    const d = traceDiagram(compileModelJson(chain(64)), { maxStartingPoints: 1 });
    const codes = d.diagnostics.map((g) => g.code);
    expect(codes).toContain('start-patterns-limited');
    expect(codes).toContain('starting-points-capped');
    expect(d.branches).toHaveLength(1);
    // The all-base state is uniform, so diffusive coupling leaves it unchanged over the whole sweep.
    const pts = d.branches[0].points;
    expect(pts[0].p).toBe(0);
    expect(pts.at(-1)!.p).toBe(1);
    expect(pts.every((q) => q.x.length === 64 && q.unstable === 0)).toBe(true);
  }, 60_000);

  it('refuses a 65-node network, naming the 64-node cap', () => {
    expect(() => compileModelJson(chain(65))).toThrow(ModelError);
    expect(() => compileModelJson(chain(65))).toThrow(/64/);
  });

  it('rejects garbage expressions with a ModelError naming the field', () => {
    for (const rate of ['x +* 2', 'foo(x)', 'x; p', 'import("fs")', '']) {
      let err: unknown;
      try {
        compileModelJson(ode(rate, { from: 0, to: 1 }));
      } catch (e) {
        err = e;
      }
      expect(err, rate).toBeInstanceOf(ModelError);
      expect((err as ModelError).message, rate).toMatch(/rates/);
    }
  });

  it('ends in diagnostics, not exceptions, where rates blow up or stop being finite', () => {
    // x' = 1/x - p: x = 1/p runs off to infinity as p -> 0+ (sweep from 1 towards -1); the branch
    // turns vertical and ends at the point cap (or the state bound), never reaching p = 0.
    const blow = traceDiagram(compileModelJson(ode('1/x - p', { from: 1, to: -1 }, [[1]])), { maxPointsPerBranch: 4000 });
    expect(blow.branches.length).toBeGreaterThan(0);
    expect(blow.branches[0].ends.some((e) => e === 'state-bound' || e === 'point-cap' || e === 'step-collapse')).toBe(true);
    expect(blow.branches[0].points.every((q) => q.p > 0)).toBe(true);
    expect(blow.diagnostics.some((g) => g.level === 'warning')).toBe(true);
    // x' = sqrt(x) - p: x = p^2, the Jacobian is infinite at x = 0 and NaN beyond.
    const root = traceDiagram(compileModelJson(ode('sqrt(x) - p', { from: 1, to: -1 }, [[1]])));
    expect(root.branches.length).toBeGreaterThan(0);
    expect(root.branches[0].points.every((q) => q.x.every(Number.isFinite))).toBe(true);
    expect(root.diagnostics.some((g) => g.level === 'warning')).toBe(true);
    // x' = log(x) + p from the guess x = -1: NaN rates there; only finite equilibria may come out.
    const nan = traceDiagram(compileModelJson(ode('log(x) + p', { from: 0, to: 1 }, [[-1]])));
    expect(nan.branches.every((b) => b.points.every((q) => q.x.every(Number.isFinite)))).toBe(true);
  });

  it('stops when cancelled and returns a partial diagram with a cancelled diagnostic', () => {
    let calls = 0;
    const d = traceDiagram(compileModelJson(chain(3)), {}, { isCancelled: () => ++calls > 200 });
    expect(d.diagnostics.map((g) => g.code)).toContain('cancelled');
    const total = d.branches.reduce((s, b) => s + b.points.length, 0);
    expect(total).toBeLessThan(400);
  });

  it('reports progress often, non-decreasing in [0, 1], ending at 1', () => {
    const seen: number[] = [];
    traceDiagram(compileModelJson(chain(3)), {}, { onProgress: (f) => seen.push(f) });
    expect(seen.length).toBeGreaterThan(10);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
    expect(seen.every((f) => f >= 0 && f <= 1)).toBe(true);
    expect(seen.at(-1)).toBe(1);
  });

  it('returns an error diagnostic for invalid settings instead of throwing', () => {
    const d = traceDiagram(compileModelJson(ode('p - x', { from: 0, to: 1 })), { maxStep: -1 });
    expect(d.diagnostics[0]).toMatchObject({ level: 'error', code: 'invalid-settings' });
    expect(d.diagnostics[0].message).toMatch(/maxStep/);
    expect(d.branches).toEqual([]);
  });
});
