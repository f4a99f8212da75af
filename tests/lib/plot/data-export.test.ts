import Papa from 'papaparse';
import { describe, expect, it } from 'vitest';
import { diagramToCsv, diagramToJson, safeFileName } from '../../../src/lib/plot/data-export';
import { makeTwoLakeDiagram, TWO_LAKE_PROVENANCE } from '../../fixtures/two-lake';

const diagram = makeTwoLakeDiagram({ pointsPerBranch: 120 });

describe('diagramToCsv', () => {
  const csv = diagramToCsv(diagram, TWO_LAKE_PROVENANCE);
  const parsed = Papa.parse<string[]>(csv.trim(), { comments: '#' });
  it('opens with a provenance block of comment lines, then a header and one row per branch point', () => {
    const lines = csv.split('\n');
    expect(lines[0]).toBe('# Brinkmap diagram data');
    expect(lines).toContain(`# model: ${TWO_LAKE_PROVENANCE.modelName}`);
    expect(lines).toContain(`# model version hash: ${TWO_LAKE_PROVENANCE.versionHash}`);
    expect(lines).toContain(`# run: ${TWO_LAKE_PROVENANCE.runId}`);
    expect(lines.some((l) => /^# Model results are indicative/.test(l))).toBe(true);
    const total = diagram.branches.reduce((s, b) => s + b.points.length, 0);
    expect(parsed.data.length).toBe(total + 1);
    expect(parsed.data[0]).toEqual(['branch', 'point', 'c', 'Upper lake', 'Lower lake', 'unstable', 'stability']);
  });
  it('round-trips every number exactly (shortest round-trip printing)', () => {
    const b = diagram.branches[1];
    const rows = parsed.data.filter((r) => r[0] === b.id);
    rows.forEach((r, i) => {
      expect(Number(r[2])).toBe(b.points[i].p);
      expect(Number(r[3])).toBe(b.points[i].x[0]);
      expect(Number(r[5])).toBe(b.points[i].unstable);
      expect(r[6]).toBe(b.points[i].unstable === 0 ? 'stable' : 'unstable');
    });
  });
  it('without a provenance it is the header and rows alone', () => {
    expect(diagramToCsv(diagram).startsWith('branch,point,c,')).toBe(true);
  });
});

describe('diagramToJson', () => {
  it('carries provenance and the indicative note and parses back to the diagram', () => {
    const j = JSON.parse(diagramToJson({ provenance: TWO_LAKE_PROVENANCE, projection: { key: 'mean', label: 'mean state' }, diagram, regimes: [], escapeGraphs: [], tags: [] }));
    expect(j.format).toBe('brinkmap/figure-data-1');
    expect(j.provenance.runId).toBe('fixture-run');
    expect(j.diagram.branches[0].points.length).toBe(120);
    expect(j.note).toMatch(/indicative/);
  });
});

describe('safeFileName', () => {
  it('replaces anything outside letters, digits, dot, dash, underscore', () => {
    expect(safeFileName('Two lakes / run #3', 'svg')).toBe('Two-lakes-run-3.svg');
    expect(safeFileName('***', 'csv')).toBe('diagram.csv');
  });
});
