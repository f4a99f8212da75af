/**
 * Reading and writing the diagram of a `results` row in either stored form: the encoded blob
 * (`diagram_blob`, src/lib/storage, docs/storage.md) that results are written in since issue 12,
 * or the JSON text (`diagram`, `preview`) of rows written before. Whichever form a row has, the
 * caller gets the same JSON text and the same objects.
 */
import type { Diagram } from '../../atlas/types.ts';
import { decodeDiagram, decodeDiagramText, encodeDiagram } from '../../storage/index.ts';
import { previewOf } from './preview.ts';

export type ResultView = 'full' | 'preview';

/** The stored columns a diagram is read from (any may be absent from a query that did not select it). */
export interface StoredDiagramColumns {
  /** Encoded diagram (mysql2 returns BLOBs as Buffer). */
  readonly blob?: Uint8Array | null;
  /** JSON text of the view asked for (for a preview: COALESCE(preview, diagram)) of a row without a blob. */
  readonly text?: string | null;
}

/** The view's JSON text: the blob decoded (and thinned for the preview), else the stored text. */
export function storedDiagramText(c: StoredDiagramColumns, view: ResultView): string {
  if (c.blob) {
    const bytes = new Uint8Array(c.blob.buffer, c.blob.byteOffset, c.blob.byteLength);
    if (view === 'full') return decodeDiagramText(bytes);
    const diagram = decodeDiagram(bytes);
    const preview = previewOf(diagram);
    return preview === diagram ? JSON.stringify(diagram) : JSON.stringify(preview);
  }
  if (c.text == null) throw new Error('stored result has neither an encoded diagram nor its JSON text');
  return c.text;
}

/** The view as objects (no JSON text in between for encoded rows). */
export function storedDiagram(c: StoredDiagramColumns, view: ResultView): Diagram {
  if (c.blob) {
    const diagram = decodeDiagram(new Uint8Array(c.blob.buffer, c.blob.byteOffset, c.blob.byteLength));
    return view === 'full' ? diagram : previewOf(diagram);
  }
  if (c.text == null) throw new Error('stored result has neither an encoded diagram nor its JSON text');
  return JSON.parse(c.text) as Diagram;
}

/** A `results` row as a test or script reads it with knex (`select *`): its full diagram. */
export function diagramOfResultRow(row: { diagram_blob?: Uint8Array | null; diagram?: string | null }): Diagram {
  return storedDiagram({ blob: row.diagram_blob, text: row.diagram }, 'full');
}

/** The encoded form of a freshly computed diagram and the size of its preview, for the `results` row. */
export function encodeForStorage(diagram: Diagram): { blob: Uint8Array; previewPoints: number } {
  const preview = previewOf(diagram);
  return { blob: encodeDiagram(diagram), previewPoints: preview.branches.reduce((n, b) => n + b.points.length, 0) };
}
