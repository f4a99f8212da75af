import { describe, expect, it } from 'vitest';
import { compareChart, lowestBarrier, MAX_COMPARED_ORDERS, sharedOrders, type ComparedStudy } from '../../../src/lib/plot/escape-compare';
import { figureToSvg } from '../../../src/lib/plot/svg';
import { point } from './escape-fixture';

const prov = (runId: string) => ({ modelName: 'Fenn (invented)', versionHash: 'abc', runId, engineVersion: '1.4.0', date: '2026-12-04', noise: 0.4, paths: 200, seed: 1, start: 'all-base' });
const study = (label: string, over: Parameters<typeof point>[1] = {}): ComparedStudy => ({
  label, parameter: 'beta', start: 'all-base', noise: 0.4, points: [point(0.1, over), point(0.2, over)], provenance: prov(label.replace('run ', '')),
});

describe('sharedOrders(studies)', () => {
  it('the likeliest orders over all studies, at most MAX_COMPARED_ORDERS', () => {
    const other = study('run 2', { sequences: [{ order: ['c', 'a'], count: 190, probability: 0.95, low: 0.9, high: 0.97 }] });
    expect(sharedOrders([study('run 1'), other])).toEqual(['c → a', 'a → b', 'b → a']);
    const many = study('run 3', { sequences: Array.from({ length: 7 }, (_, i) => ({ order: [`n${i}`], count: 7 - i, probability: (7 - i) / 28, low: 0, high: 1 })), prediction: null });
    expect(sharedOrders([many])).toHaveLength(MAX_COMPARED_ORDERS);
  });
});

describe('lowestBarrier(points, start)', () => {
  it('the lowest barrier out of the start state per value and the state it leads to', () => {
    expect(lowestBarrier([point(0.2), point(0.1)], 'all-base')).toEqual([{ p: 0.1, barrier: 0.2, to: 'a tipped' }, { p: 0.2, barrier: 0.2, to: 'a tipped' }]);
  });
});

describe('compareChart(kind, studies)', () => {
  const two = [study('run 1'), study('run 2')];
  it('sequences: one mark per study, order and value; marker shape by study', () => {
    const fig = compareChart('sequences', two);
    expect(fig.marks).toHaveLength(2 * 2 * 2);
    const shapes = fig.items.filter((p) => p.data?.mark === 'point' && p.t === 'path').map((p) => (p as { d: string }).d.startsWith('M') && (p as { d: string }).d.includes('A') ? 'circle' : 'other');
    expect(shapes.filter((s) => s === 'circle')).toHaveLength(4);
  });
  it('first escape: one series per study with its mean and the prediction line', () => {
    const fig = compareChart('first-escape', two);
    expect(fig.marks).toHaveLength(4);
    expect(fig.items.filter((p) => p.data?.layer === 'line')).toHaveLength(2);
  });
  it('the footer (with a provenance) names every study compared', () => {
    const svg = figureToSvg(compareChart('lowest-barrier', two, { provenance: prov('1-2') }));
    expect(svg).toContain('run 1 · engine');
    expect(svg).toContain('run 2 · engine');
  });
});
