import { describe, expect, it } from 'vitest';
import { bandsFromEdges, barrierChart, escapeFooter, MAX_DRAWN_ORDERS, sequenceChart, survivalChart, timingChart } from '../../../src/lib/plot/escape-charts';
import { figureToSvg } from '../../../src/lib/plot/svg';
import { point } from './escape-fixture';

const study = { parameter: 'beta', noise: 0.4, start: 'all-base', exitSwitches: [{ p: 0.15, state: 'all-base', saddles: ['all-base -> a tipped', 'all-base -> b tipped'], barrier: 0.25 }],
  bandEdges: [{ p: 0, regime: 'weak', side: 'from' }, { p: 0.12, regime: 'weak', side: 'to' }, { p: 0.12, regime: 'intermediate', side: 'from' }, { p: 0.3, regime: 'intermediate', side: 'to' }] };
const view = { points: [point(0.1), point(0.2), point(0.3, { status: 'skipped' })], study, parameter: 'beta', start: 'all-base' };
const provenance = { modelName: 'Fenn (invented)', versionHash: '0123456789abcdef', runId: '7', engineVersion: '1.4.0', date: '2026-12-04T00:00:00Z', noise: 0.4, paths: 200, seed: 3, start: 'all-base' };

describe('sequenceChart(view)', () => {
  it('one mark per Monte Carlo estimate (orders × done values), the readout with the exact interval and counts', () => {
    const fig = sequenceChart(view);
    expect(fig.marks.filter((m) => m.kind === 'point')).toHaveLength(2 * 2);
    const m = fig.marks.find((x) => x.label === 'a → b' && x.x === 0.1)!;
    expect(m.readout).toEqual(['a → b at beta = 0.1', 'Monte Carlo 0.75 (95 % interval 0.686 to 0.804)', '150 of 200 paths', 'weak-noise prediction 0.8']);
  });
  it(`draws at most ${MAX_DRAWN_ORDERS} orders and names the others in a note`, () => {
    const orders = Array.from({ length: 8 }, (_, i) => ({ order: [`n${i}`, 'x'], count: 8 - i, probability: (8 - i) / 36, low: 0, high: 1 }));
    const fig = sequenceChart({ ...view, points: [point(0.1, { paths: 36, sequences: orders, prediction: null })] });
    expect(new Set(fig.marks.map((m) => m.label)).size).toBe(MAX_DRAWN_ORDERS);
    expect(fig.items.some((p) => p.t === 'text' && p.text.includes('2 rarer orders not drawn'))).toBe(true);
  });
  it('the exported SVG has one data-mark="point" per estimate and the footer with noise, paths and seed', () => {
    const svg = figureToSvg(sequenceChart(view, { provenance }));
    expect(svg.match(/data-mark="point"/g)).toHaveLength(4);
    expect(svg).toContain('Escape study: noise level 0.4 · 200 paths per value · seed 3 · start all-base');
    expect(svg).toContain('run 7');
  });
});

describe('barrierChart(view)', () => {
  it('one curve per saddle out of the start state and the exit switch as a vertical mark with its barrier', () => {
    const fig = barrierChart(view);
    expect(new Set(fig.marks.filter((m) => m.kind === 'point').map((m) => m.label))).toEqual(new Set(['to a tipped', 'to b tipped']));
    const sw = fig.marks.filter((m) => m.kind === 'vmark');
    expect(sw).toHaveLength(1);
    expect(sw[0].x).toBe(0.15);
    expect(sw[0].readout[1]).toContain('0.25');
    expect(fig.items.filter((p) => p.data?.layer === 'band').map((p) => p.data!.regime)).toEqual(['weak', 'intermediate']);
  });
});

describe('timingChart(view)', () => {
  it('means per k and between escapes on a log axis, the k-th with its prediction line', () => {
    const fig = timingChart(view);
    expect(fig.marks).toHaveLength(3 * 2);
    expect(fig.items.filter((p) => p.data?.layer === 'line')).toHaveLength(2);
    const m = fig.marks.find((x) => x.label === 'mean time to the 1st escape' && x.x === 0.2)!;
    expect(m.readout[1]).toBe('mean 10 ± 1.4 (95 %) over 200 paths');
  });
});

describe('survivalChart(view, { at })', () => {
  it('takes the done value nearest to `at`, one curve per k from the histogram', () => {
    const fig = survivalChart(view, { at: 0.19 })!;
    expect(fig.title).toContain('beta = 0.2');
    expect(fig.marks.filter((m) => m.label === 'before escape 1').map((m) => m.readout[1].split(': ')[1])).toEqual(['1', '0.5', '0.25', '0.1', '0']);
  });
  it('is null without a done value', () => {
    expect(survivalChart({ ...view, points: [] })).toBeNull();
  });
});

describe('bandsFromEdges(edges)', () => {
  it('pairs from/to of each regime and ignores unmatched or unknown entries', () => {
    expect(bandsFromEdges(study.bandEdges)).toEqual([{ from: 0, to: 0.12, regime: 'weak' }, { from: 0.12, to: 0.3, regime: 'intermediate' }]);
    expect(bandsFromEdges([{ p: 1, regime: 'weak', side: 'to' }, { x: 1 }])).toEqual([]);
  });
});

describe('escapeFooter(provenance)', () => {
  it('the diagram\'s provenance line, then the study settings', () => {
    expect(escapeFooter(provenance)).toEqual([
      'Model Fenn (invented) · version 0123456789ab · run 7 · engine 1.4.0 · 2026-12-04T00:00:00Z',
      'Escape study: noise level 0.4 · 200 paths per value · seed 3 · start all-base',
    ]);
  });
});
