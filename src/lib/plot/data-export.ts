/** The data behind a figure as CSV (one row per branch point) and JSON. */
import Papa from 'papaparse';
import type { Diagram } from '../atlas/types';
import type { BandTag, EscapeGraph, RegimeBand } from '../regimes/types';
import type { Provenance } from './provenance';

/**
 * The one CSV layout of diagram data (the export menu, the figure bundle and GET
 * /api/runs/:id/result.csv all write it): with a provenance, first a block of comment lines
 * ("# model: …", "# model version hash: …", run, engine, export date, the standing note), then a
 * header row and one row per branch point: branch, point, <parameter>, <each variable>, unstable
 * (count of eigenvalues with positive real part), stability. Numbers in full double precision
 * (shortest round-trip form), so a reader gets back exactly the stored values; quoting is
 * papaparse's. Readers skip the block with a comment character ('#'; e.g. pandas `comment='#'`,
 * R `comment.char = "#"`).
 */
export function diagramToCsv(diagram: Diagram, provenance?: Provenance): string {
  const header = ['branch', 'point', diagram.parameter, ...diagram.variables, 'unstable', 'stability'];
  const rows: (string | number)[][] = [];
  for (const b of diagram.branches) {
    b.points.forEach((pt, i) => {
      rows.push([b.id, i, pt.p, ...pt.x, pt.unstable, pt.unstable === 0 ? 'stable' : 'unstable']);
    });
  }
  const block = provenance ? provenanceBlock(provenance) : '';
  return `${block}${Papa.unparse({ fields: header, data: rows }, { newline: '\n' })}\n`;
}

/** The comment block at the head of a CSV file (one line per field; newlines in values become spaces). */
export function provenanceBlock(p: Provenance): string {
  const clean = (v: string) => v.replace(/[\r\n]+/g, ' ');
  return [
    '# Brinkmap diagram data',
    `# model: ${clean(p.modelName)}`,
    `# model version hash: ${clean(p.versionHash)}`,
    ...(p.override ? [`# parameter overridden for this run (not the version's value): ${clean(p.override)}`] : []),
    `# run: ${clean(p.runId)}`,
    `# engine: ${clean(p.engineVersion)}`,
    `# exported: ${clean(p.date)}`,
    '# Model results are indicative; defer to domain experts and local regulation.',
  ].join('\n') + '\n';
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
