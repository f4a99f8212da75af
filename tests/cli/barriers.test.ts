import { describe, expect, it } from 'vitest';
import { runCli, scratchFiles } from './run-cli';
import { cubicNetwork, cubicRoots } from '../lib/regimes/fixtures';

const { file } = scratchFiles('atlas-barriers-');

/** Element barrier T(r) = 2 (V(m) - V(a)), V = -r x - x^2/2 + x^4/4 (derived in tests/lib/noise/exit-switches.test.ts). */
const T = (r: number) => {
  const { a, m } = cubicRoots(r);
  const V = (x: number) => -r * x - (x * x) / 2 + x ** 4 / 4;
  return 2 * (V(m) - V(a));
};
// Uncoupled elements swept over r, node b fixed at r = 0.1: exit switches of all-base and all-tipped at r = 0.1.
const uncoupled = cubicNetwork({ r: 0.1, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay: true }],
  sweep: { parameter: 'r', from: 0, to: 0.2 }, nodeR: { b: 0.1 }, couplingValue: 0 });

describe('atlas barriers', () => {
  it('prints parameter, states, edges, exitSwitches and diagnostics with closed-form barriers', { timeout: 120_000 }, async () => {
    const r = await runCli(['barriers', file('uncoupled.json', uncoupled)]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(Object.keys(out).sort()).toEqual(['diagnostics', 'edges', 'exitSwitches', 'parameter', 'states', 'weights']);
    expect(out.parameter).toBe('r');
    // No special point inside [0, 0.2]: one representative parameter, the midpoint 0.1.
    expect(out.states.map((s: { state: string }) => s.state).sort()).toEqual(['a tipped', 'all-base', 'all-tipped', 'b tipped']);
    expect(out.edges).toHaveLength(8);
    const e = out.edges.find((x: { from: string; saddle: string }) => x.from === 'all-base' && x.saddle === 'all-base -> a tipped');
    expect(e.p).toBeCloseTo(0.1, 12);
    expect(e.to).toBe('a tipped');
    expect(e.method).toBe('potential');
    expect(e.barrier).toBeCloseTo(T(0.1), 10);
    expect(e.path[0]).toHaveLength(2);
    expect(out.exitSwitches.map((s: { state: string }) => s.state).sort()).toEqual(['all-base', 'all-tipped']);
    for (const s of out.exitSwitches) {
      expect(Object.keys(s).sort()).toEqual(['barrier', 'p', 'saddles', 'state']);
      expect(Math.abs(s.p - 0.1)).toBeLessThanOrEqual(1e-8);
    }
  });

  it('uses the document noise weights: a barrier in units of the amplitude squared', { timeout: 120_000 }, async () => {
    // sigma_b = 2 x amplitude: barriers of exits that move b only are divided by 4 (docs/noise.md).
    const r = await runCli(['barriers', file('weighted.json', { ...uncoupled, noise: { amplitude: 0.1, perNode: { b: 0.2 } } }), '--from', '0.05', '--to', '0.15']);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.weights).toEqual([1, 2]);
    const e = out.edges.find((x: { from: string; saddle: string }) => x.from === 'all-base' && x.saddle === 'all-base -> b tipped');
    expect(e.barrier).toBeCloseTo(T(0.1) / 4, 10);
  });

  it('--help defines states, from and saddle and exits 0', { timeout: 120_000 }, async () => {
    const r = await runCli(['barriers', '--help']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/^Usage: npm run --silent atlas -- barriers MODEL\.json/);
    for (const word of ['"states"', '"from"', '"saddle"', '"exitSwitches"']) expect(r.stdout).toContain(word);
  });

  it('exits 2 with one line naming the field for bad input', { timeout: 120_000 }, async () => {
    const [bad, missing, same] = await Promise.all([
      runCli(['barriers', file('u2.json', uncoupled), '--from', 'x']),
      runCli(['barriers']),
      runCli(['barriers', file('u3.json', uncoupled), '--from', '0.1', '--to', '0.1']),
    ]);
    expect(bad.code).toBe(2);
    expect(bad.stderr.trim()).toBe("--from: expected a finite number, got 'x'");
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(/^MODEL\.json: /);
    expect(same.code).toBe(2);
    expect(same.stderr).toMatch(/^--to: /);
  });
});
