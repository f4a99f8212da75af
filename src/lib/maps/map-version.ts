/**
 * Version of the maps layer's numbers (docs/maps.md). Stored maps should be keyed by it together
 * with the one-parameter ENGINE_VERSION (src/lib/atlas/engine-version.ts), whose diagrams seed the
 * curves: bump it whenever a change can alter the numbers of a map.
 */
export const MAP_ENGINE_VERSION = '1.0.0';
