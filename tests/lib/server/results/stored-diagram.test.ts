import { describe, expect, it } from 'vitest';
import { compileModelJson } from '../../../../src/lib/model/index.ts';
import { traceDiagram } from '../../../../src/lib/atlas/index.ts';
import { diagramOfResultRow, encodeForStorage, storedDiagram, storedDiagramText } from '../../../../src/lib/server/results/stored-diagram.ts';
import { previewOf, PREVIEW_POINTS } from '../../../../src/lib/server/results/preview.ts';
import { thinDiagram } from '../../../../src/lib/server/results/thin.ts';

/** Invented three-node cubic chain (x' = r_i + x - x^3, two-way links): a few thousand points, more than the preview keeps. */
const diagram = traceDiagram(compileModelJson({
  format: 'brinkmap/network-1', name: 'three invented cubic nodes',
  element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
  nodes: [0, 1, 2].map((i) => ({ id: `n${i + 1}`, parameters: { r: 0.05 + 0.05 * i } })),
  links: [{ from: 'n1', to: 'n2', weight: 1, twoWay: true }, { from: 'n2', to: 'n3', weight: 1, twoWay: true }],
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 1 },
}));
const points = (d: { branches: { points: unknown[] }[] }) => d.branches.reduce((n, b) => n + b.points.length, 0);

describe('storedDiagramText / storedDiagram (either stored form)', () => {
  const { blob, previewPoints } = encodeForStorage(diagram);
  const fullText = JSON.stringify(diagram);
  // What the JSON-text storage wrote in `preview` (compute.ts before the encoded form).
  const oldPreviewText = JSON.stringify(points(diagram) > PREVIEW_POINTS ? thinDiagram(diagram, PREVIEW_POINTS) : diagram);

  it('an encoded row gives the full text and the preview text the JSON-text storage stored', () => {
    expect(points(diagram)).toBeGreaterThan(PREVIEW_POINTS);
    expect(storedDiagramText({ blob }, 'full')).toBe(fullText);
    expect(storedDiagramText({ blob }, 'preview')).toBe(oldPreviewText);
    expect(previewPoints).toBe(points(JSON.parse(oldPreviewText)));
    expect(storedDiagram({ blob }, 'preview')).toEqual(JSON.parse(oldPreviewText));
    expect(storedDiagram({ blob }, 'full')).toEqual(diagram);
  });

  it('a row of the JSON-text storage is passed through as stored, the blob wins when both are there', () => {
    expect(storedDiagramText({ blob: null, text: oldPreviewText }, 'preview')).toBe(oldPreviewText);
    expect(storedDiagram({ text: fullText }, 'full')).toEqual(diagram);
    expect(storedDiagramText({ blob, text: 'not read' }, 'full')).toBe(fullText);
    expect(diagramOfResultRow({ diagram_blob: Buffer.from(blob), diagram: null })).toEqual(diagram);
    expect(diagramOfResultRow({ diagram_blob: null, diagram: fullText })).toEqual(diagram);
  });

  it('a row with neither form is an error, not an empty diagram', () => {
    expect(() => storedDiagramText({ blob: null, text: null }, 'full')).toThrow(/neither an encoded diagram nor its JSON text/);
  });

  it('previewOf keeps a diagram at or below the budget as it is', () => {
    const small = { ...diagram, branches: diagram.branches.slice(0, 1).map((b) => ({ ...b, points: b.points.slice(0, 10) })) };
    expect(previewOf(small)).toBe(small);
    expect(points(previewOf(diagram))).toBeLessThan(points(diagram));
  });
});
