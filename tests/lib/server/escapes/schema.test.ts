import { describe, expect, it } from 'vitest';
import { escapeSettingsSchema, expandValues } from '../../../../src/lib/server/escapes/schema.ts';
import { startRunSchema } from '../../../../src/lib/server/runs/schemas.ts';
import { checkRequestBudget, normalizeEscapeSettings } from '../../../../src/lib/server/escapes/settings.ts';
import { resultCacheKey } from '../../../../src/lib/server/runs/cache-key.ts';

const issuePath = (r: { success: boolean; error?: { issues: { path: (string | number)[] }[] } }) => r.error?.issues.map((i) => i.path.join('.'));

const doc = {
  format: 'brinkmap/network-1', name: 'Invented pair',
  element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
  nodes: [{ id: 'upper' }, { id: 'lower' }], links: [{ from: 'upper', to: 'lower', weight: 1 }],
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 0.3 },
  noise: { amplitude: 0.2 },
};

describe('escape settings schema', () => {
  it('fills the defaults and accepts a list or a grid', () => {
    const s = escapeSettingsSchema.parse({ values: [0.1, 0.2] });
    expect(s).toEqual({ values: [0.1, 0.2], start: 'all-base', paths: 1000, seed: 1, threads: 1, atlas: {} });
    const g = escapeSettingsSchema.parse({ from: 0, to: 0.2, count: 5 });
    expect(expandValues(g)).toEqual([0, 0.05, 0.1, 0.15000000000000002, 0.2]);
    expect(expandValues(escapeSettingsSchema.parse({ from: 0.1, to: 0.1, count: 1 }))).toEqual([0.1]);
  });

  it('names the field of every bad setting', () => {
    expect(issuePath(escapeSettingsSchema.safeParse({}))).toEqual(['values']);
    expect(issuePath(escapeSettingsSchema.safeParse({ values: [0.1], count: 3 }))).toEqual(['values']);
    expect(issuePath(escapeSettingsSchema.safeParse({ from: 0, to: 1 }))).toEqual(['count']);
    expect(issuePath(escapeSettingsSchema.safeParse({ from: 0.1, to: 0.1, count: 3 }))).toEqual(['to']);
    expect(issuePath(escapeSettingsSchema.safeParse({ values: [] }))).toEqual(['values']);
    expect(issuePath(escapeSettingsSchema.safeParse({ values: [0.1], paths: 1.5 }))).toEqual(['paths']);
    expect(issuePath(escapeSettingsSchema.safeParse({ values: [0.1], dt: 0 }))).toEqual(['dt']);
    expect(issuePath(escapeSettingsSchema.safeParse({ values: [0.1], seed: -1 }))).toEqual(['seed']);
    expect(issuePath(escapeSettingsSchema.safeParse({ values: [0.1], start: 'tipped' }))).toEqual(['start']);
    expect(issuePath(escapeSettingsSchema.safeParse({ values: [0.1], atlas: { from: 0, to: 0 } }))).toEqual(['atlas.to']);
    expect(escapeSettingsSchema.safeParse({ values: [0.1], extra: 1 }).success).toBe(false);
  });

  it('POST /api/runs: kind defaults to trace; escapes needs its own settings; unknown kinds are refused at kind', () => {
    expect(startRunSchema.parse({ modelId: 1 })).toMatchObject({ kind: 'trace', settings: {} });
    expect(startRunSchema.parse({ modelId: 1, kind: 'escapes', settings: { values: [0.1] } })).toMatchObject({ kind: 'escapes', settings: { paths: 1000 } });
    expect(issuePath(startRunSchema.safeParse({ modelId: 1, kind: 'escapes' }))).toEqual(['settings']);
    expect(issuePath(startRunSchema.safeParse({ modelId: 1, kind: 'escapes', settings: { paths: 5 } }))).toEqual(['settings.values']);
    expect(issuePath(startRunSchema.safeParse({ modelId: 1, kind: 'other' }))).toEqual(['kind']);
    // A trace run's settings are not an escape study's and the other way round.
    expect(startRunSchema.safeParse({ modelId: 1, settings: { values: [0.1] } }).success).toBe(false);
  });
});

describe('normalized escape settings', () => {
  it('resolve the noise from the document, spell out the values and leave threads out of the identity', () => {
    const a = normalizeEscapeSettings(doc, escapeSettingsSchema.parse({ from: 0, to: 0.2, count: 3, threads: 1 }));
    const b = normalizeEscapeSettings(doc, escapeSettingsSchema.parse({ values: [0, 0.1, 0.2], noise: 0.2, threads: 2 }));
    expect(a.identity).toEqual(b.identity);
    expect(a.identity.noise).toBe(0.2);
    expect(a.stored.threads).toBe(1);
    expect(b.stored.threads).toBe(2);
    expect(resultCacheKey('escapes', 'h', a.identity, 'e')).toBe(resultCacheKey('escapes', 'h', b.identity, 'e'));
    expect(resultCacheKey('escapes', 'h', a.identity, 'e')).not.toBe(resultCacheKey('trace', 'h', a.identity, 'e'));
    const c = normalizeEscapeSettings(doc, escapeSettingsSchema.parse({ values: [0, 0.1, 0.2], seed: 2 }));
    expect(resultCacheKey('escapes', 'h', c.identity, 'e')).not.toBe(resultCacheKey('escapes', 'h', a.identity, 'e'));
  });

  it('refuse values outside the atlas sweep and a missing noise level, naming the field', () => {
    expect(() => normalizeEscapeSettings(doc, escapeSettingsSchema.parse({ values: [0.1, 0.4] }))).toThrow(/^settings\.values: 0\.4 lies outside/);
    expect(() => normalizeEscapeSettings(doc, escapeSettingsSchema.parse({ values: [0.4], atlas: { to: 0.5 } }))).not.toThrow();
    const noNoise = { ...doc, noise: undefined };
    try {
      normalizeEscapeSettings(noNoise, escapeSettingsSchema.parse({ values: [0.1] }));
      expect.unreachable();
    } catch (e) {
      expect((e as { extra: { field: string } }).extra.field).toBe('settings.noise');
    }
  });

  it('the request budget: paths (+ 2 x step-check paths) x tMax / dt x variables against the per-value budget', () => {
    const ok = normalizeEscapeSettings(doc, escapeSettingsSchema.parse({ values: [0.1], paths: 1000, dt: 0.01, tMax: 100 }));
    // (1000 + 1000) x 10 000 x 2 = 4e7 node-steps: fine.
    expect(() => checkRequestBudget(doc, ok.stored)).not.toThrow();
    expect(() => checkRequestBudget(doc, ok.stored, 3.9e7)).toThrow(/4\.00e\+7 node-steps per parameter value/);
    const big = normalizeEscapeSettings(doc, escapeSettingsSchema.parse({ values: [0.1, 0.2], paths: 1_000_000, dt: 0.01, tMax: 1000 }));
    expect(() => checkRequestBudget(doc, big.stored)).toThrow(/2\.00e\+11 node-steps per parameter value .*4\.00e\+11 for all 2 values/);
    // Without dt or tMax the defaults need the start state: checked by the worker instead.
    const open = normalizeEscapeSettings(doc, escapeSettingsSchema.parse({ values: [0.1], paths: 1_000_000 }));
    expect(() => checkRequestBudget(doc, open.stored)).not.toThrow();
  });
});
