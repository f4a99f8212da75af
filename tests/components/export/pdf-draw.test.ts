import { readFileSync } from 'node:fs';
import PDFDocument from 'pdfkit';
import { describe, expect, it } from 'vitest';
import { createFigureDocument, drawFigure } from '../../../src/components/export/pdf-draw';
import { buildFigure } from '../../../src/lib/plot/figure';
import { paperFigure, SIZE_PRESETS, toPoints } from '../../../src/lib/plot/paper';
import { makeTwoLakeBands, makeTwoLakeDiagram, TWO_LAKE_PROVENANCE } from '../../fixtures/two-lake';

const font = (p: string) => new Uint8Array(readFileSync(`node_modules/@fontsource/${p}`));
const fonts = {
  regular: font('inter/files/inter-latin-400-normal.woff'),
  semibold: font('inter/files/inter-latin-600-normal.woff'),
  italic: font('inter/files/inter-latin-400-italic.woff'),
  greek: {
    regular: font('inter/files/inter-greek-400-normal.woff'),
    semibold: font('inter/files/inter-greek-600-normal.woff'),
    italic: font('inter/files/inter-greek-400-italic.woff'),
  },
};

function bytesOf(doc: PDFKit.PDFDocument): Promise<Buffer> {
  doc.info.CreationDate = new Date(0);
  const chunks: Buffer[] = [];
  doc.on('data', (c: Buffer) => chunks.push(c));
  return new Promise<Buffer>((resolve) => doc.on('end', () => resolve(Buffer.concat(chunks))));
}

/** Text of every page as pdf.js reads it (Mozilla's PDF.js, pdfjs-dist: an independent PDF reader). */
async function extractText(pdf: Buffer): Promise<string> {
  const pdfjs = await import('pdfjs-dist/legacy/build/pdf.mjs');
  const task = pdfjs.getDocument({ data: new Uint8Array(pdf), useSystemFonts: false, isEvalSupported: false });
  const doc = await task.promise;
  let text = '';
  for (let i = 1; i <= doc.numPages; i++) {
    const content = await (await doc.getPage(i)).getTextContent();
    text += content.items.map((it) => ('str' in it ? it.str : '')).join('') + '\n';
  }
  await task.destroy();
  return text;
}

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

  it('a paper-sized figure keeps every character of a Greek axis title: pdf.js reads "β" back, and the page is the asked size', async () => {
    const diagram = makeTwoLakeDiagram({ pointsPerBranch: 200 });
    const size = SIZE_PRESETS['one-column'];
    const paper = paperFigure({ diagram, projection: { kind: 'node', index: 0 }, regimes: makeTwoLakeBands(diagram), xLabel: 'coupling β (1/yr)', yLabel: 'σ-weighted state' }, size);
    const doc = createFigureDocument(PDFDocument as never, paper.figure, { title: paper.figure.title, subject: 'test' }, fonts, paper.scale);
    const done = bytesOf(doc);
    drawFigure(doc, paper.figure, { scale: paper.scale, greek: true });
    doc.end();
    const pdf = await done;
    const text = await extractText(pdf);
    expect(text).toContain('coupling β (1/yr)');
    expect(text).toContain('σ-weighted state');
    const media = /\/MediaBox \[0 0 ([\d.]+) ([\d.]+)\]/.exec(pdf.toString('latin1'))!;
    expect(Number(media[1])).toBeCloseTo(toPoints(85, 'mm'), 2);
    // The Greek subset is embedded beside the latin one.
    expect(pdf.toString('latin1').match(/\/BaseFont \/[A-Z]{6}\+Inter/g)!.length).toBeGreaterThanOrEqual(3);
  });

  it('without the Greek subsets the same title loses β (why they are shipped)', async () => {
    const diagram = makeTwoLakeDiagram({ pointsPerBranch: 50 });
    const fig = buildFigure({ diagram, projection: { kind: 'node', index: 0 }, xLabel: 'coupling β' });
    const latinOnly = { regular: fonts.regular, semibold: fonts.semibold, italic: fonts.italic };
    const doc = createFigureDocument(PDFDocument as never, fig, { title: fig.title, subject: 'test' }, latinOnly);
    const done = bytesOf(doc);
    drawFigure(doc, fig);
    doc.end();
    expect(await extractText(await done)).not.toContain('β');
  });
});
