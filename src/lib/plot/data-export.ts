/** The data behind a figure as CSV (one row per branch point) and JSON. */
import Papa from 'papaparse';
import type { Diagram } from '../atlas/types';
import type { BandTag, EscapeGraph, RegimeBand } from '../regimes/types';
import { project, projectionLabel, type Projection } from './projection';
import type { Provenance } from './provenance';

/**
 * CSV text: a header row, then one row per branch point:
 * branch, point, <parameter>, <each variable>, unstable (count of eigenvalues with positive real part),
 * stability, <projection>. Numbers are printed with full double precision (shortest round-trip form),
 * so a reader gets back exactly the stored values. Quoting is papaparse's.
 */
export function diagramToCsv(diagram: Diagram, projection: Projection): string {
  const header = ['branch', 'point', diagram.parameter, ...diagram.variables, 'unstable', 'stability', projectionLabel(projection, diagram.variables)];
  const rows: (string | number)[][] = [];
  for (const b of diagram.branches) {
    b.points.forEach((pt, i) => {
      rows.push([b.id, i, pt.p, ...pt.x, pt.unstable, pt.unstable === 0 ? 'stable' : 'unstable', project(pt.x, projection)]);
    });
  }
  return Papa.unparse({ fields: header, data: rows }, { newline: '\n' });
}

export interface FigureData {
  readonly format: 'brinkmap/figure-data-1';
  readonly provenance: Provenance;
  readonly projection: { readonly key: string; readonly label: string };
  readonly view?: { readonly p: readonly [number, number]; readonly y: readonly [number, number] };
  readonly diagram: Diagram;
  readonly regimes: readonly RegimeBand[];
  readonly escapeGraphs: readonly EscapeGraph[];
  readonly tags: readonly BandTag[];
  readonly note: string;
}

export function diagramToJson(input: Omit<FigureData, 'format' | 'note'>): string {
  const data: FigureData = { format: 'brinkmap/figure-data-1', ...input, note: 'Model results are indicative; defer to domain experts and local regulation.' };
  return JSON.stringify(data, null, 2);
}

/** A file name safe on every common file system: letters, digits, dot, dash, underscore. */
export function safeFileName(stem: string, ext: string): string {
  const clean = stem.normalize('NFKD').replace(/[^A-Za-z0-9._-]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 80) || 'diagram';
  return `${clean}.${ext}`;
}
