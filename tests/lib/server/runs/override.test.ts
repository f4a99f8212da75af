import { describe, expect, it } from 'vitest';
import { computeTrace, documentForRun } from '../../../../src/lib/server/runs/compute';
import { traceRunSettingsSchema, startRunSchema } from '../../../../src/lib/server/runs/schemas';
import { checkOverride } from '../../../../src/lib/server/runs/override';
import { normalizeSettings } from '../../../../src/lib/server/runs/normalize-settings';
import { resultCacheKey } from '../../../../src/lib/server/runs/cache-key';
import { HttpError } from '../../../../src/lib/server/http';
import { decodeDiagramText } from '../../../../src/lib/storage/diagram-codec';

/** Symmetric cubic pair x_i' = r + x_i - x_i^3 + beta (x_j - x_i), invented (as tests/lib/regimes/fixtures.ts). */
const pair = (r: number) => ({
  format: 'brinkmap/network-1', name: 'override pair (invented)',
  element: { variable: 'x', rate: 'r + x - x^3', parameters: { r } },
  nodes: [{ id: 'x1' }, { id: 'x2' }], links: [{ from: 'x1', to: 'x2', weight: 1, twoWay: true }],
  coupling: { parameter: 'beta', value: 0 }, sweep: { parameter: 'beta', from: 0, to: 1 },
});
const hooks = { onProgress: () => undefined, isCancelled: () => false };
const field = (f: () => unknown) => { try { f(); } catch (e) { return e instanceof HttpError ? e.extra.field ?? e.message : String(e); } return null; };

describe('traceRunSettingsSchema', () => {
  it('accepts one override { parameter, value } beside the engine settings', () => {
    expect(traceRunSettingsSchema.parse({ from: 0, to: 1, override: { parameter: 'r', value: 0.2 } })).toEqual({ from: 0, to: 1, override: { parameter: 'r', value: 0.2 } });
  });
  it('refuses a value that is not a finite number, an empty name and unknown keys, naming the path', () => {
    const path = (v: unknown) => { const r = traceRunSettingsSchema.safeParse(v); return r.success ? null : r.error.issues[0].path.join('.'); };
    expect(path({ override: { parameter: 'r', value: Number.POSITIVE_INFINITY } })).toBe('override.value');
    expect(path({ override: { parameter: 'r', value: '0.2' } })).toBe('override.value');
    expect(path({ override: { parameter: '', value: 0.2 } })).toBe('override.parameter');
    expect(path({ override: { parameter: 'r', value: 0.2, more: 1 } })).toBe('override');
    // The cross-field checks of the plain schema still hold.
    expect(path({ from: 1, to: 1, override: { parameter: 'r', value: 0.2 } })).toBe('to');
  });
  it('is the trace kind of POST /api/runs (absent kind included)', () => {
    const r = startRunSchema.parse({ modelId: 1, settings: { override: { parameter: 'r', value: 0.2 } } });
    expect(r).toMatchObject({ kind: 'trace', settings: { override: { parameter: 'r', value: 0.2 } } });
  });
});

describe('checkOverride(document, override)', () => {
  it('refuses the swept parameter and one the model does not have, naming settings.override.parameter', () => {
    expect(field(() => checkOverride(pair(0.1), { parameter: 'beta', value: 0.3 }))).toBe('settings.override.parameter');
    expect(field(() => checkOverride(pair(0.1), { parameter: 'q', value: 0.3 }))).toBe('settings.override.parameter');
    expect(field(() => checkOverride(pair(0.1), { parameter: 'r', value: 0.3 }))).toBeNull();
  });
  it('refuses an element parameter that every node overrides (it would change nothing)', () => {
    const doc = { ...pair(0.1), nodes: [{ id: 'x1', parameters: { r: 0.1 } }, { id: 'x2', parameters: { r: 0.2 } }] };
    expect(field(() => checkOverride(doc, { parameter: 'r', value: 0.3 }))).toBe('settings.override.parameter');
  });
  it('uses the caller\'s field names (the slices route says `value`)', () => {
    expect(field(() => checkOverride(pair(0.1), { parameter: 'beta', value: 0.3 }, { parameter: 'value', value: 'value' }))).toBe('value');
  });
});

describe('documentForRun(documentText, settings) and computeTrace with an override', () => {
  it('gives the engine the settings without the override and the document with the value set', () => {
    const { document, engineSettings } = documentForRun(JSON.stringify(pair(0.1)), { from: 0, to: 0.5, override: { parameter: 'r', value: 0.2 } });
    expect(engineSettings).toEqual({ from: 0, to: 0.5 });
    expect(document).toEqual(pair(0.2));
  });
  it('traces exactly the diagram of the document with the value typed in', () => {
    const viaOverride = computeTrace(JSON.stringify(pair(0.1)), { override: { parameter: 'r', value: 0.2 } }, hooks);
    const typedIn = computeTrace(JSON.stringify(pair(0.2)), {}, hooks);
    const plain = computeTrace(JSON.stringify(pair(0.1)), {}, hooks);
    const strip = (text: string) => { const d = JSON.parse(text); delete d.computeMs; delete d.timings; return d; };
    expect(strip(decodeDiagramText(viaOverride.diagramBlob))).toEqual(strip(decodeDiagramText(typedIn.diagramBlob)));
    expect(viaOverride.regimesJson).toBe(typedIn.regimesJson);
    expect(decodeDiagramText(plain.diagramBlob)).not.toBe(decodeDiagramText(typedIn.diagramBlob));
  });
  it('the override is part of the cache key: the same value shares it, another value or none does not', () => {
    const key = (s: object) => resultCacheKey('trace', 'h', normalizeSettings(pair(0.1), s), 'e');
    expect(key({ override: { value: 0.2, parameter: 'r' } })).toBe(key({ override: { parameter: 'r', value: 0.2 } }));
    expect(key({ override: { parameter: 'r', value: 0.2 } })).not.toBe(key({ override: { parameter: 'r', value: 0.21 } }));
    expect(key({ override: { parameter: 'r', value: 0.2 } })).not.toBe(key({}));
  });
});
