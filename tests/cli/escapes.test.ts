import { describe, expect, it } from 'vitest';
import { runCli, scratchFiles } from './run-cli';
import { cubicNetwork } from '../lib/regimes/fixtures';

const { file } = scratchFiles('brinkmap-escapes-');
// Two identical cubic elements with symmetric diffusive coupling (invented toy model).
const pair = file('pair.json', { ...cubicNetwork({ r: 0.1, nodes: ['a', 'b'], links: [{ from: 'a', to: 'b', twoWay: true }], sweep: { parameter: 'beta', from: 0, to: 0.5 } }), noise: { amplitude: 0.5 } });

describe('atlas escapes', () => {
  it('prints the same JSON for 1 and 2 threads with the same seed (per-path streams, merged in index order)', async () => {
    const args = ['escapes', pair, '--at', '0.05', '--paths', '60', '--noise', '0.55', '--seed', '9'];
    const [one, two] = await Promise.all([runCli([...args, '--threads', '1']), runCli([...args, '--threads', '2'])]);
    expect(one.stderr).toBe('');
    expect(one.code).toBe(0);
    expect(two.code).toBe(0);
    expect(two.stdout).toBe(one.stdout);
    const out = JSON.parse(one.stdout);
    for (const key of ['parameter', 'p', 'noise', 'paths', 'dt', 'seed', 'nodeSteps', 'sequences', 'escapeTimes', 'returns', 'capped', 'prediction', 'diagnostics']) expect(out).toHaveProperty(key);
    expect(out.parameter).toBe('beta');
    expect(out.paths).toBe(60);
    expect(out.noise).toBe(0.55);
    const total = out.sequences.reduce((s: number, q: { count: number }) => s + q.count, 0);
    expect(total + out.capped).toBe(60);
    for (const q of out.sequences) expect(q.low).toBeLessThanOrEqual(q.probability);
    expect(out.escapeTimes[0]).toMatchObject({ k: 1 });
    expect(out.prediction.sequences.length).toBeGreaterThan(0);
    expect(Number.isFinite(out.prediction.meanFirstEscape)).toBe(true);
    expect(typeof out.stepCheck.passed).toBe('boolean');
  }, 180_000);

  it('exits 2 with one line naming the flag for bad values', async () => {
    const cases: [string[], RegExp][] = [
      [['--at', '0.05', '--paths', '0'], /^--paths: /],
      [['--at', '0.05', '--paths', '2.5'], /^--paths: /],
      [['--at', '0.05', '--noise=-1'], /^--noise: /],
      [['--at', '0.05', '--dt', '0'], /^--dt: /],
      [['--at', '0.05', '--t-max', 'x'], /^--t-max: /],
      [['--at', '0.05', '--threads', '999'], /^--threads: /],
      [['--at', '0.05', '--start', 'middle'], /^--start: /],
      [[], /^--at: /],
    ];
    const results = await Promise.all(cases.map(([a]) => runCli(['escapes', pair, ...a])));
    results.forEach((r, i) => {
      expect(r.code).toBe(2);
      expect(r.stderr).toMatch(cases[i][1]);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
    });
  }, 120_000);

  it('refuses a run over the budget with the estimate and exits 2', async () => {
    const r = await runCli(['escapes', pair, '--at', '0.05', '--paths', '10000', '--noise', '0.2', '--budget', '1e6']);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^--budget: the run needs about .* node-steps.*larger noise level/);
  }, 120_000);

  it('--help prints the usage', async () => {
    const r = await runCli(['escapes', '--help']);
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(/--at P/);
  }, 60_000);
});
