/**
 * Band links to the escape studies of the same version (src/components/diagram/band-studies.ts) and
 * the band panel that shows them (SidePanel rendered to static markup with react-dom/server, on the
 * engine's three-lake fixture). The expected values follow from the helper's definition (nearest
 * stored value inside the band to the representative parameter, ties to the lower value), worked
 * out by hand beside each case.
 */
import { createElement } from 'react';
import { renderToStaticMarkup } from 'react-dom/server';
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { bandStudyLinks, representativeParameter, type VersionStudy } from '../../../src/components/diagram/band-studies';
import { SidePanel } from '../../../src/components/diagram/SidePanel';
import type { Diagram } from '../../../src/lib/atlas/types';
import type { EscapeGraph, RegimeBand } from '../../../src/lib/regimes/types';

const orders = (first: string[], q: number) => [
  { order: ['lower', 'middle', 'upper'], probability: 1 - q },
  { order: first, probability: q },
];
const study = (runId: number, ps: number[], extra: Partial<VersionStudy> = {}): VersionStudy => ({
  runId, noise: 0.45, start: 'all-base', paths: 300, points: ps.map((p) => ({ p, orders: orders(['upper', 'middle', 'lower'], 0.7) })), ...extra,
});

describe('representativeParameter', () => {
  const band = { from: 0.1, to: 0.3, exitsAt: 0.12 };
  it('is the escape graph’s value when it lies in the band, else where the exits were read, else the midpoint', () => {
    expect(representativeParameter(band, 0.2)).toBe(0.2);
    // 0.35 is outside [0.1, 0.3]: the exits' value 0.12 is used.
    expect(representativeParameter(band, 0.35)).toBe(0.12);
    expect(representativeParameter({ from: 0.1, to: 0.3 })).toBeCloseTo(0.2, 15);
    // exitsAt outside the band is not used either: midpoint (0.1 + 0.3) / 2.
    expect(representativeParameter({ from: 0.1, to: 0.3, exitsAt: 0.5 })).toBeCloseTo(0.2, 15);
    // A band given high to low has the same midpoint.
    expect(representativeParameter({ from: 0.3, to: 0.1 })).toBeCloseTo(0.2, 15);
  });
});

describe('bandStudyLinks', () => {
  const band = { from: 0.1, to: 0.3 };
  it('picks the stored value inside the band nearest to the representative parameter, not a nearer one outside', () => {
    // Representative 0.29 (the graph's value). Candidates inside: 0.15 (0.14 away), 0.25 (0.04 away); 0.31 is 0.02 away but outside.
    const [link] = bandStudyLinks(band, [study(7, [0.05, 0.15, 0.25, 0.31])], 0.29);
    expect(link.at?.p).toBe(0.25);
    expect(link.representative).toBe(0.29);
    expect(link.href).toBe('/runs/7');
    expect(link.label).toBe('Escape study (noise σ = 0.45)');
  });
  it('breaks a tie towards the lower value whatever the order of the points', () => {
    // Band [0, 1], midpoint 0.5, candidates 0.25 and 0.75 both exactly 0.25 away (all exact in binary).
    const wide = { from: 0, to: 1 };
    expect(bandStudyLinks(wide, [study(1, [0.75, 0.25])])[0].at?.p).toBe(0.25);
    expect(bandStudyLinks(wide, [study(1, [0.25, 0.75])])[0].at?.p).toBe(0.25);
  });
  it('has no value when the study stored none inside the band (or only values without a prediction)', () => {
    const [none] = bandStudyLinks(band, [study(3, [0.05, 0.5])]);
    expect(none.at).toBeNull();
    const [noPrediction] = bandStudyLinks(band, [{ ...study(3, []), points: [{ p: 0.2, orders: [] }] }]);
    expect(noPrediction.at).toBeNull();
  });
  it('lists the orders most probable first, one link per study in the order given, and names a start other than all-base', () => {
    const links = bandStudyLinks(band, [study(9, [0.2]), study(4, [0.2], { noise: 0.3, start: 'all-tipped' })]);
    expect(links.map((l) => l.runId)).toEqual([9, 4]);
    // orders() gives 0.3 first and 0.7 second: sorted, 0.7 (upper → middle → lower) comes first.
    expect(links[0].at?.orders.map((o) => o.probability)).toEqual([0.7, 0.30000000000000004]);
    expect(links[0].at?.orders[0].order).toEqual(['upper', 'middle', 'lower']);
    expect(links[1].label).toBe('Escape study (noise σ = 0.3, from all-tipped)');
  });
});

describe('SidePanel band links', () => {
  const three = JSON.parse(readFileSync('tests/fixtures/engine-three-lakes.json', 'utf8')) as { diagram: Diagram; regimes: RegimeBand[]; escapeGraphs: EscapeGraph[] };
  const render = (index: number, escapeStudies?: VersionStudy[]) => renderToStaticMarkup(createElement(SidePanel, {
    diagram: three.diagram, projection: { kind: 'mean' } as never, selection: { kind: 'band', index }, regimes: three.regimes,
    escapeGraphs: three.escapeGraphs, escapeStudies, canTag: false, onAddTag: async () => undefined, onClose: () => undefined,
  }));
  // The fixture's bands: weak [0, 0.149…], intermediate [0.149…, 0.3].
  const studies = [study(42, [0.05, 0.25])];
  it('links each band to the study and shows the prediction at the value inside the band', () => {
    const weak = render(0, studies);
    expect(weak).toContain('href="/runs/42"');
    expect(weak).toContain('Escape study (noise σ = 0.45)');
    expect(weak).toMatch(/data-at="0.05"/);
    expect(weak).toContain('upper → middle → lower');
    expect(weak).toContain('<td class="num">0.7</td>');
    expect(weak).toContain('at the study’s beta = 0.05 (its stored value in this band');
    const intermediate = render(1, studies);
    expect(intermediate).toMatch(/data-at="0.25"/);
  });
  it('says when the study has no value inside the band, and shows nothing without studies', () => {
    const html = render(1, [study(42, [0.05])]);
    expect(html).toContain('href="/runs/42"');
    expect(html).toContain('This study has no stored value inside this band.');
    expect(render(0)).not.toContain('band-studies');
    expect(render(0, [])).not.toContain('band-studies');
  });
});
