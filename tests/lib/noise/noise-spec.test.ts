import { describe, expect, it } from 'vitest';
import { validateModelDocument } from '../../../src/lib/model';
import { NoiseSettingError, resolveNoise, sigmaOf } from '../../../src/lib/noise';
import { cubicNetwork } from '../regimes/fixtures';

function doc(noise?: unknown) {
  const d: Record<string, unknown> = cubicNetwork({ r: 0.1, nodes: ['upper', 'lower'], links: [{ from: 'upper', to: 'lower' }] });
  if (noise !== undefined) d.noise = noise;
  const v = validateModelDocument(d);
  if (!v.ok) throw new Error(JSON.stringify(v.issues));
  return v.document;
}

describe('resolveNoise(document, override)', () => {
  it('gives every variable the amplitude when there are no overrides', () => {
    const s = resolveNoise(doc({ amplitude: 0.2 }));
    expect(s.level).toBe(0.2);
    expect(Array.from(s.weights)).toEqual([1, 1]);
    expect(Array.from(sigmaOf(s))).toEqual([0.2, 0.2]);
  });

  it('turns per-node sigmas into weights relative to the amplitude', () => {
    const s = resolveNoise(doc({ amplitude: 0.2, perNode: { lower: 0.05 } }));
    expect(Array.from(s.weights)).toEqual([1, 0.25]);
    expect(sigmaOf(s)[1]).toBeCloseTo(0.05, 15);
  });

  it('rescales the whole vector, ratios kept, when a level is given', () => {
    const s = resolveNoise(doc({ amplitude: 0.2, perNode: { lower: 0.05 } }), 0.4);
    expect(s.level).toBe(0.4);
    expect(sigmaOf(s)[1]).toBeCloseTo(0.1, 15);
  });

  it('uses the given level with unit weights for a document without noise', () => {
    const s = resolveNoise(doc(), 0.3);
    expect(s.level).toBe(0.3);
    expect(Array.from(s.weights)).toEqual([1, 1]);
  });

  it('refuses a missing, zero, negative or non-finite level, naming the field', () => {
    expect(() => resolveNoise(doc())).toThrow(NoiseSettingError);
    expect(() => resolveNoise(doc())).toThrow(/^noise: the model has no noise field/);
    for (const bad of [0, -0.1, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(() => resolveNoise(doc({ amplitude: 0.1 }), bad)).toThrow(/^noise: must be a positive finite number/);
    }
  });
});
