/**
 * Figures at a physical size for papers: width and height in millimetres or inches, a base font
 * size in points, and PNG files that carry their resolution. Pure functions; the export dialog
 * (components/export) and the tests use them alike.
 *
 * Layout: the figure is laid out by buildFigure at its own default type size (tick labels 10.5
 * units) on a canvas of (width / s) × (height / s) units and then scaled by s = fontSize / 10.5 into
 * points, so that the tick labels come out at exactly `fontSize` pt at the asked physical size and
 * every other element keeps its proportion to the text. 1 in = 72 pt = 25.4 mm (PDF 1.7 §8.3.2.3:
 * default user space unit 1/72 in).
 */
import CRC32 from 'crc-32';
import { buildFigure, type Figure, type FigureInput } from './figure';

export type LengthUnit = 'mm' | 'in';

export interface PaperSize {
  readonly width: number;
  readonly height: number;
  readonly unit: LengthUnit;
  /** Size of the tick labels in points; titles and legend keep their proportion to it. */
  readonly fontSize: number;
}

/**
 * Starting sizes for the dialog: one and two journal columns. About 85 mm and 178 mm are widths many
 * journals ask for (common practice, no source); the user edits them freely.
 */
export const SIZE_PRESETS = {
  'one-column': { label: 'One column (85 mm)', width: 85, height: 70, unit: 'mm', fontSize: 7 },
  'two-column': { label: 'Two columns (178 mm)', width: 178, height: 110, unit: 'mm', fontSize: 8 },
} as const satisfies Record<string, PaperSize & { label: string }>;

/** The default type size of buildFigure's tick labels, in its layout units. */
export const LAYOUT_FONT_SIZE = 10.5;

/** Length in points (1 in = 72 pt, 1 in = 25.4 mm). */
export function toPoints(value: number, unit: LengthUnit): number {
  return unit === 'mm' ? (value / 25.4) * 72 : value * 72;
}

/** Checks a paper size; returns the problem in words naming the field, or null. */
export function paperSizeProblem(size: PaperSize): string | null {
  const limits = size.unit === 'mm' ? [20, 600] : [0.8, 24];
  for (const [field, v] of [['width', size.width], ['height', size.height]] as const) {
    if (!Number.isFinite(v) || v < limits[0] || v > limits[1]) return `${field}: must be between ${limits[0]} and ${limits[1]} ${size.unit}`;
  }
  if (!Number.isFinite(size.fontSize) || size.fontSize < 4 || size.fontSize > 24) return 'font size: must be between 4 and 24 pt';
  const s = size.fontSize / LAYOUT_FONT_SIZE;
  if (toPoints(size.width, size.unit) / s < 240) return 'width: too narrow for this font size (make the figure wider or the font smaller)';
  return null;
}

export interface PaperFigure {
  /** The figure in layout units (what buildFigure returns). */
  readonly figure: Figure;
  /** Points per layout unit. */
  readonly scale: number;
  readonly widthPt: number;
  readonly heightPt: number;
}

/**
 * The figure at a physical size (see the file head). The plot area takes whatever height is left
 * after axes, legend, caption and footer (at least 60 layout units; then the figure is taller than
 * asked and heightPt says so).
 */
export function paperFigure(input: FigureInput, size: PaperSize): PaperFigure {
  const scale = size.fontSize / LAYOUT_FONT_SIZE;
  const width = toPoints(size.width, size.unit) / scale;
  const height = toPoints(size.height, size.unit) / scale;
  const probe = buildFigure({ ...input, width, plotHeight: 200 });
  const extra = probe.height - 200;
  const plotHeight = Math.max(60, Math.floor(height - extra));
  const figure = buildFigure({ ...input, width, plotHeight });
  return { figure, scale, widthPt: figure.width * scale, heightPt: figure.height * scale };
}

/**
 * A PNG with its resolution recorded: a pHYs chunk (pixels per metre in x and y, unit 1 = metre;
 * PNG 1.2 specification §4.2.4.2 / ISO 15948 §11.3.5.3) inserted right after IHDR, replacing any
 * pHYs already there. CRC-32 over chunk type and data (crc-32 package; the PNG CRC, §3.4).
 */
export function withResolution(png: Uint8Array, dpi: number): Uint8Array {
  const signature = [137, 80, 78, 71, 13, 10, 26, 10];
  if (png.length < 33 || signature.some((b, i) => png[i] !== b)) throw new Error('not a PNG file');
  const view = new DataView(png.buffer, png.byteOffset, png.byteLength);
  const chunks: Uint8Array[] = [png.subarray(0, 8)];
  let at = 8;
  let inserted = false;
  while (at + 12 <= png.length) {
    const length = view.getUint32(at);
    const type = String.fromCharCode(...png.subarray(at + 4, at + 8));
    const end = at + 12 + length;
    if (end > png.length) throw new Error('truncated PNG chunk');
    if (type !== 'pHYs') chunks.push(png.subarray(at, end));
    if (type === 'IHDR' && !inserted) { chunks.push(physChunk(dpi)); inserted = true; }
    at = end;
    if (type === 'IEND') break;
  }
  const total = chunks.reduce((s, c) => s + c.length, 0);
  const out = new Uint8Array(total);
  let k = 0;
  for (const c of chunks) { out.set(c, k); k += c.length; }
  return out;
}

/** Pixels per metre for a resolution in dots per inch (1 in = 0.0254 m), rounded. */
export function pixelsPerMetre(dpi: number): number {
  return Math.round(dpi / 0.0254);
}

function physChunk(dpi: number): Uint8Array {
  const ppm = pixelsPerMetre(dpi);
  const chunk = new Uint8Array(4 + 4 + 9 + 4);
  const v = new DataView(chunk.buffer);
  v.setUint32(0, 9);
  chunk.set([0x70, 0x48, 0x59, 0x73], 4); // 'pHYs'
  v.setUint32(8, ppm);
  v.setUint32(12, ppm);
  chunk[16] = 1; // unit: metre
  v.setInt32(17, CRC32.buf(chunk.subarray(4, 17)));
  return chunk;
}

/** Reads the pHYs resolution back (dots per inch in x and y), or null when the PNG has none. */
export function readResolution(png: Uint8Array): { x: number; y: number } | null {
  const view = new DataView(png.buffer, png.byteOffset, png.byteLength);
  let at = 8;
  while (at + 12 <= png.length) {
    const length = view.getUint32(at);
    const type = String.fromCharCode(...png.subarray(at + 4, at + 8));
    if (type === 'pHYs' && png[at + 16] === 1) return { x: view.getUint32(at + 8) * 0.0254, y: view.getUint32(at + 12) * 0.0254 };
    if (type === 'IEND') break;
    at += 12 + length;
  }
  return null;
}

/**
 * Splits text into runs of Greek (U+0370–U+03FF, U+1F00–U+1FFF) and other characters, so that each
 * run can be set in a font file that has its glyphs (the shipped Inter comes as per-script subsets).
 */
export function scriptRuns(text: string): { text: string; greek: boolean }[] {
  const runs: { text: string; greek: boolean }[] = [];
  for (const ch of text) {
    const c = ch.codePointAt(0)!;
    const greek = (c >= 0x370 && c <= 0x3ff) || (c >= 0x1f00 && c <= 0x1fff);
    const last = runs[runs.length - 1];
    if (last && last.greek === greek) last.text += ch;
    else runs.push({ text: ch, greek });
  }
  return runs;
}
