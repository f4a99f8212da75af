import { z } from 'zod';
import { escapeSettingsSchema } from '../escapes/schema.ts';
import { mapSettingsSchema } from '../maps/schema.ts';
import { runSettingsSchema } from './trace-settings-schema.ts';

export { runSettingsSchema };

export type RunSettings = z.infer<typeof runSettingsSchema>;

const startTraceRunSchema = z.object({
  modelId: z.number().int().positive(),
  /** Version number within the model; the latest when absent. */
  version: z.number().int().positive().optional(),
  kind: z.literal('trace'),
  settings: runSettingsSchema.default({}),
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
