/**
 * Drops run settings that only restate a default (the document's sweep range, the engine's default
 * steps), so that "no settings" and "the same numbers typed in" share one cache key and one result.
 */
import { defaultTraceSettings } from '../../atlas/trace-settings.ts';
import type { RunSettings } from './schemas.ts';

export function normalizeSettings(document: unknown, settings: RunSettings): RunSettings {
  const sweep = (document as { sweep?: { from?: number; to?: number } } | null)?.sweep;
  const out: Record<string, unknown> = {};
  for (const [key, value] of Object.entries(settings) as [keyof RunSettings, unknown][]) {
    if (value === undefined) continue;
    if (key === 'from' && sweep?.from === value) continue;
    if (key === 'to' && sweep?.to === value) continue;
    if (key in defaultTraceSettings && (defaultTraceSettings as Record<string, unknown>)[key] === value) continue;
    out[key] = value;
  }
  return out as RunSettings;
}
