import { describe, expect, it } from 'vitest';
import { traceDiagram } from '../../../src/lib/atlas';
import { compileModelJson } from '../../../src/lib/model';
import { pathPicture } from '../../../src/lib/noise/path-picture';
import { pathFigure } from '../../../src/lib/plot/escape-paths';
import { NIGHT_PALETTE, PAPER_PALETTE } from '../../../src/lib/plot/palette';
import { figureToSvg } from '../../../src/lib/plot/svg';
import { cubicNetwork } from '../regimes/fixtures';

const net = (nodes: string[]) => {
  const system = compileModelJson(cubicNetwork({ r: 0.1, nodes, links: nodes.slice(1).map((id, i) => ({ from: nodes[i], to: id, twoWay: true })), sweep: { parameter: 'beta', from: 0, to: 0.6 } }));
  return pathPicture(system, traceDiagram(system), { level: 0.45, weights: new Float64Array(nodes.length).fill(1) }, 0.1, { paths: 2, seed: 7 });
};

describe('pathFigure(picture)', () => {
  const pic = net(['a', 'b']);

  it('has one focusable mark per state, saddle, minimum-action path and sample path, with exact numbers in the readouts', () => {
    const fig = pathFigure(pic);
    const ids = fig.marks.map((m) => m.id);
    expect(ids.filter((i) => i.startsWith('state-'))).toHaveLength(pic.states.length);
    expect(ids.filter((i) => i.startsWith('saddle-'))).toHaveLength(pic.saddles.length);
    expect(ids.filter((i) => i.startsWith('map-'))).toHaveLength(pic.minimumActionPaths.length);
    expect(ids.filter((i) => i.startsWith('sample-'))).toHaveLength(2);
    const s = pic.saddles[0];
    const mark = fig.marks.find((m) => m.id === 'saddle-0')!;
    // formatValue(v, 8): 8 significant digits of the stored coordinates.
    expect(mark.readout[1]).toBe(`x = (${s.x.map((v) => Number(v.toPrecision(8)).toString()).join(', ')})`.replace(/e\+?/g, 'e'));
    // Marks lie inside the plot area.
    for (const m of fig.marks) {
      expect(m.cx).toBeGreaterThanOrEqual(fig.plot.x - 1);
      expect(m.cx).toBeLessThanOrEqual(fig.plot.x + fig.plot.w + 1);
      expect(m.cy).toBeGreaterThanOrEqual(fig.plot.y - 1);
      expect(m.cy).toBeLessThanOrEqual(fig.plot.y + fig.plot.h + 1);
    }
  });

  it('draws minimum-action paths, sample paths and glyphs in the theme\'s colours, with the provenance footer when asked', () => {
    const light = pathFigure(pic, { palette: PAPER_PALETTE });
    const dark = pathFigure(pic, { palette: NIGHT_PALETTE, dark: true, provenance: { modelName: 'm', runId: '1', versionHash: 'abc', engineVersion: 'e', date: '2026-01-01', noise: 0.45, paths: 10, seed: 7, start: 'all-base' } });
    expect(light.background).toBe(PAPER_PALETTE.paper);
    expect(dark.background).toBe(NIGHT_PALETTE.paper);
    expect(light.items.filter((p) => p.data?.layer === 'minimum-action')).toHaveLength(pic.minimumActionPaths.length);
    expect(light.items.filter((p) => p.data?.layer === 'sample')).toHaveLength(2);
    expect(dark.items.some((p) => p.t === 'path' && p.data?.mark === 'saddle' && p.stroke === NIGHT_PALETTE.unstable)).toBe(true);
    expect(dark.items.some((p) => p.t === 'text' && /indicative/.test(p.text))).toBe(true);
    expect(figureToSvg(dark)).toContain('<svg');
  });

  it('projects 3-variable pictures on the chosen axes and refuses a bad axis pair', () => {
    const three = net(['a', 'b', 'c']);
    const fig = pathFigure(three, { axes: [0, 2] });
    expect(fig.items.some((p) => p.t === 'text' && p.text === 'c')).toBe(true);
    expect(fig.items.some((p) => p.t === 'text' && /Projection on \(a, c\); b not shown/.test(p.text))).toBe(true);
    expect(() => pathFigure(three, { axes: [1, 1] })).toThrow(/^axes: /);
    expect(() => pathFigure(pic, { axes: [0, 2] })).toThrow(/^axes: /);
  });
});
