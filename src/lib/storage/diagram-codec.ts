/**
 * The stored form of a Diagram: branch points as Float64 columns (lossless), everything else as
 * JSON, compressed with deflate (node:zlib, zlib format, so the Adler-32 check catches a damaged
 * blob), behind a small versioned header. docs/storage.md describes the layout and the measurements
 * behind it.
 *
 * Contract: for every diagram d, decodeDiagramText(encodeDiagram(d)) === JSON.stringify(d) (the
 * same bytes the JSON text storage served) and decodeDiagram(encodeDiagram(d)) is deep-equal to
 * d. Points whose shape the columns cannot carry exactly (keys other than p, x, unstable and
 * eigenvalues, in that order; non-numbers; x of differing lengths) make the whole diagram fall back
 * to its compressed JSON text (layout 0), which keeps the contract trivially.
 *
 * Header (12 bytes, little-endian):
 *   0..3  "BMDG"            magic
 *   4     format version    1
 *   5     layout            0 = JSON text, 1 = point columns
 *   6     codec             1 = deflate (zlib format)
 *   7     reserved          0
 *   8..11 uint32            length of the payload before compression
 * Payload of layout 1: uint32 length of the meta JSON, the meta JSON (UTF-8), zero padding to a
 * multiple of 8, then the column block (predictResiduals + shuffleBytes of float-columns.ts).
 */
import { deflateSync, inflateSync } from 'node:zlib';
import type { Branch, BranchPoint, Diagram, Eigenvalue } from '../atlas/types.ts';
import { predictResiduals, shuffleBytes, undoResiduals, unshuffleBytes, type PredictionOrder } from './float-columns.ts';

export const DIAGRAM_FORMAT_VERSION = 1;
const MAGIC = [0x42, 0x4d, 0x44, 0x47]; // "BMDG"
const HEADER_BYTES = 12;
const CODEC_DEFLATE = 1;

export type DiagramLayout = 'json' | 'columns';

/** A blob that is not an encoded diagram this code can read (wrong magic, newer version, damaged). */
export class StoredDiagramError extends Error {
  override readonly name = 'StoredDiagramError';
}

export interface EncodeOptions {
  /** zlib level 0..9 (default 6: measured within 3 % of level 9 on a 6-node diagram at 2/3 of the time). */
  readonly level?: number;
}

/** What the header says, without decompressing. */
export interface DiagramBlobInfo {
  readonly version: number;
  readonly layout: DiagramLayout;
  readonly payloadBytes: number;
  readonly storedBytes: number;
}

interface Meta {
  /** The diagram with every branch's points replaced by []: key order and all non-point data. */
  readonly skeleton: Record<string, unknown> & { branches: Record<string, unknown>[] };
  /** Length of every point's x. */
  readonly dim: number;
  /** Points per branch, in branch order. */
  readonly counts: number[];
  /** Total eigenvalues stored, or -1 when no point carries eigenvalues (no eigenvalue columns). */
  readonly eigenTotal: number;
}

// Columns: p and x_i predicted from the two points before (smooth branches), the rest from one.
const POINT_ORDER: PredictionOrder = 2;
const COUNT_ORDER: PredictionOrder = 1;

function assertLittleEndian(): void {
  if (new Uint8Array(new Uint16Array([1]).buffer)[0] !== 1) throw new StoredDiagramError('stored diagrams are read and written on little-endian machines only');
}

const PLAIN = 'p,x,unstable';
const WITH_EIGEN = 'p,x,unstable,eigenvalues';

/** The point layout the columns carry, or null when some point does not fit it (then layout 0). */
function columnPlan(diagram: Diagram): { dim: number; eigenTotal: number } | null {
  const branches = (diagram as { branches?: unknown }).branches;
  if (!Array.isArray(branches)) return null;
  let dim = -1;
  let eigenTotal = -1;
  for (const b of branches as unknown[]) {
    if (b === null || typeof b !== 'object' || Array.isArray(b)) return null;
    const points = (b as { points?: unknown }).points;
    if (!Array.isArray(points)) return null;
    for (const q of points as unknown[]) {
      if (q === null || typeof q !== 'object') return null;
      const pt = q as BranchPoint;
      let keys = Object.keys(pt).join(',');
      // A key holding undefined is left out by JSON.stringify, so it is absent for storage too.
      if (keys === WITH_EIGEN && pt.eigenvalues === undefined) keys = PLAIN;
      if (keys !== PLAIN && keys !== WITH_EIGEN) return null;
      if (typeof pt.p !== 'number' || typeof pt.unstable !== 'number' || !Array.isArray(pt.x)) return null;
      if (dim < 0) dim = pt.x.length;
      if (pt.x.length !== dim) return null;
      for (let i = 0; i < dim; i++) if (typeof pt.x[i] !== 'number') return null;
      if (keys === WITH_EIGEN) {
        if (!Array.isArray(pt.eigenvalues)) return null;
        if (eigenTotal < 0) eigenTotal = 0;
        for (const e of pt.eigenvalues as unknown[]) {
          if (e === null || typeof e !== 'object' || Object.keys(e).join(',') !== 're,im') return null;
          if (typeof (e as Eigenvalue).re !== 'number' || typeof (e as Eigenvalue).im !== 'number') return null;
        }
        eigenTotal += pt.eigenvalues.length;
      }
    }
  }
  return { dim: Math.max(0, dim), eigenTotal };
}

