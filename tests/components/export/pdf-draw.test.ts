import { readFileSync } from 'node:fs';
import PDFDocument from 'pdfkit';
import { describe, expect, it } from 'vitest';
import { createFigureDocument, drawFigure } from '../../../src/components/export/pdf-draw';
import { buildFigure } from '../../../src/lib/plot/figure';
import { makeTwoLakeBands, makeTwoLakeDiagram, TWO_LAKE_PROVENANCE } from '../../fixtures/two-lake';

const font = (p: string) => new Uint8Array(readFileSync(`node_modules/@fontsource/${p}`));
const fonts = {
  regular: font('inter/files/inter-latin-400-normal.woff'),
  semibold: font('inter/files/inter-latin-600-normal.woff'),
  italic: font('inter/files/inter-latin-400-italic.woff'),
};

function render(): Promise<Buffer> {
  const diagram = makeTwoLakeDiagram({ pointsPerBranch: 200 });
  const fig = buildFigure({ diagram, projection: { kind: 'node', index: 0 }, regimes: makeTwoLakeBands(diagram), caption: 'Invented fixture', provenance: TWO_LAKE_PROVENANCE });
  const doc = createFigureDocument(PDFDocument as never, fig, { title: fig.title, subject: 'test' }, fonts);
  doc.info.CreationDate = new Date(0);
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  const done = new Promise<Buffer>((resolve) => doc.on('end', () => resolve(Buffer.concat(chunks))));
  drawFigure(doc, fig);
  doc.end();
  return done;
}

describe('drawFigure (pdfkit)', () => {
  it('writes a complete PDF with the figure as one page the figure’s size', async () => {
    const pdf = await render();
    const text = pdf.toString('latin1');
    expect(text.startsWith('%PDF-')).toBe(true);
    expect(text.trimEnd().endsWith('%%EOF')).toBe(true);
    // Page size in points equals the figure size in CSS px (MediaBox [0 0 w h], PDF 1.7 §7.7.3.3).
    expect(text).toMatch(/\/MediaBox \[0 0 720 \d+\]/);
  });
  it('embeds the shipped Inter (subsets of regular and semibold), not a standard PDF font', async () => {
    const text = (await render()).toString('latin1');
    expect(text).toMatch(/\/BaseFont \/[A-Z]{6}\+Inter/);
    expect(text).toMatch(/\/BaseFont \/[A-Z]{6}\+Inter-SemiBold/);
    expect(text).not.toMatch(/\/BaseFont \/Helvetica/);
  });
});
