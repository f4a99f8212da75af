import { describe, expect, it } from 'vitest';
import { buildChart, logAxis, SERIES_DARK, SERIES_LIGHT, seriesStyle, shapePath, MARKER_SHAPES } from '../../../src/lib/plot/escape-chart';
import { contrastRatio, NIGHT_PALETTE, PAPER_PALETTE } from '../../../src/lib/plot/palette';
import { figureToSvg } from '../../../src/lib/plot/svg';

describe('logAxis(domain, range)', () => {
  it('widens [3, 420] to whole decades [1, 1000] and ticks at 1, 2, 5 × 10^k (span of three decades at most)', () => {
    const a = logAxis([3, 420], [300, 0]);
    expect(a.domain).toEqual([1, 1000]);
    expect(a.ticks.map((t) => t.value)).toEqual([1, 2, 5, 10, 20, 50, 100, 200, 500, 1000]);
    expect(a.map(1)).toBeCloseTo(300, 9);
    expect(a.map(1000)).toBeCloseTo(0, 9);
    // log10(10) is a third of log10(1000): a third of the way up (derived).
    expect(a.map(10)).toBeCloseTo(200, 9);
  });
  it('over many decades only the decades are ticked', () => {
    expect(logAxis([0.02, 3e4], [100, 0]).ticks.map((t) => t.value)).toEqual([0.01, 0.1, 1, 10, 100, 1000, 10000, 100000]);
  });
  it('a reversed, empty or non-positive domain still gives a drawable axis', () => {
    expect(logAxis([50, 5], [1, 0]).domain).toEqual([1, 100]);
    expect(logAxis([7, 7], [1, 0]).domain).toEqual([1, 10]);
    expect(logAxis([0, -1], [1, 0]).domain).toEqual([1, 10]);
  });
});

describe('shapePath(shape, cx, cy, r)', () => {
  it('every shape is a closed path inside its radius', () => {
    for (const shape of MARKER_SHAPES) {
      const d = shapePath(shape, 10, 10, 4);
      expect(d.endsWith('Z')).toBe(true);
      const nums = (d.match(/-?\d+(\.\d+)?/g) ?? []).map(Number);
      if (shape !== 'circle') for (const v of nums) { expect(v).toBeGreaterThanOrEqual(6 - 1e-9); expect(v).toBeLessThanOrEqual(14 + 1e-9); }
    }
  });
});

describe('buildChart(input)', () => {
  const input = {
    title: 't', xLabel: 'x', yLabel: 'y',
    series: [
      { label: 'one', colour: 0, shape: 'circle' as const, points: [{ x: 0, y: 0.2, low: 0.1, high: 0.3, readout: ['a'] }, { x: 1, y: 0.4, readout: ['b'] }], line: [{ x: 0, y: 0.25 }, { x: 1, y: 0.35 }], dashed: true },
      { label: 'two', colour: 1, shape: 'square' as const, points: [{ x: 0.5, y: 0.6, readout: ['c'] }] },
    ],
    vmarks: [{ x: 0.7, y: 0.5, label: 'exit switch', readout: ['d'] }],
  };
  it('one mark and one point primitive per estimate, one interval bar per estimate with an interval', () => {
    const fig = buildChart(input);
    expect(fig.marks.filter((m) => m.kind === 'point')).toHaveLength(3);
    expect(fig.marks.filter((m) => m.kind === 'vmark')).toHaveLength(1);
    expect(fig.items.filter((p) => p.data?.mark === 'point')).toHaveLength(3);
    expect(fig.items.filter((p) => p.data?.layer === 'interval')).toHaveLength(1);
    expect(fig.items.filter((p) => p.data?.layer === 'line')).toHaveLength(1);
  });
  it('marks sit where the axes put their values: higher y is higher on the page, larger x further right', () => {
    const fig = buildChart(input);
    const [a, b] = fig.marks.filter((m) => m.series === 0);
    expect(b.cx).toBeGreaterThan(a.cx);
    expect(b.cy).toBeLessThan(a.cy);
    expect(a.x).toBe(0);
    for (const m of fig.marks) {
      expect(m.cx).toBeGreaterThanOrEqual(fig.plot.x);
      expect(m.cx).toBeLessThanOrEqual(fig.plot.x + fig.plot.w);
    }
  });
  it('a footer adds the provenance lines and the indicative note, and the SVG carries one data-mark per point', () => {
    const fig = buildChart({ ...input, footer: ['Model m · version abc', 'Escape study: noise level 0.4'] });
    const texts = fig.items.flatMap((p) => (p.t === 'text' ? [p.text] : []));
    expect(texts).toContain('Model m · version abc');
    expect(texts.some((t) => t.startsWith('Model results are indicative'))).toBe(true);
    const svg = figureToSvg(fig);
    expect(svg.match(/data-mark="point"/g)).toHaveLength(3);
  });
  it('a log axis drops nothing positive and clamps nothing inside the domain', () => {
    const fig = buildChart({ ...input, yLog: true, series: [{ label: 'one', colour: 0, shape: 'circle', points: [{ x: 0, y: 3, readout: [] }, { x: 1, y: 300, readout: [] }] }], vmarks: [] });
    const [lo, hi] = fig.marks;
    expect(lo.cy).toBeLessThan(fig.plot.y + fig.plot.h);
    expect(hi.cy).toBeGreaterThan(fig.plot.y);
  });
});

describe('series colours', () => {
  it('reach 3:1 against their paper (WCAG 2.1, 1.4.11 non-text contrast) in both sets', () => {
    for (const c of SERIES_LIGHT) expect(contrastRatio(c, PAPER_PALETTE.paper)).toBeGreaterThanOrEqual(3);
    for (const c of SERIES_DARK) expect(contrastRatio(c, NIGHT_PALETTE.paper)).toBeGreaterThanOrEqual(3);
  });
});

describe('buildChart({ dodge })', () => {
  it('moves the points of neighbouring series apart by dodge pixels at the same x, symmetric about x', () => {
    const pts = (y: number) => [{ x: 1, y, readout: [] }];
    const base = { title: 't', xLabel: 'x', yLabel: 'y', xDomain: [0, 2] as const, yDomain: [0, 1] as const };
    const series = [0, 1, 2].map((i) => ({ label: `s${i}`, colour: i, shape: 'circle' as const, points: pts(0.5) }));
    const plain = buildChart({ ...base, series });
    const dodged = buildChart({ ...base, series, dodge: 5 });
    expect(dodged.marks.map((m) => Math.round((m.cx - plain.marks[0].cx) * 100) / 100)).toEqual([-5, 0, 5]);
    expect(dodged.marks.map((m) => m.x)).toEqual([1, 1, 1]);
  });
});

describe('seriesStyle(i)', () => {
  it('the first 36 series differ in colour or shape', () => {
    const keys = new Set(Array.from({ length: 36 }, (_, i) => { const s = seriesStyle(i); return `${s.colour}/${s.shape}`; }));
    expect(keys.size).toBe(36);
  });
});
