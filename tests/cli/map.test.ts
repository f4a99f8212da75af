import { describe, expect, it } from 'vitest';
import { runCli, scratchFiles } from './run-cli';
import { cubicNetwork, symmetricPairValues } from '../lib/regimes/fixtures';

const { file } = scratchFiles('brinkmap-map-');
const pair = file('pair.json', cubicNetwork({ r: 0.1, nodes: ['x1', 'x2'], links: [{ from: 'x1', to: 'x2', twoWay: true }] }));
const cusp = file('cusp.json', {
  format: 'brinkmap/ode-1', name: 'cusp normal form', variables: ['x'], rates: { x: 'a + b * x - x^3' },
  parameters: { a: 0, b: 1 }, sweep: { parameter: 'a', from: -1, to: 1 },
});

describe('atlas map MODEL.json --second NAME --from A --to B', () => {
  it('prints the map of the symmetric pair as JSON (closed forms from tests/lib/regimes/fixtures.ts)', async () => {
    const { code, stdout, stderr } = await runCli(['map', pair, '--second', 'r', '--from', '0.05', '--to', '0.25', '--columns', '5', '--rows', '3']);
    expect(stderr).toBe('');
    expect(code).toBe(0);
    const out = JSON.parse(stdout);
    expect(out.parameters).toEqual(['beta', 'r']);
    expect(out.ranges).toEqual({ first: [0, 1], second: [0.05, 0.25] });
    expect(out.curves.map((c: { type: string }) => c.type).sort()).toEqual(['pitchfork', 'saddle-node', 'saddle-node']);
    for (const c of out.curves) {
      for (const q of c.points) {
        const v = symmetricPairValues(q.p[1]);
        expect(Math.abs(q.p[0] - (c.type === 'saddle-node' ? v.betaSaddleNode : v.betaPitchfork))).toBeLessThan(1e-8);
        expect(q.x).toHaveLength(2);
      }
    }
    expect(out.points).toEqual([]);
    expect(out.regions.length).toBeGreaterThan(1);
    expect(out.regions.flatMap((g: { samples: unknown[] }) => g.samples)).toHaveLength(15);
    expect(Array.isArray(out.diagnostics)).toBe(true);
  });

  it('reports the cusp of the normal form x\' = a + b x - x^3 at the origin (Kuznetsov §8.2)', async () => {
    const { code, stdout } = await runCli(['map', cusp, '--second', 'b', '--from=-0.5', '--to', '1', '--columns', '0', '--rows', '0']);
    expect(code).toBe(0);
    const out = JSON.parse(stdout);
    expect(out.points).toHaveLength(1);
    expect(out.points[0].type).toBe('cusp');
    for (const v of out.points[0].p) expect(Math.abs(v)).toBeLessThan(1e-9);
    expect(out.regions).toEqual([]);
  });

  it('--help prints the usage and exits 0', async () => {
    const { code, stdout } = await runCli(['map', '--help']);
    expect(code).toBe(0);
    expect(stdout).toContain('Usage: npm run --silent atlas -- map MODEL.json --second NAME --from A --to B');
    expect(stdout).toContain('"curves"');
  });

  it('exits 2 with one line naming the field for bad input', async () => {
    const cases: [string[], RegExp][] = [
      [['map', pair, '--from', '0', '--to', '1'], /^--second: /],
      [['map', pair, '--second', 'zz', '--from', '0', '--to', '1'], /^--second: unknown parameter 'zz'/],
      [['map', pair, '--second', 'beta', '--from', '0', '--to', '1'], /^--second: .*swept/],
      [['map', pair, '--second', 'r', '--to', '1'], /^--from: /],
      [['map', pair, '--second', 'r', '--from', '0.1', '--to', '0.1'], /^--to: /],
      [['map', pair, '--second', 'r', '--from', '0', '--to', '1', '--seeds', '0'], /^--seeds: /],
    ];
    const results = await Promise.all(cases.map(([args]) => runCli(args)));
    for (const [k, [args, pattern]] of cases.entries()) {
      const { code, stdout, stderr } = results[k];
      expect(code, args.join(' ')).toBe(2);
      expect(stdout).toBe('');
      expect(stderr.trim().split('\n')).toHaveLength(1);
      expect(stderr).toMatch(pattern);
    }
  }, 120_000);
});
