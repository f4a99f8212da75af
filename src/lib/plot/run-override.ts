/**
 * How a trace run with an overridden parameter says so (docs/maps.md, "From the map back to one
 * parameter"): the run page, the runs list, the comparison, the report and every export's provenance
 * footer print this one phrase, so a figure of a slice is never taken for the model version's own
 * diagram. Pure.
 */
import { formatValue } from './ticks';

export interface OverrideSource {
  readonly settings?: unknown;
  /** The map run the slice was cut from, when there is one. */
  readonly sliceOf?: number | null;
}

/** The run's override, if its settings hold one. */
export function runOverride(settings: unknown): { parameter: string; value: number } | null {
  const o = (settings as { override?: { parameter?: unknown; value?: unknown } } | null | undefined)?.override;
  return o && typeof o.parameter === 'string' && typeof o.value === 'number' ? { parameter: o.parameter, value: o.value } : null;
}

/**
 * "r = 0.42 overridden (slice of map run 12)", or null for a run of the version as it stands. The
 * value is printed in full (String), not rounded, so the number can be typed back in.
 */
export function overrideNote(run: OverrideSource): string | null {
  const o = runOverride(run.settings);
  if (!o) return null;
  const from = run.sliceOf ? `slice of map run ${run.sliceOf}` : 'not the model version\u2019s value';
  return `${o.parameter} = ${String(o.value)} overridden (${from})`;
}

/** A short label for tight places (legends): "r = 0.42 (override)". */
export function overrideShort(run: OverrideSource): string | null {
  const o = runOverride(run.settings);
  return o ? `${o.parameter} = ${formatValue(o.value, 4)} (override)` : null;
}
