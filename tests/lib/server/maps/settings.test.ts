import { describe, expect, it } from 'vitest';
import { mapSettingsSchema } from '../../../../src/lib/server/maps/schema';
import { normalizeMapSettings } from '../../../../src/lib/server/maps/settings';
import { mapParameterChoices } from '../../../../src/lib/server/maps/parameters';
import { mapToCsv, documentVariables } from '../../../../src/lib/server/maps/csv';
import { HttpError } from '../../../../src/lib/server/http';
import { cubicNetwork } from '../../regimes/fixtures';

/** Invented: the symmetric cubic pair, and the same with r overridden on every node. */
const pair = cubicNetwork({ r: 0.1, nodes: ['x1', 'x2'], links: [{ from: 'x1', to: 'x2', twoWay: true }] });
const overridden = cubicNetwork({ r: 0.1, nodes: ['x1', 'x2'], links: [{ from: 'x1', to: 'x2', twoWay: true }], nodeR: { x1: 0.1, x2: 0.2 } });

const parse = (s: unknown) => mapSettingsSchema.parse(s);
function refusal(doc: unknown, s: unknown): HttpError {
  try { normalizeMapSettings(doc, parse(s)); } catch (e) { if (e instanceof HttpError) return e; throw e; }
  throw new Error('not refused');
}

describe('normalizeMapSettings(document, settings)', () => {
  it('drops the defaults and the document\'s own sweep, so equal requests hash alike', () => {
    expect(normalizeMapSettings(pair, parse({ second: 'r', secondFrom: 0.05, secondTo: 0.25, seeds: 5, from: 0, to: 1, maxCurves: 64 })))
      .toEqual({ second: 'r', secondFrom: 0.05, secondTo: 0.25 });
    expect(normalizeMapSettings(pair, parse({ second: 'r', secondFrom: 0.05, secondTo: 0.25, seeds: 3, from: 0.1, to: 0.9 })))
      .toEqual({ second: 'r', secondFrom: 0.05, secondTo: 0.25, seeds: 3, from: 0.1, to: 0.9 });
  });
  it('refuses a second parameter the engine\'s compiler refuses, naming settings.second', () => {
    expect(refusal(pair, { second: 'q', secondFrom: 0, secondTo: 1 })).toMatchObject({ status: 400, extra: { field: 'settings.second' } });
    expect(refusal(pair, { second: 'beta', secondFrom: 0, secondTo: 1 }).message).toMatch(/already the swept parameter/);
    expect(refusal(overridden, { second: 'r', secondFrom: 0, secondTo: 1 }).message).toMatch(/every node overrides 'r'/);
  });
});

describe('mapSettingsSchema', () => {
  it.each([
    [{ second: 'r', secondFrom: 0.1, secondTo: 0.1 }, 'secondTo'],
    [{ second: 'r', secondFrom: 0.1, secondTo: 0.2, regionColumns: 0 }, 'regionRows'],
    [{ second: 'r', secondFrom: 0.1, secondTo: 0.2, to: 1 }, 'from'],
    [{ second: 'r', secondFrom: 0.1, secondTo: 0.2, seeds: 26 }, 'seeds'],
    [{ second: 'r', secondFrom: 0.1, secondTo: 0.2, maxPointsPerCurve: 1.5 }, 'maxPointsPerCurve'],
    [{ second: '', secondFrom: 0.1, secondTo: 0.2 }, 'second'],
  ])('refuses %j at %s', (s, field) => {
    const r = mapSettingsSchema.safeParse(s);
    expect(r.success).toBe(false);
    expect(r.error!.issues[0].path).toEqual([field]);
  });
});

describe('mapParameterChoices(document)', () => {
  it('offers what compileTwoParameter accepts as second: not the swept one, not one every node overrides', () => {
    expect(mapParameterChoices(pair)).toEqual({ swept: 'beta', parameters: [{ name: 'r', value: 0.1 }] });
    expect(mapParameterChoices(overridden).parameters).toEqual([]);
    expect(mapParameterChoices({ ...pair, sweep: { parameter: 'r', from: 0, to: 1 } }).parameters).toEqual([{ name: 'beta', value: 0 }]);
  });
});

describe('mapToCsv(map, provenance, variables)', () => {
  it('writes one row per curve point with the state columns named after the variables', () => {
    const csv = mapToCsv({
      parameters: ['beta', 'r'],
      curves: [{ id: 'h1', type: 'hopf', points: [{ p: [0.5, 0.1], x: [1, -1], frequency: 0.3 }, { p: [0.6, 0.2], x: [2, -2], frequency: 0.2 }] }],
    }, { model: 'a, "quoted" model' }, documentVariables(pair));
    const lines = csv.trim().split('\n');
    // Provenance lines are comments, written as they are (as the escape study's CSV does).
    expect(lines[1]).toBe('# model: a, "quoted" model');
    expect(lines.slice(3)).toEqual(['curve,type,point,beta,r,frequency,x_x1,x_x2', 'h1,hopf,0,0.5,0.1,0.3,1,-1', 'h1,hopf,1,0.6,0.2,0.2,2,-2']);
  });
});
