import { describe, expect, it } from 'vitest';
import { overrideNote, overrideShort, runOverride } from '../../../src/lib/plot/run-override';
import { provenanceLine } from '../../../src/lib/plot/provenance';
import { provenanceBlock } from '../../../src/lib/plot/data-export';

describe('overrideNote(run)', () => {
  it('names the parameter, its full value and the map run of a slice', () => {
    expect(overrideNote({ settings: { override: { parameter: 'r', value: 0.123456789 } }, sliceOf: 12 })).toBe('r = 0.123456789 overridden (slice of map run 12)');
    expect(overrideNote({ settings: { override: { parameter: 'r', value: 0.2 } } })).toBe('r = 0.2 overridden (not the model version\u2019s value)');
  });
  it('is null for a run without an override or with a malformed one', () => {
    expect(overrideNote({ settings: {} })).toBeNull();
    expect(overrideNote({ settings: null })).toBeNull();
    expect(runOverride({ override: { parameter: 'r', value: '0.2' } })).toBeNull();
    expect(overrideShort({ settings: { override: { parameter: 'r', value: 0.123456789 } } })).toBe('r = 0.1235 (override)');
  });
});

describe('provenanceLine and provenanceBlock with an override', () => {
  const p = { modelName: 'M', versionHash: 'abcdef0123456789', runId: '7', engineVersion: '1', date: '2026-12-05T00:00:00Z' };
  it('print the override after the version, and nothing when there is none', () => {
    expect(provenanceLine({ ...p, override: 'r = 0.2 overridden (slice of map run 3)' })).toBe('Model M · version abcdef012345 with r = 0.2 overridden (slice of map run 3) · run 7 · engine 1 · 2026-12-05T00:00:00Z');
    expect(provenanceLine(p)).toBe('Model M · version abcdef012345 · run 7 · engine 1 · 2026-12-05T00:00:00Z');
    expect(provenanceBlock({ ...p, override: 'r = 0.2 overridden (slice of map run 3)' })).toContain("# parameter overridden for this run (not the version's value): r = 0.2 overridden (slice of map run 3)\n");
    expect(provenanceBlock(p)).not.toContain('overridden');
  });
});
