/**
 * Drawing a Figure onto a pdfkit document: the same primitives as the SVG, clipped to the plot area,
 * text in the embedded shipped fonts. Free of browser APIs, so it is tested under Node with pdfkit's
 * Node build.
 */
import type { Figure, Prim } from '../../lib/plot/figure';
import { scriptRuns } from '../../lib/plot/paper';

/**
 * WOFF (version 1) faces of Inter. fontkit 2 fails to subset the WOFF2 files of @fontsource/inter and both
 * IBM Plex Mono files ("Offset is outside the bounds of the DataView", checked on this install), so the
 * PDF sets numbers in Inter too (with tabular figures the columns still line up).
 */
export interface PdfFonts {
  regular: Uint8Array; semibold: Uint8Array; italic: Uint8Array;
  /** Inter's Greek subsets (the latin files have no Greek glyphs): text runs of Greek letters use them. */
  greek?: { regular: Uint8Array; semibold: Uint8Array; italic: Uint8Array };
}

type PdfCtor = new (options?: PDFKit.PDFDocumentOptions) => PDFKit.PDFDocument;

/**
 * A document the figure's size times `scale` points (1 layout unit drawn as `scale` pt; 1 by
 * default, the screen figure), with the fonts registered.
 */
export function createFigureDocument(PDFDocument: PdfCtor, fig: Figure, meta: { title: string; subject: string }, fonts: PdfFonts, scale = 1): PDFKit.PDFDocument {
  const doc = new PDFDocument({ size: [fig.width * scale, fig.height * scale], margin: 0, font: fonts.regular as unknown as string, info: { Title: meta.title, Subject: meta.subject, Creator: 'Brinkmap' } });
  doc.registerFont('Inter', fonts.regular as unknown as string);
  doc.registerFont('Inter-SemiBold', fonts.semibold as unknown as string);
  doc.registerFont('Inter-Italic', fonts.italic as unknown as string);
  if (fonts.greek) {
    doc.registerFont('Inter-Greek', fonts.greek.regular as unknown as string);
    doc.registerFont('Inter-Greek-SemiBold', fonts.greek.semibold as unknown as string);
    doc.registerFont('Inter-Greek-Italic', fonts.greek.italic as unknown as string);
  }
  return doc;
}

/** Draws the figure; `scale` as given to createFigureDocument, `greek` when its fonts had the Greek subsets. */
export function drawFigure(doc: PDFKit.PDFDocument, fig: Figure, options: { scale?: number; greek?: boolean } = {}): void {
  const scale = options.scale ?? 1;
  if (scale !== 1) doc.scale(scale);
  const hasGreek = options.greek === true;
  doc.rect(0, 0, fig.width, fig.height).fill(fig.background);
  let clipped = false;
  const setClip = (on: boolean) => {
    if (on === clipped) return;
    if (on) { doc.save(); doc.rect(fig.plot.x, fig.plot.y, fig.plot.w, fig.plot.h).clip(); } else doc.restore();
    clipped = on;
  };
  const draw = (p: Prim) => {
    switch (p.t) {
      case 'rect': {
        doc.save();
        doc.rect(p.x, p.y, p.w, p.h);
        doc.fillOpacity(p.opacity ?? 1);
        if (p.stroke) doc.lineWidth(p.strokeWidth ?? 1).fillAndStroke(p.fill, p.stroke); else doc.fill(p.fill);
        doc.restore();
        break;
      }
      case 'path': {
        doc.save();
        doc.path(p.d);
        if (p.opacity != null) doc.opacity(p.opacity);
        if (p.stroke) {
          doc.lineWidth(p.strokeWidth ?? 1);
          if (p.linecap) doc.lineCap(p.linecap).lineJoin('round');
          if (p.dash) doc.dash(p.dash[0], { space: p.dash[1] ?? p.dash[0] }); else doc.undash();
        }
        const rule = p.fillRule === 'evenodd' ? 'even-odd' : 'non-zero';
        const fill = p.fill && p.fill !== 'none' ? p.fill : null;
        if (fill && p.stroke) doc.fillAndStroke(fill, p.stroke, rule);
        else if (fill) doc.fill(fill, rule);
        else if (p.stroke) doc.stroke(p.stroke);
        doc.restore();
        break;
      }
      case 'text': {
        const latin = p.weight === 600 ? 'Inter-SemiBold' : p.italic ? 'Inter-Italic' : 'Inter';
        const greek = p.weight === 600 ? 'Inter-Greek-SemiBold' : p.italic ? 'Inter-Greek-Italic' : 'Inter-Greek';
        const features = { features: p.mono ? ['tnum'] : [] } as PDFKit.Mixins.TextOptions;
        // Runs of Greek letters in Inter's Greek subset, the rest in the latin one, placed one after another.
        const runs = hasGreek ? scriptRuns(p.text) : [{ text: p.text, greek: false }];
        const widths = runs.map((r) => doc.font(r.greek ? greek : latin).fontSize(p.size).widthOfString(r.text, features));
        const w = widths.reduce((a, b) => a + b, 0);
        const dx = p.anchor === 'middle' ? -w / 2 : p.anchor === 'end' ? -w : 0;
        doc.save();
        if (p.rotate) doc.rotate(p.rotate, { origin: [p.x, p.y] });
        let x = p.x + dx;
        runs.forEach((r, k) => {
          doc.font(r.greek ? greek : latin).fontSize(p.size).fillColor(p.fill);
          doc.text(r.text, x, p.y, { lineBreak: false, baseline: 'alphabetic', ...features });
          x += widths[k];
        });
        doc.restore();
        break;
      }
    }
  };
  for (const item of fig.items) { setClip(Boolean(item.clip)); draw(item); }
  setClip(false);
}
