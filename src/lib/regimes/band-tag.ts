import { z } from 'zod';
import type { BandTag } from './types';

/** Longest tag name and note accepted (characters). */
export const BAND_TAG_NAME_MAX = 80;
export const BAND_TAG_NOTE_MAX = 2000;

/**
 * A modeler's tag on a band or any parameter range: own name, colour #rrggbb, note. Stored beside the
 * automatic labels, never replacing them. from < to, both finite.
 */
export const bandTagSchema = z.object({
  from: z.number({ invalid_type_error: 'must be a number' }).finite('must be finite'),
  to: z.number({ invalid_type_error: 'must be a number' }).finite('must be finite'),
  name: z.string({ invalid_type_error: 'must be text' }).trim()
    .min(1, 'must not be empty').max(BAND_TAG_NAME_MAX, `must be at most ${BAND_TAG_NAME_MAX} characters`),
  colour: z.string({ invalid_type_error: 'must be text' })
    .regex(/^#[0-9a-fA-F]{6}$/, 'must be a colour written #rrggbb'),
  note: z.string({ invalid_type_error: 'must be text' })
    .max(BAND_TAG_NOTE_MAX, `must be at most ${BAND_TAG_NOTE_MAX} characters`).default(''),
}).strict().refine((t) => t.from < t.to, { message: 'must be greater than from', path: ['to'] });

export type BandTagResult = { ok: true; tag: BandTag } | { ok: false; errors: { path: string; message: string }[] };

/** Validates a band tag; every error names its field ("to: must be greater than from"). */
export function validateBandTag(input: unknown): BandTagResult {
  const r = bandTagSchema.safeParse(input);
  if (r.success) return { ok: true, tag: { ...r.data, colour: r.data.colour.toLowerCase() } };
  return {
    ok: false,
    errors: r.error.issues.map((i) => ({ path: i.path.join('.') || '(tag)', message: i.message })),
  };
}

/** True when the tag's range overlaps [from, to] (for showing tags beside a band). */
export function tagOverlaps(tag: BandTag, from: number, to: number): boolean {
  return tag.from < to && tag.to > from;
}
