import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { computeReference, decode, type CurveCase } from './continuation-reference';

/**
 * Byte identity of the continuation (issue 14 item 3: "keep today's one-parameter results identical").
 * The reference (tests/fixtures/continuation-reference.json) was written by
 * scripts/make-continuation-reference.ts from the code before the one-parameter driver and the maps'
 * curve driver were merged into numerics/continue-curve.ts; every float is compared by its bit
 * pattern (or through a SHA-256 digest of the exact encoding, see continuation-reference.ts).
 * An independent computation in the sense of the house rules: the old code, run and stored.
 * The `diagrams` and `maps` parts also run src/lib/atlas/trace-diagram.ts around the driver: if only
 * they differ while `branches` agrees, the change is in the trace, not in the driver.
 */
const stored = JSON.parse(readFileSync(new URL('../../fixtures/continuation-reference.json', import.meta.url), 'utf8')) as Record<string, unknown>;
const curveCases = decode(stored.curveCases) as Record<string, CurveCase>;

describe('continuation results are exactly those recorded before the drivers were merged', () => {
  it('continueBranch: every point (y, t, det, unstable count, eigenvalues, Hopf test), end, counts, hooks and caps', () => {
    const now = computeReference(curveCases, ['branches']);
    for (const [name, value] of Object.entries(stored.branches as Record<string, unknown>)) {
      expect((now.branches as Record<string, unknown>)[name], name).toEqual(value);
    }
  });

  it('traceDiagram with default settings on five small models (per-branch digests)', () => {
    const now = computeReference(curveCases, ['diagrams']);
    expect(now.diagrams).toEqual(stored.diagrams);
  });

  it("the maps' saddle-node, pitchfork and Hopf curves from fixed seeds: every point", () => {
    const now = computeReference(curveCases, ['curves']);
    expect(now.curves).toEqual(stored.curves);
  });

  it('traceMap of the symmetric pair and the 3-lake chain (per-curve digests)', () => {
    const now = computeReference(curveCases, ['maps']);
    expect(now.maps).toEqual(stored.maps);
  }, 60_000);
});
