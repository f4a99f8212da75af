import { z } from 'zod';
import { BAND_TAG_NAME_MAX } from '../../regimes/band-tag.ts';

const finite = z.number().finite('must be a finite number');

/** A band tag exactly as the regimes code defines it (BandTag), stored beside the automatic labels. */
export { bandTagSchema } from '../../regimes/band-tag.ts';

export const bandTagPatchSchema = z.object({
  from: finite.optional(),
  to: finite.optional(),
  name: z.string().trim().min(1, 'must not be empty').max(BAND_TAG_NAME_MAX, `at most ${BAND_TAG_NAME_MAX} characters`).optional(),
  colour: z.string().regex(/^#[0-9a-fA-F]{6}$/, 'must be a colour like #3a7d44').optional(),
  note: z.string().max(2000, 'at most 2000 characters').optional(),
}).strict();

export const commentTargetSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('run') }).strict(),
  /** Index of the band in the result's regimes list. */
  z.object({ kind: z.literal('band'), ref: z.string().min(1).max(64) }).strict(),
  /** Id of the special point in the diagram. */
  z.object({ kind: z.literal('special-point'), ref: z.string().min(1).max(64) }).strict(),
]);

export const commentSchema = z.object({
  target: commentTargetSchema.default({ kind: 'run' }),
  body: z.string().trim().min(1, 'must not be empty').max(5000, 'at most 5000 characters'),
}).strict();

export const commentPatchSchema = z.object({
  body: z.string().trim().min(1, 'must not be empty').max(5000, 'at most 5000 characters').optional(),
  resolved: z.boolean().optional(),
}).strict();

export const listCommentsQuerySchema = z.object({
  runId: z.coerce.number().int().positive().optional(),
  modelId: z.coerce.number().int().positive().optional(),
  open: z.enum(['1', '0', 'true', 'false']).optional(),
}).strict();
