import { z } from 'zod';
import { escapeSettingsSchema } from '../escapes/schema.ts';
import { mapSettingsSchema } from '../maps/schema.ts';
import { refineRunSettings, runSettingsObject, runSettingsSchema } from './trace-settings-schema.ts';

export { runSettingsSchema };

/**
 * One model parameter set to another value for this trace only, without a new model version (a slice
 * of a two-parameter map at a clicked value, docs/maps.md "From the map back to one parameter"). The
 * name is checked against the version's document when the run starts (a parameter the map could vary:
 * the coupling parameter or an element parameter that not every node overrides, any parameter of an
 * ode document; never the swept one): 400 naming settings.override.parameter. Any finite value; the
 * slices route further keeps it inside the map's range (field `value`). Part of the settings, so part
 * of the cache key: the same value again reuses the stored result.
 */
export const parameterOverrideSchema = z.object({
  parameter: z.string({ required_error: 'required: the name of the parameter', invalid_type_error: 'must be a parameter name' })
    .min(1, 'required: the name of the parameter').max(200, 'at most 200 characters'),
  value: z.number({ required_error: 'required: the value', invalid_type_error: 'must be a number' }).finite('must be a finite number'),
}).strict();

export type ParameterOverride = z.infer<typeof parameterOverrideSchema>;

/** Most threads one trace run may ask for; the worker uses at most its machine's cores. */
export const MAX_TRACE_THREADS = 64;

/**
 * A trace run's settings: the engine's knobs (./trace-settings-schema.ts), the optional override,
 * and the threads to trace on (docs/numerics.md §11: the diagram is the same for any count, so
 * threads is kept with the run but is not part of the result's identity).
 */
export const traceRunSettingsSchema = runSettingsObject.extend({
  override: parameterOverrideSchema.optional(),
  threads: z.number().int('must be a whole number').min(1, 'at least 1').max(MAX_TRACE_THREADS, `at most ${MAX_TRACE_THREADS}`).optional(),
}).strict().superRefine(refineRunSettings);

export type RunSettings = z.infer<typeof traceRunSettingsSchema>;

const startTraceRunSchema = z.object({
  modelId: z.number().int().positive(),
  /** Version number within the model; the latest when absent. */
  version: z.number().int().positive().optional(),
  kind: z.literal('trace'),
  settings: traceRunSettingsSchema.default({}),
  /** Send the person who started the run an e-mail when it finishes or fails. */
  notify: z.boolean().default(false),
}).strict();

/** An escape study (docs/noise.md, "Escape studies as runs"); settings in ../escapes/schema.ts. */
const startEscapeRunSchema = z.object({
  modelId: z.number().int().positive(),
  version: z.number().int().positive().optional(),
  kind: z.literal('escapes'),
  settings: escapeSettingsSchema,
  notify: z.boolean().default(false),
}).strict();

/** A two-parameter map (docs/maps.md, "Maps in the workspace"); settings in ../maps/schema.ts. */
const startMapRunSchema = z.object({
  modelId: z.number().int().positive(),
  version: z.number().int().positive().optional(),
  kind: z.literal('map'),
  settings: mapSettingsSchema,
  notify: z.boolean().default(false),
}).strict();

export const RUN_KINDS = ['trace', 'escapes', 'map'] as const;
export type RunKind = (typeof RUN_KINDS)[number];

/** POST /api/runs: `kind` 'trace' (the default when absent), 'escapes' or 'map', each with its own settings. */
export const startRunSchema = z.preprocess(
  (v) => (v && typeof v === 'object' && !Array.isArray(v) && !('kind' in v) ? { ...v, kind: 'trace' } : v),
  z.discriminatedUnion('kind', [startTraceRunSchema, startEscapeRunSchema, startMapRunSchema], {
    errorMap: (issue, ctx) => (issue.code === 'invalid_union_discriminator' ? { message: "must be 'trace', 'escapes' or 'map'" } : { message: ctx.defaultError }),
  }),
);

export type StartRunRequest = z.infer<typeof startRunSchema>;

export const RUN_STATUSES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;
export type RunStatus = (typeof RUN_STATUSES)[number];
export const TERMINAL_STATUSES: readonly RunStatus[] = ['done', 'failed', 'cancelled'];

export const listRunsQuerySchema = z.object({
  modelId: z.coerce.number().int().positive().optional(),
  status: z.enum(RUN_STATUSES).optional(),
  kind: z.enum(RUN_KINDS).optional(),
  page: z.coerce.number().int().min(1).max(100000).default(1),
  pageSize: z.coerce.number().int().min(1).max(100).default(20),
}).strict();

export type ListRunsQuery = z.infer<typeof listRunsQuerySchema>;
