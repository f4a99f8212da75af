/**
 * The row encoding of an escape study value (src/lib/server/escapes/rows.ts): a real engine report
 * of a small invented pair, encoded to the escape_points columns, decoded as the API serves it
 * (what goes in comes out, non-finite numbers as null) and written as CSV.
 */
import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../../src/lib/model/index.ts';
import { traceDiagram } from '../../../../src/lib/atlas/index.ts';
import { resolveNoise } from '../../../../src/lib/noise/noise-spec.ts';
import { escapesAt } from '../../../../src/lib/noise/escapes.ts';
import { barrierRows, decodePoint, encodePoint, encodeSkipped, escapesToCsv, ESCAPE_CSV_COLUMNS } from '../../../../src/lib/server/escapes/rows.ts';
import type { PredictedRate } from '../../../../src/lib/noise/prediction.ts';

const doc = {
  format: 'brinkmap/network-1', name: 'Invented pair',
  element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
  nodes: [{ id: 'upper', parameters: { a: 0.08 } }, { id: 'lower' }], links: [{ from: 'upper', to: 'lower', weight: 1 }],
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 0.3 },
  noise: { amplitude: 0.45 },
} as const;

/** Round trip through a database row: every text column is stored and read back as text. */
const throughDb = (row: object) => JSON.parse(JSON.stringify(row));

describe('escape point rows', () => {
  const system = compileModelJson(doc);
  const diagram = traceDiagram(system);
  const report = escapesAt(system, diagram, resolveNoise(doc as never), 0.1, { paths: 200, seed: 5, stepCheckPaths: 50 });

  it('keep the counts, intervals, quantiles, histogram bins and prediction of the report', () => {
    const labels = { states: ['all-base', 'upper tipped', 'lower tipped', 'all-tipped'], saddles: ['s0', 's1', 's2', 's3'] };
    const row = encodePoint(3, report, barrierRows([], labels), 12.4);
    expect(row.idx).toBe(3);
    expect(row.compute_ms).toBe(12);
    const pt = decodePoint(throughDb({ ...row, cache_key: 'k', id: 1 }));
    expect(pt.index).toBe(3);
    expect(pt.p).toBe(0.1);
    expect(pt.paths).toBe(200);
    expect(pt.sequences).toEqual(report.sequences.map((s) => ({ order: s.order, count: s.count, probability: s.probability, low: s.low, high: s.high })));
    expect(pt.escapeTimes.map((t) => t.k)).toEqual(report.escapeTimes.map((t) => t.k));
    pt.escapeTimes.forEach((t, i) => {
      const r = report.escapeTimes[i];
      expect(t.count).toBe(r.count);
      expect(t.mean).toBe(r.mean);
      expect(t.q05).toBe(r.q05);
      expect(t.q95).toBe(r.q95);
      expect(t.histogram).toEqual(r.histogram.counts);
    });
    expect(pt.prediction!.sequences).toEqual(report.prediction.sequences);
    expect(pt.prediction!.meanKthEscape).toEqual(report.prediction.meanKthEscape.map((v) => (Number.isFinite(v) ? v : null)));
    expect(pt.capped).toBe(report.capped);
    expect(pt.stepCheck).not.toBeNull();
    expect(pt.estimate).toEqual(report.estimate);
    // Compact: a value of a two-node study is a few kB, not a diagram.
    const bytes = Object.values(row).reduce((s: number, v) => s + (typeof v === 'string' ? v.length : 8), 0);
    expect(bytes).toBeLessThan(8000);
  });

  it('barrier rows name states and saddles and store non-finite numbers as null', () => {
    const rates: PredictedRate[] = [
      { from: 0, saddle: 1, to: 2, rate: 0, logRate: -Infinity, prefactor: null, barrier: 0.25, crossings: [['upper']] },
      { from: 2, saddle: 0, to: 9, rate: 1e-3, logRate: Math.log(1e-3), prefactor: 0.2, barrier: Number.NaN, crossings: [['lower', 'upper']] },
    ];
    const rows = barrierRows(rates, { states: ['all-base', 'x', 'upper tipped'], saddles: ['all-base -> upper tipped', 'b'] });
    expect(rows).toEqual([
      { from: 'all-base', saddle: 'b', to: 'upper tipped', barrier: 0.25, prefactor: null, logRate: null, crossings: [['upper']] },
      { from: 'upper tipped', saddle: 'all-base -> upper tipped', to: 'state 9', barrier: null, prefactor: 0.2, logRate: Math.log(1e-3), crossings: [['lower', 'upper']] },
    ]);
  });

  it('a skipped value keeps its place and reason; the CSV has one line per fact after the provenance', () => {
    const skipped = decodePoint(throughDb(encodeSkipped(1, 0.2, 'no escape graph at 0.2: no stable state at this parameter value')));
    expect(skipped).toMatchObject({ index: 1, p: 0.2, status: 'skipped', paths: 0, sequences: [], prediction: null });
    const done = decodePoint(throughDb(encodePoint(0, report, [{ from: 'all-base', saddle: 's', to: 'upper tipped', barrier: 0.3, prefactor: 0.1, logRate: -1, crossings: [] }], 1)));
    const csv = escapesToCsv([done, skipped], { model: 'Invented pair', run: 7 });
    const lines = csv.trim().split('\n');
    expect(lines.slice(0, 3)).toEqual(['# Brinkmap escape study data', '# model: Invented pair', '# run: 7']);
    const header = lines.indexOf(ESCAPE_CSV_COLUMNS.join(','));
    expect(header).toBe(4);
    const body = lines.slice(header + 1).map((l) => l.split(','));
    for (const cells of body) expect(cells.length).toBe(ESCAPE_CSV_COLUMNS.length);
    const seqs = body.filter((c) => c[0] === 'sequence' && c[1] === '0.1' && Number(c[3]) > 0);
    expect(seqs.map((c) => [c[2], Number(c[3])])).toEqual(report.sequences.map((s) => [s.order.join('>'), s.count]));
    expect(body.filter((c) => c[0] === 'time' && c[1] === '0.1')).toHaveLength(report.escapeTimes.length);
    expect(body.filter((c) => c[0] === 'histogram' && c[1] === '0.1')).toHaveLength(report.escapeTimes.length * 20);
    expect(body.filter((c) => c[0] === 'barrier')).toEqual([['barrier', '0.1', 'all-base -> via s -> upper tipped', '', '0.3', '', '', '', '', '', '0.1']]);
    expect(lines.some((l) => l.startsWith('value,0.2,skipped: no escape graph at 0.2'))).toBe(true);
  });
});
