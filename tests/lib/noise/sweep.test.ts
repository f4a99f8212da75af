import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../src/lib/model';
import { traceDiagram } from '../../../src/lib/atlas';
import { sweepEscapes, sweepEscapesWith, parameterGrid, type PathRunner } from '../../../src/lib/noise/sweep';
import { mergeBatches, simulateEscapePaths } from '../../../src/lib/noise/monte-carlo';
import { cubicNetwork } from '../regimes/fixtures';

describe('parameterGrid(from, to, count)', () => {
  it('gives count equally spaced values including both ends', () => {
    expect(parameterGrid(0, 1, 5)).toEqual([0, 0.25, 0.5, 0.75, 1]);
    expect(parameterGrid(2, 3, 1)).toEqual([2]);
    expect(() => parameterGrid(0, 1, 0)).toThrow(/count/);
  });
});

describe('sweepEscapes(system, diagram, spec, ps)', () => {
  // Symmetric pair of identical cubic elements (invented toy): exchanging a and b maps the model to
  // itself, so "a first" and "b first" are equally likely at every coupling (symmetry, no source).
  const system = compileModelJson(cubicNetwork({ r: 0.1, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay: true }], sweep: { parameter: 'beta', from: 0, to: 0.2 } }));
  const diagram = traceDiagram(system);
  const spec = { level: 0.55, weights: Float64Array.of(1, 1) };
  const sweep = sweepEscapes(system, diagram, spec, [0.02, 0.08, 0.14], { paths: 40, seed: 5, stepCheckPaths: 0, exitSwitches: false });

  it('reports every point with its prediction and the band edges on the same axis', () => {
    expect(sweep.parameter).toBe('beta');
    expect(sweep.points.map((q) => q.p)).toEqual([0.02, 0.08, 0.14]);
    for (const q of sweep.points) {
      expect(q.report).not.toBeNull();
      const r = q.report!;
      expect(r.sequences.reduce((s, x) => s + x.count, 0) + r.capped).toBe(40);
      for (const s of r.prediction.sequences) expect(s.probability).toBeCloseTo(0.5, 6);
    }
    expect(sweep.bandEdges.length).toBeGreaterThan(0);
  });

  it('sees "a first" in about half of all paths (binomial, 3 standard deviations)', () => {
    let aFirst = 0;
    let total = 0;
    for (const q of sweep.points) {
      for (const s of q.report!.sequences) {
        total += s.count;
        if (s.order[0] === 'a') aFirst += s.count;
      }
    }
    expect(Math.abs(aFirst - total / 2)).toBeLessThan(3 * Math.sqrt(total / 4));
  });
});

describe('sweepEscapesWith(system, diagram, spec, ps, runner)', () => {
  // Reference: sweepEscapes in this thread. A runner that cuts every run into ranges and merges them
  // (what the escape pool does on several threads) must give the same sweep, number for number.
  it('gives the same sweep as sweepEscapes when the runner splits the paths into ranges', async () => {
    const system = compileModelJson(cubicNetwork({ r: 0.1, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay: true }], sweep: { parameter: 'beta', from: 0, to: 0.2 } }));
    const diagram = traceDiagram(system);
    const spec = { level: 0.55, weights: Float64Array.of(1, 1) };
    const options = { paths: 30, seed: 9, stepCheckPaths: 10, exitSwitches: false };
    const ps = [0.03, 0.12];
    const direct = sweepEscapes(system, diagram, spec, ps, options);
    const runner: PathRunner = async (setup, run) => {
      const cut = Math.floor(run.count / 3);
      const parts = [
        simulateEscapePaths(system, setup, { ...run, first: cut, count: run.count - cut }),
        simulateEscapePaths(system, setup, { ...run, first: 0, count: cut }),
      ];
      return mergeBatches(parts);
    };
    const pooled = await sweepEscapesWith(system, diagram, spec, ps, runner, options);
    expect(JSON.stringify(pooled)).toBe(JSON.stringify(direct));
  });
});
