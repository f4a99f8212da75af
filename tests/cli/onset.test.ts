import { describe, expect, it } from 'vitest';
import { runCli, scratchFiles } from './run-cli';
import { cubicNetwork, cubicRoots } from '../lib/regimes/fixtures';

const { file } = scratchFiles('brinkmap-onset-');
const r = 0.1;
const pair = file('pair.json', cubicNetwork({ r, nodes: ['up', 'down'], links: [{ from: 'up', to: 'down' }] }));

describe('atlas onset MODEL.json', () => {
  it('prints the critical coupling per node as JSON (closed form 1 - 3u^2/4 of the one-way pair, derived in tests/lib/onset/critical-coupling.test.ts)', async () => {
    const { code, stdout, stderr } = await runCli(['onset', pair]);
    expect(stderr).toBe('');
    expect(code).toBe(0);
    const out = JSON.parse(stdout);
    const { a, c } = cubicRoots(r);
    expect(out.parameter).toBe('beta');
    expect(out.nodes.map((q: { id: string }) => q.id)).toEqual(['up', 'down']);
    expect(out.nodes[0].critical).toBeCloseTo(1 - (3 * c * c) / 4, 9);
    expect(out.nodes[0].next).toEqual(['down']);
    expect(out.nodes[1].critical).toBeCloseTo(1 - (3 * a * a) / 4, 9);
    expect(out.nodes[1].next).toEqual([]);
    expect(out.diagnostics).toEqual([]);
  });

  it('--to before the first fold gives null critical couplings and "none in range" diagnostics', async () => {
    const { code, stdout } = await runCli(['onset', pair, '--to', '0.1']);
    expect(code).toBe(0);
    const out = JSON.parse(stdout);
    expect(out.nodes.map((q: { critical: number | null }) => q.critical)).toEqual([null, null]);
    expect(out.nodes.map((q: { status: string }) => q.status)).toEqual(['none-in-range', 'none-in-range']);
    expect(out.diagnostics.map((d: { code: string }) => d.code)).toEqual(['none-in-range', 'none-in-range']);
  });

  it('--help prints the usage and exits 0', async () => {
    const { code, stdout } = await runCli(['onset', '--help']);
    expect(code).toBe(0);
    expect(stdout).toContain('Usage: npm run --silent atlas -- onset MODEL.json');
    expect(stdout).toContain('"critical"');
  });

  it('exits 2 naming sweep.parameter when the document sweeps an element parameter', async () => {
    const model = file('r-sweep.json', cubicNetwork({ r, nodes: ['p', 'q'], links: [{ from: 'p', to: 'q' }], sweep: { parameter: 'r', from: 0, to: 0.3 }, couplingValue: 0.1 }));
    const { code, stderr, stdout } = await runCli(['onset', model]);
    expect(code).toBe(2);
    expect(stdout).toBe('');
    expect(stderr.trim().split('\n')).toHaveLength(1);
    expect(stderr).toMatch(/^sweep\.parameter: /);
  });

  it('exits 2 naming the field for a bad number, a missing file and an unknown option', async () => {
    const bad = await runCli(['onset', pair, '--from', 'abc']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/^--from: /);
    const missing = await runCli(['onset']);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/^MODEL\.json: /);
    const unknown = await runCli(['onset', pair, '--nodes', '1']);
    expect(unknown.code).toBe(2);
  });
});
