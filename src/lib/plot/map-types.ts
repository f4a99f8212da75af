/**
 * The parts of a stored two-parameter map the plot helpers read (the CLI's and the API's shape,
 * src/lib/maps/map-types.ts), as plain JSON: what the browser gets from GET /api/runs/:id/map.
 */
import type { MapCurve, MapPoint, MapRegion } from '../maps/map-types';

export interface MapDocumentView {
  readonly parameters: readonly [string, string] | readonly string[];
  readonly ranges: { readonly first: readonly [number, number] | readonly number[]; readonly second: readonly [number, number] | readonly number[] };
  readonly curves: readonly Pick<MapCurve, 'id' | 'type' | 'points'>[];
  readonly points: readonly Pick<MapPoint, 'id' | 'type' | 'p' | 'x' | 'curves' | 'evidence' | 'note'>[];
  readonly regions: readonly Pick<MapRegion, 'id' | 'regime' | 'samples'>[];
  readonly diagnostics?: readonly { readonly level: string; readonly code: string; readonly message: string }[];
}
