/**
 * The whole computation behind a map run, from stored document text to what is stored: compile with
 * two free parameters, trace the map (src/lib/maps), and deflate its JSON for the `map_results` row.
 * No database; the worker thread and tests run exactly this.
 */
import { deflateRawSync, inflateRawSync } from 'node:zlib';
import { compileTwoParameter, traceMap, type TwoParameterMap } from '../../maps/index.ts';
import type { StoredMapSettings } from './schema.ts';

export interface MapComputeHooks {
  onProgress(fraction: number, phrase: string): void;
  isCancelled(): boolean;
}

/** The map as the CLI prints it (`atlas map`, src/cli/map-command.ts): what is stored and served. */
export type MapDocument = Pick<TwoParameterMap, 'parameters' | 'ranges' | 'curves' | 'points' | 'regions' | 'diagnostics'>;

export interface MapComputeOutput {
  readonly kind: 'map';
  /** Deflated (raw deflate) UTF-8 JSON of the MapDocument. */
  readonly mapBlob: Uint8Array;
  readonly jsonBytes: number;
  readonly second: string;
  /** The document's own value of the second parameter (the one-parameter diagram's slice). */
  readonly secondValue: number;
  readonly curveCount: number;
  readonly curvePointCount: number;
  readonly pointCount: number;
  readonly computeMs: number;
  readonly cancelled: boolean;
}

export function computeMap(documentText: string, settings: StoredMapSettings, hooks: MapComputeHooks): MapComputeOutput {
  const started = performance.now();
  hooks.onProgress(0, 'compiling the model with two free parameters');
  const document = JSON.parse(documentText);
  const sweep = settings.from !== undefined && settings.to !== undefined ? { sweep: { from: settings.from, to: settings.to } } : {};
  const system = compileTwoParameter(document, { second: settings.second, ...sweep });
  const map = traceMap(system, {
    secondFrom: settings.secondFrom,
    secondTo: settings.secondTo,
    ...(settings.seeds !== undefined ? { seeds: settings.seeds } : {}),
    ...(settings.regionColumns !== undefined ? { regionColumns: settings.regionColumns } : {}),
    ...(settings.regionRows !== undefined ? { regionRows: settings.regionRows } : {}),
    ...(settings.maxPointsPerCurve !== undefined ? { maxPointsPerCurve: settings.maxPointsPerCurve } : {}),
    ...(settings.maxCurves !== undefined ? { maxCurves: settings.maxCurves } : {}),
  }, {
    onProgress: (f, phrase) => hooks.onProgress(0.98 * Math.min(1, Math.max(0, f)), phrase),
    isCancelled: () => hooks.isCancelled(),
  });
  hooks.onProgress(0.99, 'storing the map');
  const doc: MapDocument = { parameters: map.parameters, ranges: map.ranges, curves: map.curves, points: map.points, regions: map.regions, diagnostics: map.diagnostics };
  const { blob, bytes } = encodeMap(doc);
  return {
    kind: 'map',
    mapBlob: blob,
    jsonBytes: bytes,
    second: settings.second,
    secondValue: system.secondValue,
    curveCount: map.curves.length,
    curvePointCount: map.curves.reduce((n, c) => n + c.points.length, 0),
    pointCount: map.points.length,
    computeMs: Math.round(performance.now() - started),
    cancelled: hooks.isCancelled(),
  };
}

export function encodeMap(doc: MapDocument): { blob: Uint8Array; bytes: number } {
  const text = Buffer.from(JSON.stringify(doc), 'utf8');
  return { blob: new Uint8Array(deflateRawSync(text, { level: 6 })), bytes: text.byteLength };
}

export function decodeMap(blob: Uint8Array): MapDocument {
  return JSON.parse(inflateRawSync(blob).toString('utf8')) as MapDocument;
}
