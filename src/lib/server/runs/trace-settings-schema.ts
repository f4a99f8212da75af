/** The trace run's settings schema, on its own so that runs/schemas.ts and escapes/schema.ts can both use it. */
import { z } from 'zod';
import { startSelectionSettingsSchema } from '../../atlas/trace-settings.ts';

const finite = z.number().finite('must be a finite number');

/**
 * Settings a person may give a trace run, a subset of the engine's TraceSettings under the same
 * names (src/lib/atlas/trace-settings.ts). Everything is optional: the model document's sweep range
 * and the engine's defaults apply otherwise. The settings are part of the result's identity, so
 * they are kept small and explicit (no free-form keys).
 */
export const runSettingsObject = z.object({
  from: finite.optional(),
  to: finite.optional(),
  /** Cap on points per branch (engine default 20000). */
  maxPointsPerBranch: z.number().int().min(10, 'at least 10').max(100000, 'at most 100000').optional(),
  /** Pseudo-arclength steps as fractions of the sweep width (engine defaults 2e-3, 1e-9, 2e-2). */
  initialStep: z.number().positive('must be positive').max(0.5, 'at most 0.5').optional(),
  minStep: z.number().positive('must be positive').max(0.1, 'at most 0.1').optional(),
  maxStep: z.number().positive('must be positive').max(0.5, 'at most 0.5').optional(),
  /** Largest parameter change per step, fraction of the sweep width (engine default 1/600). */
  maxParameterStep: z.number().positive('must be positive').max(0.5, 'at most 0.5').optional(),
  /** Cap on traced branches (engine default 400; a whole 8-node trace needs about 3,300). */
  maxBranches: z.number().int('must be a whole number').min(1, 'at least 1').max(100_000, 'at most 100000').optional(),
  /** Which starting patterns (docs/numerics.md §12): the engine's own names and limits. */
  ...startSelectionSettingsSchema.shape,
});

/** The checks across fields, shared by runSettingsSchema and the trace run's schema with its override (./schemas.ts). */
export function refineRunSettings(s: { from?: number; to?: number; minStep?: number; maxStep?: number }, ctx: z.RefinementCtx): void {
  if (s.from !== undefined && s.to !== undefined && s.from === s.to) {
    ctx.addIssue({ code: 'custom', path: ['to'], message: 'must differ from settings.from' });
  }
  if (s.minStep !== undefined && s.maxStep !== undefined && s.minStep > s.maxStep) {
    ctx.addIssue({ code: 'custom', path: ['minStep'], message: 'must not exceed settings.maxStep' });
  }
}

export const runSettingsSchema = runSettingsObject.strict().superRefine(refineRunSettings);

