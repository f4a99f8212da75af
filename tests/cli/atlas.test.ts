import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, scratchFiles } from './run-cli';

const run = runCli;
const { dir, file } = scratchFiles('atlas-cli-');

const lakes = {
  format: 'brinkmap/network-1',
  name: 'Two lakes, downstream flow (invented)',
  element: { variable: 'P', rate: 'a - b * P + P^8 / (1 + P^8)', parameters: { a: 0.05, b: 0.6 } },
  nodes: [{ id: 'upper' }, { id: 'lower' }],
  links: [{ from: 'upper', to: 'lower', weight: 1 }],
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 1 },
};

describe('atlas CLI', () => {
  it('trace prints the diagram JSON in the documented shape and exits 0', { timeout: 120_000 }, async () => {
    const r = await run(['trace', file('lakes.json', lakes)]);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(Object.keys(out).sort()).toEqual(['bifurcations', 'branches', 'crossovers', 'diagnostics', 'escapeGraphs', 'parameter', 'regimes']);
    expect(out.parameter).toBe('beta');
    expect(out.branches.length).toBeGreaterThan(0);
    for (const b of out.branches) {
      expect(b.id).toMatch(/^b\d+$/);
      for (const q of b.points) {
        expect(Object.keys(q).sort()).toEqual(['p', 'unstable', 'x']);
        expect(q.x).toHaveLength(2);
        expect(Number.isInteger(q.unstable)).toBe(true);
      }
    }
    expect(out.bifurcations.length).toBeGreaterThan(0);
    for (const s of out.bifurcations) {
      expect(['saddle-node', 'pitchfork', 'transcritical', 'hopf', 'degenerate']).toContain(s.type);
      expect(s.branches.every((id: string) => out.branches.some((b: { id: string }) => b.id === id))).toBe(true);
    }
    expect(Array.isArray(out.diagnostics)).toBe(true);
  });

  it('trace --from/--to narrows the sweep and --out writes the file instead of stdout', { timeout: 120_000 }, async () => {
    const outPath = join(dir, 'out.json');
    const r = await run(['trace', file('lakes2.json', lakes), '--from', '0', '--to', '0.2', '--out', outPath]);
    expect(r.code).toBe(0);
    expect(r.stdout).toBe('');
    const out = JSON.parse(readFileSync(outPath, 'utf8'));
    const ps = out.branches.flatMap((b: { points: { p: number }[] }) => b.points.map((q) => q.p));
    expect(Math.min(...ps)).toBe(0);
    expect(Math.max(...ps)).toBe(0.2);
  });

  it('exits 2 with one stderr line naming the field for invalid input', async () => {
    const cases: [string[], RegExp][] = [
      [['trace', join(dir, 'missing.json')], /MODEL\.json/],
      [['trace', file('broken.json', '{ not json')], /not valid JSON/],
      [['trace', file('badrate.json', { ...lakes, element: { ...lakes.element, rate: 'P +* 2' } })], /element\.rate/],
      [['trace', file('lakes3.json', lakes), '--from', 'abc'], /--from/],
      [['trace', file('lakes4.json', lakes), '--from', '1', '--to', '1'], /--to/],
      [['trace', file('big.json', { ...lakes, nodes: Array.from({ length: 65 }, (_, i) => ({ id: `n${i}` })), links: [] })], /64/],
      [['trace', '--bogus'], /bogus/],
      [['nonsense'], /command/],
    ];
    const results = await Promise.all(cases.map(([args]) => run(args)));
    for (const [k, [args, pattern]] of cases.entries()) {
      const r = results[k];
      expect(r.code, args.join(' ')).toBe(2);
      expect(r.stdout, args.join(' ')).toBe('');
      expect(r.stderr.trim().split('\n'), args.join(' ')).toHaveLength(1);
      expect(r.stderr, args.join(' ')).toMatch(pattern);
    }
  }, 120_000);

  it('--help explains the trace command and its output', { timeout: 120_000 }, async () => {
    const [r, top] = await Promise.all([run(['trace', '--help']), run(['--help'])]);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/Usage: npm run --silent atlas -- trace MODEL\.json/);
    expect(r.stdout).toMatch(/--from/);
    expect(r.stdout).toMatch(/bifurcations/);
    expect(top.code).toBe(0);
    expect(top.stdout).toMatch(/trace/);
  });
});
