/**
 * PDF export with pdfkit's browser build (already a project dependency; its ESM browser bundle needs
 * no Node shims). Chosen over jsPDF + svg2pdf.js because pdfkit embeds the shipped WOFF fonts through
 * fontkit, so the PDF keeps real, selectable Inter text; jsPDF only takes TrueType files, which the
 * font packages do not ship. The figure is drawn from the same primitives as the SVG, not re-parsed
 * from SVG text. pdfkit is imported on demand, so the diagram island does not carry it.
 */
import type { Figure, Prim } from '../../lib/plot/figure';
import { loadFonts } from './fonts';

export async function figureToPdf(fig: Figure, meta: { title: string; subject: string }): Promise<Blob> {
  const [{ default: PDFDocument }, { toBlob }, fonts] = await Promise.all([import('pdfkit'), import('pdfkit/output'), loadFonts()]);
  // 1 CSS px is drawn as 1 pt: the page is the figure's size in points (a 720 px figure is 25.4 cm wide).
  const doc = new PDFDocument({ size: [fig.width, fig.height], margin: 0, font: fonts.regular as unknown as string, info: { Title: meta.title, Subject: meta.subject, Creator: 'Brinkmap' } });
  doc.registerFont('Inter', fonts.regular as unknown as string);
  doc.registerFont('Inter-SemiBold', fonts.semibold as unknown as string);
  doc.registerFont('Inter-Italic', fonts.italic as unknown as string);
  doc.registerFont('Plex-Mono', fonts.mono as unknown as string);
  const blob = toBlob(doc);

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
        const font = p.mono ? 'Plex-Mono' : p.weight === 600 ? 'Inter-SemiBold' : p.italic ? 'Inter-Italic' : 'Inter';
        doc.font(font).fontSize(p.size).fillColor(p.fill);
        const w = doc.widthOfString(p.text);
        const dx = p.anchor === 'middle' ? -w / 2 : p.anchor === 'end' ? -w : 0;
        doc.save();
        if (p.rotate) doc.rotate(p.rotate, { origin: [p.x, p.y] });
        doc.text(p.text, p.x + dx, p.y, { lineBreak: false, baseline: 'alphabetic' });
        doc.restore();
        break;
      }
    }
  };
  for (const item of fig.items) { setClip(Boolean(item.clip)); draw(item); }
  setClip(false);
  doc.end();
  return blob;
}
