/**
 * Settings of an escape study run (run kind 'escapes', docs/noise.md "Escape studies as runs"). Pure
 * zod with no server imports, so the browser's form can validate with this very schema.
 */
import { z } from 'zod';
import { runSettingsSchema } from '../runs/trace-settings-schema.ts';

const finite = z.number().finite('must be a finite number');

/** Most parameter values in one study. */
export const MAX_ESCAPE_VALUES = 200;
/** Most paths per parameter value through the service (the engine allows 1e7; the budget usually bites first). */
export const MAX_SERVICE_PATHS = 1_000_000;
/** Most threads one run may ask for; the worker uses at most its machine's cores. */
export const MAX_ESCAPE_THREADS = 64;

export const escapeSettingsSchema = z.object({
  /** Noise level sigma > 0; default the model document's noise.amplitude. */
  noise: z.number().finite('must be a finite number').positive('must be positive').optional(),
  /** The stable state the paths start from. */
  start: z.enum(['all-base', 'all-tipped'], { message: "must be 'all-base' or 'all-tipped'" }).default('all-base'),
  /** Parameter values, either listed ... */
  values: z.array(finite).min(1, 'give at least one parameter value').max(MAX_ESCAPE_VALUES, `at most ${MAX_ESCAPE_VALUES} parameter values`).optional(),
  /** ... or as an even grid from .. to with count values. */
  from: finite.optional(),
  to: finite.optional(),
  count: z.number().int('must be a whole number').min(1, 'at least 1').max(MAX_ESCAPE_VALUES, `at most ${MAX_ESCAPE_VALUES}`).optional(),
  /** Monte Carlo paths per parameter value. */
  paths: z.number().int('must be a whole number').min(1, 'at least 1').max(MAX_SERVICE_PATHS, `at most ${MAX_SERVICE_PATHS}`).default(1000),
  /** Euler–Maruyama step; default 0.05 / fastest eigenvalue modulus at the start state. */
  dt: z.number().finite('must be a finite number').positive('must be positive').optional(),
  /** Time cap per path; default from a pilot of the first paths (src/lib/noise/time-cap.ts). */
  tMax: z.number().finite('must be a finite number').positive('must be positive').optional(),
  seed: z.number().int('must be a whole number').min(0, 'at least 0').max(4294967295, 'at most 4294967295').default(1),
  /** Threads of the escape pool; the numbers are the same for any count. */
  threads: z.number().int('must be a whole number').min(1, 'at least 1').max(MAX_ESCAPE_THREADS, `at most ${MAX_ESCAPE_THREADS}`).default(1),
  /** Trace settings of the atlas the study stands on (default: the document's sweep, engine defaults). */
  atlas: runSettingsSchema.default({}),
}).strict().superRefine((s, ctx) => {
  const grid = s.from !== undefined || s.to !== undefined || s.count !== undefined;
  if (s.values !== undefined && grid) {
    ctx.addIssue({ code: 'custom', path: ['values'], message: 'give either values or from/to/count, not both' });
  } else if (s.values === undefined) {
    if (!grid) ctx.addIssue({ code: 'custom', path: ['values'], message: 'give the parameter values (a list, or from, to and count)' });
    else for (const key of ['from', 'to', 'count'] as const) {
      if (s[key] === undefined) ctx.addIssue({ code: 'custom', path: [key], message: `required with ${['from', 'to', 'count'].filter((k) => k !== key).join(' and ')}` });
    }
    if (s.count !== undefined && s.count > 1 && s.from !== undefined && s.from === s.to) {
      ctx.addIssue({ code: 'custom', path: ['to'], message: 'must differ from from when count > 1' });
    }
  }
});

export type EscapeSettingsInput = z.input<typeof escapeSettingsSchema>;
export type EscapeSettings = z.output<typeof escapeSettingsSchema>;

/**
 * The settings as stored and hashed: values spelled out, noise resolved, defaults filled in and
 * threads left out (the numbers do not depend on them; the run row keeps the wish in `threads`).
 */
export interface NormalizedEscapeSettings {
  readonly noise: number;
  readonly start: 'all-base' | 'all-tipped';
  readonly values: number[];
  readonly paths: number;
  readonly dt?: number;
  readonly tMax?: number;
  readonly seed: number;
  readonly atlas: Record<string, number>;
}

/** Stored settings of an escape run: the normalized ones plus the thread count. */
export type StoredEscapeSettings = NormalizedEscapeSettings & { readonly threads: number };

/** `count` equally spaced values from `from` to `to` inclusive (the same grid as the engine's parameterGrid). */
export function expandValues(s: Pick<EscapeSettings, 'values' | 'from' | 'to' | 'count'>): number[] {
  if (s.values) return [...s.values];
  const { from, to, count } = s as { from: number; to: number; count: number };
  if (count === 1) return [from];
  return Array.from({ length: count }, (_, i) => from + ((to - from) * i) / (count - 1));
}
