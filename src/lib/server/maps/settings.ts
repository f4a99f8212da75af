/**
 * From the request's map settings to the stored, hashed ones (docs/maps.md, "Maps in the
 * workspace"): the second parameter checked against the version's document by the engine's own
 * compiler (unknown parameter, the swept one, one every node overrides), defaults and the document's
 * own sweep dropped so that equal requests share one cache key. Bad settings are a 400 naming the
 * field (settings.second, settings.secondTo, ...) before anything is stored.
 */
import { compileTwoParameter } from '../../maps/index.ts';
import { MAP_ENGINE_VERSION } from '../../maps/map-version.ts';
import { ENGINE_VERSION } from '../../atlas/engine-version.ts';
import { ModelError } from '../../model/index.ts';
import { HttpError } from '../http.ts';
import { MAP_DEFAULTS, type MapRunSettings, type StoredMapSettings } from './schema.ts';

/**
 * The engine version a map is keyed and stored by: the one-parameter engine (its diagrams seed the
 * curves) and the maps layer's own version (src/lib/maps/map-version.ts); a bump of either recomputes.
 */
export const MAP_RESULT_ENGINE = `${ENGINE_VERSION}+maps-${MAP_ENGINE_VERSION}`;

const invalid = (field: string, message: string) =>
  new HttpError(400, 'invalid_input', `${field}: ${message}`, { field, issues: [{ field, message: `${field}: ${message}` }] });

export function normalizeMapSettings(document: unknown, s: MapRunSettings): StoredMapSettings {
  const sweep = (document as { sweep?: { from?: number; to?: number } } | null)?.sweep ?? {};
  const own = s.from !== undefined && s.to !== undefined && !(s.from === sweep.from && s.to === sweep.to);
  try {
    compileTwoParameter(document, { second: s.second, ...(own ? { sweep: { from: s.from!, to: s.to! } } : {}) });
  } catch (e) {
    if (!(e instanceof ModelError)) throw e;
    const issue = e.issues[0];
    if (issue?.path === 'second') throw invalid('settings.second', issue.message);
    if (issue?.path === 'sweep') throw invalid('settings.from', issue.message);
    throw invalid('modelId', `the model version does not compile: ${e.message}`);
  }
  const out: Record<string, number | string> = { second: s.second, secondFrom: s.secondFrom, secondTo: s.secondTo };
  if (own) { out.from = s.from!; out.to = s.to!; }
  for (const key of Object.keys(MAP_DEFAULTS) as (keyof typeof MAP_DEFAULTS)[]) {
    if (s[key] !== MAP_DEFAULTS[key]) out[key] = s[key];
  }
  return out as unknown as StoredMapSettings;
}
