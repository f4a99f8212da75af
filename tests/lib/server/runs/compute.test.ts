import { describe, expect, it } from 'vitest';
import { computeTrace } from '../../../../src/lib/server/runs/compute';
import { compileModelJson } from '../../../../src/lib/model/index';
import { criticalCoupling } from '../../../../src/lib/onset/index';

// The first demo variant's document (seeds/02_demo_models.ts, invented lakes), copied: the seed imports the database layer.
const fenn = {
  format: 'brinkmap/network-1', name: 'Fenn lakes, downstream flow only',
  element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
  nodes: [{ id: 'upper', parameters: { a: 0.08 } }, { id: 'middle', parameters: { a: 0.06 } }, { id: 'lower', parameters: { a: 0.05 } }],
  links: [{ from: 'upper', to: 'middle', weight: 1 }, { from: 'middle', to: 'lower', weight: 1 }],
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 1.2 },
};
const hooks = { onProgress: () => undefined, isCancelled: () => false };

describe('computeTrace(documentText, settings, hooks)', () => {
  it('stores the critical coupling per node beside the bands: the onset analysis over the same range', () => {
    const out = computeTrace(JSON.stringify(fenn), {}, hooks);
    const stored = JSON.parse(out.regimesJson) as { regimes: unknown[]; onset: { parameter: string; from: number; to: number; nodes: { id: string; critical: number | null; next: string[] | null }[] } };
    expect(stored.regimes.length).toBeGreaterThan(0);
    expect(stored.onset.parameter).toBe('beta');
    expect([stored.onset.from, stored.onset.to]).toEqual([0, 1.2]);
    const direct = criticalCoupling(compileModelJson(fenn), { from: 0, to: 1.2 });
    expect(stored.onset.nodes.map((n) => [n.id, n.critical, n.next])).toEqual(direct.nodes.map((n) => [n.id, n.critical, n.next]));
    expect(stored.onset.nodes.some((n) => n.critical !== null)).toBe(true);
  });

  it('a sweep of another parameter than the coupling stores no onset, and the run still completes', () => {
    const doc = { ...fenn, sweep: { parameter: 'b', from: 0.55, to: 0.65 } };
    const out = computeTrace(JSON.stringify(doc), {}, hooks);
    expect(JSON.parse(out.regimesJson).onset).toBeUndefined();
  });

  it('a cancelled run computes no onset', () => {
    const out = computeTrace(JSON.stringify(fenn), {}, { onProgress: () => undefined, isCancelled: () => true });
    expect(out.cancelled).toBe(true);
    expect(JSON.parse(out.regimesJson).onset).toBeUndefined();
  });
});
