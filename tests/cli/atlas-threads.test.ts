import { availableParallelism } from 'node:os';
import { describe, expect, it } from 'vitest';
import { runCli, scratchFiles } from './run-cli';
import { chain, cubicDoc } from '../../scripts/trace-blocks-common.ts';

const { file } = scratchFiles('atlas-threads-');

describe('atlas trace --threads', () => {
  it('trace --threads 2 prints the same JSON as one thread for a 729-start network (two blocks on the trace pool)', { timeout: 180_000 }, async () => {
    // Invented: six cubic elements on a two-way chain, 3^6 = 729 starting patterns.
    const path = file('six.json', cubicDoc('Six invented lakes, two-way chain', 6, chain(6, true)));
    const one = await runCli(['trace', path]);
    const two = await runCli(['trace', path, '--threads', String(Math.min(2, availableParallelism()))]);
    expect(one.code, one.stderr).toBe(0);
    expect(two.code, two.stderr).toBe(0);
    expect(JSON.parse(one.stdout).branches.length).toBeGreaterThan(300);
    expect(two.stdout === one.stdout, 'byte-identical output').toBe(true);
  });

  it('exits 2 with one stderr line naming --threads for a count that is not 1 to the number of cores', { timeout: 60_000 }, async () => {
    const path = file('two.json', cubicDoc('Two invented lakes', 2, chain(2, false)));
    for (const bad of ['0', '1.5', String(availableParallelism() + 1), 'many']) {
      const r = await runCli(['trace', path, '--threads', bad]);
      expect(r.code, bad).toBe(2);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(/^--threads: /);
      expect(r.stdout).toBe('');
    }
  });
});
