import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas';
import { compileModelJson } from '../../../src/lib/model';
import { noiseGraphAt, prepareEscapes, simulateEscapePaths } from '../../../src/lib/noise';
import { pathPicture, thinPolyline } from '../../../src/lib/noise/path-picture';
import { cubicNetwork } from '../regimes/fixtures';

const r = 0.1;
const beta = 0.1; // four stable states of the symmetric pair (tests/lib/noise/barriers.test.ts)
const spec = { level: 0.45, weights: new Float64Array([1, 1]) };
const pair = () => {
  const system = compileModelJson(cubicNetwork({ r, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay: true }], sweep: { parameter: 'beta', from: 0, to: 0.6 } }));
  return { system, diagram: traceDiagram(system) };
};
/** Closed potential of the symmetric pair, F = -grad V (derived in tests/lib/noise/gradient.test.ts). */
const V = (x: readonly number[]) => x.reduce((s, v) => s - r * v - (v * v) / 2 + v ** 4 / 4, 0) + (beta / 2) * (x[0] - x[1]) ** 2;

describe('pathPicture(system, diagram, spec, p)', () => {
  const { system, diagram } = pair();
  const pic = pathPicture(system, diagram, spec, beta, { paths: 3, seed: 7 });

  it('gives the escape graph of noiseGraphAt and one minimum-action path per edge out of the start state', () => {
    const g = noiseGraphAt(system, diagram, beta);
    if (!g.ok) throw new Error(g.reason);
    expect(pic.states.map((s) => s.x)).toEqual(g.graph.states.map((s) => s.x));
    expect(pic.saddles.map((s) => s.x)).toEqual(g.graph.saddles.map((s) => s.x));
    expect(pic.states[pic.start].label).toBe('all-base');
    const out = g.graph.saddles.map((e, k) => ({ e, k })).filter(({ e }) => e.from === pic.start || e.to === pic.start).map(({ k }) => k);
    expect(pic.minimumActionPaths.map((m) => m.saddle).sort()).toEqual(out.sort());
    expect(out.length).toBeGreaterThan(0);
    for (const m of pic.minimumActionPaths) {
      const first = m.path[0];
      const last = m.path[m.path.length - 1];
      expect(first).toEqual(pic.states[pic.start].x);
      expect(last).toEqual(pic.saddles[m.saddle].x);
      // Gradient system: barrier = 2 (V(saddle) - V(state)) (barriers.ts; the closed V above).
      expect(m.barrier).toBeCloseTo(2 * (V(last) - V(first)), 10);
    }
  });

  it('sample path i is path i of the study: the same escape times as simulateEscapePaths with the study settings', () => {
    const prep = prepareEscapes(system, diagram, spec, beta, { paths: 3, seed: 7, stepCheckPaths: 0 });
    const batch = simulateEscapePaths(system, prep.setup, { dt: prep.dt, tMax: prep.tMax, seed: 7, count: 3 });
    expect(pic.samples).toHaveLength(3);
    pic.samples.forEach((s, i) => {
      expect(s.steps).toBe(batch.steps[i]);
      expect(s.escapeTimes).toEqual([batch.times[i * 2], batch.times[i * 2 + 1]]);
      expect(s.points[0]).toEqual(Array.from(prep.setup.start));
      expect(s.points.length).toBeLessThanOrEqual(2000);
      expect(s.times[s.times.length - 1]).toBeCloseTo(s.steps * prep.dt, 12);
      expect(s.capped).toBe(batch.capped[i] === 1);
    });
  });

  it('thins long paths to at most maxPoints, keeping first and last, and stops at the step cap', () => {
    const small = pathPicture(system, diagram, spec, beta, { paths: 2, seed: 7, maxPoints: 50, maxSteps: 5000 });
    for (const s of small.samples) {
      expect(s.points.length).toBeLessThanOrEqual(50);
      expect(s.steps).toBeLessThanOrEqual(5000);
      expect(s.times[0]).toBe(0);
      for (let k = 1; k < s.times.length; k++) expect(s.times[k]).toBeGreaterThan(s.times[k - 1]);
    }
    expect(thinPolyline([[0], [1], [2], [3], [4]], 3)).toEqual([[0], [2], [4]]);
  });

  it('refuses models with other than 2 or 3 variables and bad counts, naming the field', () => {
    const one = compileModelJson(cubicNetwork({ r, nodes: ['a'], links: [], sweep: { parameter: 'beta', from: 0, to: 0.6 } }));
    expect(() => pathPicture(one, traceDiagram(one), { level: 0.45, weights: new Float64Array([1]) }, beta)).toThrow(/^model: .*2 or 3 state variables, the model has 1/);
    expect(() => pathPicture(system, diagram, spec, beta, { paths: 11 })).toThrow(/^paths: /);
    expect(() => pathPicture(system, diagram, spec, Number.NaN)).toThrow(/^p: /);
  });
});
