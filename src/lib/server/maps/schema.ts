/**
 * Settings of a two-parameter map run (run kind 'map', docs/maps.md "Maps in the workspace"). Pure
 * zod with no server imports, so the browser's form validates with this very schema. The knobs are
 * the engine's MapSettings (src/lib/maps/trace-map.ts) that a modeler has a reason to touch; the
 * step-control knobs keep the engine's defaults.
 */
import { z } from 'zod';

const finite = z.number({ invalid_type_error: 'must be a number' }).finite('must be a finite number');
const whole = (min: number, max: number) => z.number({ invalid_type_error: 'must be a number' }).int('must be a whole number').min(min, `at least ${min}`).max(max, `at most ${max}`);

/** Bounds of the service (the engine accepts more; these keep one run within minutes on a small network). */
export const MAP_LIMITS = Object.freeze({
  seeds: { min: 1, max: 25 },
  regionColumns: { min: 0, max: 40 },
  regionRows: { min: 0, max: 20 },
  maxPointsPerCurve: { min: 20, max: 20_000 },
  maxCurves: { min: 1, max: 128 },
});

/** The engine's defaults for these knobs (defaultMapSettings, src/lib/maps/trace-map.ts). */
export const MAP_DEFAULTS = Object.freeze({ seeds: 5, regionColumns: 9, regionRows: 5, maxPointsPerCurve: 4000, maxCurves: 64 });

export const mapSettingsSchema = z.object({
  /** The second model parameter (the coupling parameter or an element parameter; any parameter of an ode document). */
  second: z.string({ required_error: 'required: the name of the second parameter', invalid_type_error: 'must be a parameter name' })
    .min(1, 'required: the name of the second parameter').max(200, 'at most 200 characters'),
  /** Range of the second parameter. */
  secondFrom: finite,
  secondTo: finite,
  /** Range of the swept parameter; default the document's sweep. */
  from: finite.optional(),
  to: finite.optional(),
  /** One-parameter diagrams at this many evenly spaced values of the second parameter seed the curves. */
  seeds: whole(MAP_LIMITS.seeds.min, MAP_LIMITS.seeds.max).default(MAP_DEFAULTS.seeds),
  /** Regime sampling grid (columns in the swept parameter x rows in the second); 0 and 0 skip the regions. */
  regionColumns: whole(MAP_LIMITS.regionColumns.min, MAP_LIMITS.regionColumns.max).default(MAP_DEFAULTS.regionColumns),
  regionRows: whole(MAP_LIMITS.regionRows.min, MAP_LIMITS.regionRows.max).default(MAP_DEFAULTS.regionRows),
  /** Point cap per curve (both directions together). */
  maxPointsPerCurve: whole(MAP_LIMITS.maxPointsPerCurve.min, MAP_LIMITS.maxPointsPerCurve.max).default(MAP_DEFAULTS.maxPointsPerCurve),
  /** Cap on the number of curves. */
  maxCurves: whole(MAP_LIMITS.maxCurves.min, MAP_LIMITS.maxCurves.max).default(MAP_DEFAULTS.maxCurves),
}).strict().superRefine((s, ctx) => {
  if (s.secondFrom === s.secondTo) ctx.addIssue({ code: 'custom', path: ['secondTo'], message: `must differ from secondFrom (both are ${s.secondFrom})` });
  if ((s.from === undefined) !== (s.to === undefined)) ctx.addIssue({ code: 'custom', path: [s.from === undefined ? 'from' : 'to'], message: 'give from and to together (or neither: the document\'s sweep)' });
  else if (s.from !== undefined && s.from === s.to) ctx.addIssue({ code: 'custom', path: ['to'], message: `must differ from from (both are ${s.from})` });
  if ((s.regionColumns === 0) !== (s.regionRows === 0)) ctx.addIssue({ code: 'custom', path: [s.regionColumns === 0 ? 'regionRows' : 'regionColumns'], message: 'regionColumns and regionRows are 0 together (no regions) or both at least 1' });
});

export type MapSettingsInput = z.input<typeof mapSettingsSchema>;
export type MapRunSettings = z.output<typeof mapSettingsSchema>;

/** Stored and hashed settings: defaults and the document's own sweep left out, so equal requests share a key. */
export interface StoredMapSettings {
  readonly second: string;
  readonly secondFrom: number;
  readonly secondTo: number;
  readonly from?: number;
  readonly to?: number;
  readonly seeds?: number;
  readonly regionColumns?: number;
  readonly regionRows?: number;
  readonly maxPointsPerCurve?: number;
  readonly maxCurves?: number;
}

/** POST /api/runs/:id/slices: the value of the map's second parameter to cut at (src/lib/server/maps/slices.ts). */
export const startSliceSchema = z.object({
  value: z.number({ required_error: 'required: the value of the second parameter', invalid_type_error: 'must be a number' }).finite('must be a finite number'),
}).strict();
