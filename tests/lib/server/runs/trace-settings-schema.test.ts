import { describe, expect, it } from 'vitest';
import { runSettingsSchema } from '../../../../src/lib/server/runs/trace-settings-schema';
import { normalizeSettings } from '../../../../src/lib/server/runs/normalize-settings';
import { defaultTraceSettings } from '../../../../src/lib/atlas/trace-settings';

/** A trace run's settings: the start selection of docs/numerics.md §12 and the branch cap, with the engine's names and limits. */
describe('runSettingsSchema', () => {
  it('accepts the start selection and the branch cap a 20-node network needs', () => {
    const r = runSettingsSchema.safeParse({ startSelection: 'restricted', startBudget: 2000, maxBranches: 5000, growthIntegrations: 100, growthValues: 4 });
    expect(r.success).toBe(true);
  });
  it('refuses values outside the engine limits, naming the field', () => {
    for (const [settings, field] of [
      [{ startBudget: 1 }, 'startBudget'],
      [{ startSelection: 'all' }, 'startSelection'],
      [{ maxBranches: 0 }, 'maxBranches'],
      [{ maxBranches: 2.5 }, 'maxBranches'],
      [{ growthValues: 5000 }, 'growthValues'],
    ] as const) {
      const r = runSettingsSchema.safeParse(settings);
      expect(r.success, JSON.stringify(settings)).toBe(false);
      expect(r.error!.issues[0].path).toEqual([field]);
    }
  });
  it('normalizeSettings drops the engine defaults, so typed-in defaults share a cache key with none', () => {
    const doc = { sweep: { from: 0, to: 1 } };
    expect(normalizeSettings(doc, { startSelection: defaultTraceSettings.startSelection, startBudget: defaultTraceSettings.startBudget, maxBranches: defaultTraceSettings.maxBranches })).toEqual({});
    expect(normalizeSettings(doc, { startSelection: 'restricted', maxBranches: 5000 })).toEqual({ startSelection: 'restricted', maxBranches: 5000 });
  });
});
