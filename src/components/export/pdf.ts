/**
 * PDF export with pdfkit's browser build (already a project dependency; its ESM browser bundle needs
 * no Node shims). Chosen over jsPDF + svg2pdf.js because pdfkit embeds the shipped Inter WOFF files through
 * fontkit, so the PDF keeps real, selectable Inter text; jsPDF only takes TrueType files, which the
 * font packages do not ship. The figure is drawn from the same primitives as the SVG, not re-parsed
 * from SVG text. pdfkit is imported on demand, so the diagram island does not carry it.
 */
import type { Figure } from '../../lib/plot/figure';
import { loadFonts } from './fonts';
import { createFigureDocument, drawFigure } from './pdf-draw';

/** `scale`: points per layout unit (paper.ts; 1 for the screen-sized figure). */
export async function figureToPdf(fig: Figure, meta: { title: string; subject: string }, scale = 1): Promise<Blob> {
  const [{ default: PDFDocument }, { toBlob }, fonts] = await Promise.all([import('pdfkit'), import('pdfkit/output'), loadFonts()]);
  const doc = createFigureDocument(PDFDocument, fig, meta, { regular: fonts.regular, semibold: fonts.semibold, italic: fonts.italic, greek: fonts.greek }, scale);
  const blob = toBlob(doc);
  drawFigure(doc, fig, { scale, greek: true });
  doc.end();
  return blob;
}
