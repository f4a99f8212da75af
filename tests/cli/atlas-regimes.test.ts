import { describe, expect, it } from 'vitest';
import { runCli, scratchFiles } from './run-cli';
import { cubicNetwork, symmetricPairValues } from '../lib/regimes/fixtures';

const run = runCli;
const { file } = scratchFiles('atlas-regimes-');

const R = 0.1;
const pair = cubicNetwork({ r: R, nodes: ['left', 'right'], links: [{ from: 'left', to: 'right', twoWay: true }] });

describe('atlas CLI coupling regimes', () => {
  it('trace output carries regimes and escapeGraphs in the documented shape', { timeout: 120_000 }, async () => {
    const r = await run(['trace', file('pair.json', pair)]);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.regimes.map((b: { regime: string }) => b.regime)).toEqual(['weak', 'intermediate', 'strong']);
    // beta_sn = 1/3 - (r/2)^(2/3), derived in tests/lib/regimes/fixtures.ts.
    expect(Math.abs(out.regimes[0].to - symmetricPairValues(R).betaSaddleNode)).toBeLessThan(1e-8);
    for (const b of out.regimes) {
      expect(Object.keys(b).sort()).toEqual(['bounds', 'exits', 'exitsAt', 'from', 'reason', 'regime', 'to']);
      for (const e of b.exits) expect(Object.keys(e).sort()).toEqual(['destination', 'engaged', 'kind', 'saddle', 'tipping']);
    }
    expect(out.escapeGraphs).toHaveLength(3);
    for (const g of out.escapeGraphs) {
      expect(typeof g.p).toBe('number');
      for (const e of g.saddles) {
        expect(e.x).toHaveLength(2);
        expect(e.pattern).toHaveLength(2);
        expect(g.states[e.from]).toBeDefined();
        expect(g.states[e.to]).toBeDefined();
      }
    }
  });

  it('regimes prints one table row per band and exits 0', { timeout: 120_000 }, async () => {
    const r = await run(['regimes', file('pair2.json', pair)]);
    expect(r.code).toBe(0);
    const lines = r.stdout.trim().split('\n');
    expect(lines[0]).toMatch(/^from\s+to\s+regime\s+start\s+edges\s+bounds\s+reason$/);
    const rows = lines.slice(1).map((l) => l.split(/\s{2,}/));
    expect(rows.map((r) => r[2])).toEqual(['weak', 'intermediate', 'strong']);
    // Edges of the pair: the saddle-node and the pitchfork (special points) between the sweep ends.
    expect(rows.map((r) => r[4])).toEqual(['sweep bound | special point', 'special point | special point', 'special point | sweep bound']);
  });

  it('regimes says "regimes undefined" for an element that is not bistable', { timeout: 120_000 }, async () => {
    const r = await run(['regimes', file('linear.json', { ...pair, element: { variable: 'x', rate: 'r - x', parameters: { r: 0 } } })]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain('no regime bands');
    expect(r.stdout).toContain('regimes-undefined');
  });

  it('regimes exits 2 naming the field for a missing file argument', async () => {
    const r = await run(['regimes']);
    expect(r.code).toBe(2);
    expect(r.stderr.trim()).toMatch(/^MODEL\.json: /);
  });
});