function header(layout: number, payloadBytes: number): Uint8Array {
  const h = new Uint8Array(HEADER_BYTES);
  h.set(MAGIC, 0);
  h[4] = DIAGRAM_FORMAT_VERSION;
  h[5] = layout;
  h[6] = CODEC_DEFLATE;
  new DataView(h.buffer).setUint32(8, payloadBytes, true);
  return h;
}

function withHeader(layout: number, payload: Uint8Array, level: number): Uint8Array {
  const packed = deflateSync(payload, { level });
  const out = new Uint8Array(HEADER_BYTES + packed.byteLength);
  out.set(header(layout, payload.byteLength), 0);
  out.set(packed, HEADER_BYTES);
  return out;
}

/** Encodes a diagram for storage (see the file comment for the contract and layout). */
export function encodeDiagram(diagram: Diagram, options: EncodeOptions = {}): Uint8Array {
  assertLittleEndian();
  const level = options.level ?? 6;
  const plan = columnPlan(diagram);
  if (!plan) return withHeader(0, new TextEncoder().encode(JSON.stringify(diagram)), level);
  const { dim, eigenTotal } = plan;
  const branches = diagram.branches;
  const counts = branches.map((b) => b.points.length);
  const n = counts.reduce((s, c) => s + c, 0);
  // Replacing `points` keeps its place among the branch's keys (assignment to an existing key).
  const skeleton = JSON.parse(JSON.stringify({ ...diagram, branches: branches.map((b) => ({ ...b, points: [] })) }));
  const meta: Meta = { skeleton, dim, counts, eigenTotal };
  const metaBytes = new TextEncoder().encode(JSON.stringify(meta));
  const metaEnd = 4 + metaBytes.byteLength;
  const columnsAt = Math.ceil(metaEnd / 8) * 8;
  const eigen = eigenTotal >= 0;
  const values = n * (dim + 2) + (eigen ? n + 2 * eigenTotal : 0);
  const residuals = new BigInt64Array(values);
  const column = new Float64Array(n);
  let at = 0;
  const put = (src: Float64Array, order: PredictionOrder) => {
    predictResiduals(src, order, residuals.subarray(at, at + src.length));
    at += src.length;
  };
  const fill = (get: (q: BranchPoint) => number) => {
    let k = 0;
    for (const b of branches) for (const q of b.points) column[k++] = get(q);
    return column;
  };
  put(fill((q) => q.p), POINT_ORDER);
  for (let i = 0; i < dim; i++) put(fill((q) => q.x[i]), POINT_ORDER);
  put(fill((q) => q.unstable), COUNT_ORDER);
  if (eigen) {
    put(fill((q) => (q.eigenvalues === undefined ? -1 : q.eigenvalues.length)), COUNT_ORDER);
    const re = new Float64Array(eigenTotal);
    const im = new Float64Array(eigenTotal);
    let k = 0;
    for (const b of branches) for (const q of b.points) for (const e of q.eigenvalues ?? []) { re[k] = e.re; im[k] = e.im; k++; }
    put(re, COUNT_ORDER);
    put(im, COUNT_ORDER);
  }
  const payload = new Uint8Array(columnsAt + 8 * values);
  new DataView(payload.buffer).setUint32(0, metaBytes.byteLength, true);
  payload.set(metaBytes, 4);
  payload.set(shuffleBytes(new Uint8Array(residuals.buffer), 8), columnsAt);
  return withHeader(1, payload, level);
}

/** True when `bytes` starts with the header of an encoded diagram. */
export function isEncodedDiagram(bytes: Uint8Array | null | undefined): bytes is Uint8Array {
  return !!bytes && bytes.byteLength >= HEADER_BYTES && MAGIC.every((m, i) => bytes[i] === m);
}

/** The header's fields (throws StoredDiagramError for a blob that is not one, or of a newer version). */
export function diagramBlobInfo(bytes: Uint8Array): DiagramBlobInfo {
  if (!isEncodedDiagram(bytes)) throw new StoredDiagramError('not an encoded diagram (the header is missing)');
  const version = bytes[4];
  if (version !== DIAGRAM_FORMAT_VERSION) throw new StoredDiagramError(`encoded diagram of format version ${version}; this code reads version ${DIAGRAM_FORMAT_VERSION}`);
  if (bytes[5] !== 0 && bytes[5] !== 1) throw new StoredDiagramError(`encoded diagram with unknown layout ${bytes[5]}`);
  if (bytes[6] !== CODEC_DEFLATE) throw new StoredDiagramError(`encoded diagram with unknown compression ${bytes[6]}`);
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  return { version, layout: bytes[5] === 0 ? 'json' : 'columns', payloadBytes: view.getUint32(8, true), storedBytes: bytes.byteLength };
}

