import { describe, expect, it } from 'vitest';
import { buildMapFigure, nearestMark, pixelToParameters } from '../../../src/lib/plot/map-figure';
import { MAP_CURVE_STYLE, MAP_POINT_TYPES, mapPointPath } from '../../../src/lib/plot/map-glyphs';
import { markerPath, SPECIAL_TYPES } from '../../../src/lib/plot/markers';
import { NIGHT_PALETTE, PAPER_PALETTE } from '../../../src/lib/plot/palette';
import { figureToSvg } from '../../../src/lib/plot/svg';
import type { MapDocumentView } from '../../../src/lib/plot/map-types';

/** An invented map: a saddle-node curve through a cusp, a Hopf curve ending at a Bogdanov–Takens point. */
const map: MapDocumentView = {
  parameters: ['beta', 'r'],
  ranges: { first: [0, 1], second: [0.1, 0.3] },
  curves: [
    { id: 'sn1', type: 'saddle-node', points: [{ p: [0.2, 0.1], x: [1, 2] }, { p: [0.3, 0.2], x: [1.5, 2] }, { p: [0.4, 0.3], x: [2, 2] }] },
    { id: 'hopf1', type: 'hopf', points: [{ p: [0.5, 0.1], x: [0, 0], frequency: 0.5 }, { p: [0.6, 0.2], x: [0, 0], frequency: 0.25 }] },
  ],
  points: [{ id: 'bt1', type: 'bogdanov-takens', p: [0.6, 0.2], x: [0, 0], curves: ['sn1', 'hopf1'], evidence: { reason: 'double zero eigenvalue' } }],
  regions: [{ id: 'g1', regime: 'weak', samples: [[0.05, 0.2]] }, { id: 'g2', regime: 'strong', samples: [[0.9, 0.2]] }],
};

describe('buildMapFigure(input)', () => {
  const fig = buildMapFigure({ map, secondValue: 0.15, width: 600, variables: ['x1', 'x2'] });
  it('draws one path per curve with its type, the slice line, the point glyph and the regions', () => {
    const curves = fig.items.filter((p) => p.data?.curve);
    expect(curves.map((p) => [p.data!.curve, p.data!.type])).toEqual([['sn1', 'saddle-node'], ['hopf1', 'hopf']]);
    const hopf = curves[1] as { dash?: number[] };
    expect(hopf.dash).toEqual([...MAP_CURVE_STYLE.hopf.dash!]);
    expect(fig.items.some((p) => p.data?.layer === 'slice')).toBe(true);
    expect(fig.items.filter((p) => p.data?.point === 'bt1')).toHaveLength(1);
    expect(fig.items.filter((p) => p.data?.layer === 'region').map((p) => p.data!.regime).sort()).toEqual(['strong', 'weak']);
  });
  it('draws each slice computed on demand as a line at its value (the open one marked), and none outside the range', () => {
    const f = buildMapFigure({ map, secondValue: 0.15, width: 600, slices: [{ value: 0.2, active: true }, { value: 0.25 }, { value: 0.5 }] });
    const lines = f.items.filter((p) => p.data?.layer === 'slice' && p.data?.value);
    expect(lines.map((p) => [p.data!.value, p.data!.active])).toEqual([['0.2', 'true'], ['0.25', 'false']]);
    // A horizontal line at y = Y(value) across the plot.
    expect((lines[0] as { d: string }).d).toBe(`M${f.plot.x},${Math.round(f.yAxis.map(0.2) * 100) / 100}H${f.plot.x + f.plot.w}`);
    expect(f.items.some((p) => p.t === 'text' && p.text === 'r = 0.25')).toBe(true);
  });
  it('maps the ranges exactly onto the plot (no widened domain) and inverts pixels back to (p1, p2)', () => {
    expect(fig.xAxis.map(0)).toBeCloseTo(fig.plot.x, 9);
    expect(fig.xAxis.map(1)).toBeCloseTo(fig.plot.x + fig.plot.w, 9);
    expect(fig.yAxis.map(0.1)).toBeCloseTo(fig.plot.y + fig.plot.h, 9);
    const [a, b] = pixelToParameters(fig, fig.xAxis.map(0.37), fig.yAxis.map(0.123));
    expect(a).toBeCloseTo(0.37, 12);
    expect(b).toBeCloseTo(0.123, 12);
  });
  it('gives marks with the exact stored numbers in their readouts, and the Hopf frequency', () => {
    const bt = fig.marks.find((m) => m.id === 'bt1')!;
    expect(bt.readout).toEqual(['Bogdanov–Takens point bt1 (on sn1, hopf1)', 'beta = 0.6', 'r = 0.2', 'double zero eigenvalue', 'x1 = 0, x2 = 0']);
    const h = fig.probes.find((m) => m.id === 'hopf1:1')!;
    expect(h.readout).toContain('frequency ω = 0.25');
    expect(nearestMark(fig.probes, h.cx + 3, h.cy - 2)?.id).toBe('hopf1:1');
    expect(nearestMark(fig.probes, h.cx + 40, h.cy)).toBeNull();
  });
  it('names the legend entries present and only those', () => {
    const legend = fig.items.filter((p) => p.data?.legend).map((p) => p.data!.legend);
    expect(legend).toEqual(['saddle-node', 'hopf', 'bogdanov-takens', 'weak', 'strong', 'slice']);
  });
  it('adds the provenance footer with the indicative note, and serializes to SVG in either palette', () => {
    const withFooter = buildMapFigure({ map, palette: NIGHT_PALETTE, provenance: { modelName: 'Lakes', versionHash: 'abcdef0123456789', runId: '7', engineVersion: '1.6.0', date: '2026-12-04' } });
    const svg = figureToSvg(withFooter);
    expect(svg).toContain('run 7');
    expect(svg).toContain('indicative');
    expect(svg).toContain(NIGHT_PALETTE.paper);
    expect(figureToSvg(buildMapFigure({ map, palette: PAPER_PALETTE }))).toContain(PAPER_PALETTE.paper);
  });
});

describe('buildMapFigure with a point type the view does not know', () => {
  it('draws it with the fallback glyph, names it by its words in the legend and the readout', () => {
    const other = { ...map, points: [{ ...map.points[0], id: 'q1', type: 'degenerate-pitchfork' as never }] };
    const fig = buildMapFigure({ map: other });
    expect(fig.items.filter((p) => p.data?.point === 'q1')).toHaveLength(1);
    expect(fig.items.some((p) => p.t === 'text' && p.text === 'Degenerate pitchfork point')).toBe(true);
    expect(fig.marks.find((m) => m.id === 'q1')!.readout[0]).toBe('Degenerate pitchfork point q1 (on sn1, hopf1)');
  });
});

describe('mapPointPath(type, cx, cy, r)', () => {
  it('differs from every one-parameter glyph and between the point types', () => {
    const own = [...MAP_POINT_TYPES, 'some-other-type'].map((t) => mapPointPath(t, 0, 0, 8));
    expect(new Set(own).size).toBe(own.length);
    for (const t of SPECIAL_TYPES) for (const d of own) expect(d).not.toBe(markerPath(t, 0, 0, 8));
  });
});
