/**
 * From the request's escape settings to the stored, hashed ones (docs/noise.md, "Escape studies as
 * runs"): the parameter values spelled out and checked against the atlas' sweep, the noise level
 * resolved from the document, defaults filled in; and the request-time budget check. Bad settings
 * are a 400 naming the field (settings.values, settings.noise, ...), before anything is stored.
 */
import type { ModelDocument } from '../../model/schema.ts';
import { resolveNoise, NoiseSettingError } from '../../noise/noise-spec.ts';
import { estimateWork } from '../../noise/budget.ts';
import { ESCAPE_BUDGET_PER_VALUE } from './budget-constant.ts';
import { HttpError } from '../http.ts';
import { normalizeSettings } from '../runs/normalize-settings.ts';
import type { RunSettings } from '../runs/schemas.ts';
import { expandValues, type EscapeSettings, type StoredEscapeSettings } from './schema.ts';


export { ESCAPE_BUDGET_PER_VALUE };

const invalid = (field: string, message: string) =>
  new HttpError(400, 'invalid_input', `${field}: ${message}`, { field, issues: [{ field, message: `${field}: ${message}` }] });

/** Thrown by checkRequestBudget: 400 `over_budget` with the estimate in the message. */
export class EscapeBudgetError extends HttpError {
  constructor(message: string, readonly nodeSteps: number) {
    super(400, 'over_budget', message, { field: 'settings.paths', issues: [{ field: 'settings.paths', message }] });
  }
}

function stateDimension(doc: ModelDocument): number {
  return doc.format === 'brinkmap/network-1' ? doc.nodes.length : doc.variables.length;
}

export interface NormalizedEscapeRequest {
  /** Stored in runs.settings (with threads). */
  readonly stored: StoredEscapeSettings;
  /** Hashed into the cache key (without threads: the numbers do not depend on them). */
  readonly identity: Omit<StoredEscapeSettings, 'threads'>;
  /** Trace settings of the atlas, normalized as a trace run's (same cache key as that trace run). */
  readonly atlas: RunSettings;
}

export function normalizeEscapeSettings(document: unknown, settings: EscapeSettings): NormalizedEscapeRequest {
  const doc = document as ModelDocument;
  let noise: number;
  try {
    noise = resolveNoise(doc, settings.noise).level;
  } catch (e) {
    if (e instanceof NoiseSettingError) throw invalid('settings.noise', e.message.slice(e.field.length + 2));
    throw e;
  }
  const atlas = normalizeSettings(document, settings.atlas);
  const sweep = (doc as { sweep?: { from?: number; to?: number } }).sweep ?? {};
  const from = atlas.from ?? sweep.from;
  const to = atlas.to ?? sweep.to;
  const values = expandValues(settings);
  if (from !== undefined && to !== undefined) {
    const lo = Math.min(from, to);
    const hi = Math.max(from, to);
    const outside = values.find((p) => p < lo || p > hi);
    if (outside !== undefined) {
      const field = settings.values ? 'settings.values' : outside === settings.from ? 'settings.from' : 'settings.to';
      throw invalid(field, `${outside} lies outside the sweep of the atlas, ${lo} to ${hi} (widen settings.atlas.from/to or the model's sweep)`);
    }
  }
  const identity = {
    noise,
    start: settings.start,
    values,
    paths: settings.paths,
    ...(settings.dt !== undefined ? { dt: settings.dt } : {}),
    ...(settings.tMax !== undefined ? { tMax: settings.tMax } : {}),
    seed: settings.seed,
    atlas: atlas as Record<string, number>,
  };
  return { stored: { ...identity, threads: settings.threads }, identity, atlas };
}

/**
 * The request-time budget check. With both dt and tMax given the work per value is bounded without
 * any computation: paths (plus twice the step-check paths, at dt / 2) times tMax / dt steps times
 * the state dimension (estimateWork on the t-max basis: no path runs past tMax). Over the budget:
 * refused with the estimate. Without dt or tMax the defaults come from the start state and the
 * prediction, so the worker checks each value before simulating any path and fails the run with
 * the same message (docs/noise.md).
 */
export function checkRequestBudget(document: unknown, s: StoredEscapeSettings, budget = ESCAPE_BUDGET_PER_VALUE): void {
  if (s.dt === undefined || s.tMax === undefined) return;
  const n = stateDimension(document as ModelDocument);
  const stepCheck = Math.min(s.paths, 500);
  const e = estimateWork(s.paths + 2 * stepCheck, n, s.dt, s.tMax);
  if (e.nodeSteps > budget) {
    const total = e.nodeSteps * s.values.length;
    throw new EscapeBudgetError(
      `settings.paths: the study needs up to ${e.nodeSteps.toExponential(2)} node-steps per parameter value (${s.paths} paths + ${2 * stepCheck} step-check paths, ${e.stepsPerPath} steps each from tMax / dt, ${n} variables; ${total.toExponential(2)} for all ${s.values.length} values), over the budget of ${budget.toExponential(2)} per value; use a larger noise level, fewer paths, a smaller tMax or a larger dt`,
      e.nodeSteps,
    );
  }
}