interface Unpacked {
  readonly meta: Meta;
  /** Decoded columns in encoding order: p, x_0..x_{dim-1}, unstable, then eigen count, re, im. */
  readonly columns: Float64Array[];
}

function unpack(bytes: Uint8Array): { text: string } | Unpacked {
  assertLittleEndian();
  const info = diagramBlobInfo(bytes);
  let payload: Uint8Array;
  try {
    payload = inflateSync(bytes.subarray(HEADER_BYTES));
  } catch (e) {
    throw new StoredDiagramError(`encoded diagram is damaged (${(e as Error).message})`);
  }
  if (payload.byteLength !== info.payloadBytes) throw new StoredDiagramError(`encoded diagram is damaged (payload of ${payload.byteLength} bytes, header says ${info.payloadBytes})`);
  const decoder = new TextDecoder();
  if (info.layout === 'json') return { text: decoder.decode(payload) };
  const metaLength = new DataView(payload.buffer, payload.byteOffset, payload.byteLength).getUint32(0, true);
  const meta = JSON.parse(decoder.decode(payload.subarray(4, 4 + metaLength))) as Meta;
  const columnsAt = Math.ceil((4 + metaLength) / 8) * 8;
  const n = meta.counts.reduce((s, c) => s + c, 0);
  const eigen = meta.eigenTotal >= 0;
  const values = n * (meta.dim + 2) + (eigen ? n + 2 * meta.eigenTotal : 0);
  if (payload.byteLength !== columnsAt + 8 * values) throw new StoredDiagramError(`encoded diagram is damaged (${payload.byteLength - columnsAt} column bytes for ${values} values)`);
  const raw = unshuffleBytes(payload.subarray(columnsAt), 8);
  const residuals = new BigInt64Array(raw.buffer, raw.byteOffset, values);
  const columns: Float64Array[] = [];
  let at = 0;
  const take = (length: number, order: PredictionOrder) => {
    const out = new Float64Array(length);
    undoResiduals(residuals.subarray(at, at + length), order, out);
    at += length;
    columns.push(out);
  };
  take(n, POINT_ORDER);
  for (let i = 0; i < meta.dim; i++) take(n, POINT_ORDER);
  take(n, COUNT_ORDER);
  if (eigen) {
    take(n, COUNT_ORDER);
    take(meta.eigenTotal, COUNT_ORDER);
    take(meta.eigenTotal, COUNT_ORDER);
  }
  return { meta, columns };
}

/** The diagram back as objects, deep-equal to the one encoded. */
export function decodeDiagram(bytes: Uint8Array): Diagram {
  const u = unpack(bytes);
  return 'text' in u ? (JSON.parse(u.text) as Diagram) : fromColumns(u);
}

function fromColumns({ meta, columns }: Unpacked): Diagram {
  const { dim } = meta;
  const p = columns[0];
  const unstable = columns[dim + 1];
  const eigenCount = meta.eigenTotal >= 0 ? columns[dim + 2] : null;
  const re = eigenCount ? columns[dim + 3] : null;
  const im = eigenCount ? columns[dim + 4] : null;
  let k = 0;
  let e = 0;
  const branches = meta.skeleton.branches.map((b, bi) => {
    const points: BranchPoint[] = new Array(meta.counts[bi]);
    for (let j = 0; j < points.length; j++, k++) {
      const x = new Array<number>(dim);
      for (let i = 0; i < dim; i++) x[i] = columns[i + 1][k];
      const c = eigenCount ? eigenCount[k] : -1;
      if (c < 0) {
        points[j] = { p: p[k], x, unstable: unstable[k] };
      } else {
        const eigenvalues: Eigenvalue[] = new Array(c);
        for (let m = 0; m < c; m++, e++) eigenvalues[m] = { re: re![e], im: im![e] };
        points[j] = { p: p[k], x, unstable: unstable[k], eigenvalues };
      }
    }
    // Assigning the existing `points` key keeps the stored key order.
    const branch = b as unknown as { points: BranchPoint[] };
    branch.points = points;
    return branch as unknown as Branch;
  });
  meta.skeleton.branches = branches as unknown as Record<string, unknown>[];
  return meta.skeleton as unknown as Diagram;
}

/**
 * The diagram's JSON text, byte for byte JSON.stringify of the diagram that was encoded. Building
 * the objects and stringifying them measured faster than writing the text straight from the columns
 * (docs/storage.md); the decoded objects keep the stored key order, so the text is the same.
 */
export function decodeDiagramText(bytes: Uint8Array): string {
  const u = unpack(bytes);
  return 'text' in u ? u.text : JSON.stringify(fromColumns(u));
}
