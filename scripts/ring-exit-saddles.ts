/**
 * Probe behind docs/numerics.md §12 ("What it can miss", the sparse 20-node ring): which equilibria
 * Newton's method finds on the bench's 20-node ring with chords (invented cubic elements
 * x' = r_i + x - x^3, node i linked one way to i + 1 and i + 5) at a few coupling values, started from
 * "partly synchronised" guesses: every block of 1 to 20 consecutive nodes placed 0.5, 0.7, 1 or 1.3
 * of the way from their base root to their threshold, the other nodes at base. Prints, per
 * equilibrium, its number of unstable eigenvalues and those eigenvalues, and per coupling value the
 * exits of the all-base state among them (every manifold branch integrated).
 *
 *   node --import tsx scripts/ring-exit-saddles.ts [beta,beta,...]   (default 0.2,0.25,0.5,1)
 */
import { compileModelJson } from '../src/lib/model/index.js';
import { elementRoles, resolveOptions, startExits, type NodeRoles } from '../src/lib/regimes/index.js';
import { analyseEquilibrium, sameState, type Equilibrium } from '../src/lib/regimes/equilibria-at.js';
import { newtonAtFixedParameter } from '../src/lib/regimes/linear-algebra.js';

const N = 20;
const system = compileModelJson({
  format: 'brinkmap/network-1', name: '20 nodes, ring with chords (invented)',
  element: { variable: 'x', rate: 'r + x - x^3', parameters: { r: 0.1 } },
  nodes: Array.from({ length: N }, (_, i) => ({ id: `n${i + 1}`, parameters: { r: 0.05 + (0.1 * i) / (N - 1) } })),
  links: Array.from({ length: N }, (_, i) => [{ from: `n${i + 1}`, to: `n${((i + 1) % N) + 1}`, weight: 1 }, { from: `n${i + 1}`, to: `n${((i + 5) % N) + 1}`, weight: 1 }]).flat(),
  coupling: { parameter: 'beta', value: 0, term: 'source - target' },
  sweep: { parameter: 'beta', from: 0, to: 1 },
});
const options = resolveOptions({});
const roles = elementRoles(system, 0, Array.from({ length: N }, () => [-2, 2] as [number, number])).roles as NodeRoles[];
const values = (process.argv[2] ?? '0.2,0.25,0.5,1').split(',').map(Number);
for (const p of values) {
  const found: Equilibrium[] = [];
  const add = (guess: number[]) => {
    const r = newtonAtFixedParameter(system, guess, p, options.newtonTolerance, 60);
    if (r.converged && !found.some((f) => sameState(f.x, r.x, options.duplicateTolerance))) found.push(analyseEquilibrium(system, r.x, p, r.residual, options.hyperbolicTolerance));
  };
  add(roles.map((r) => r.base));
  add(roles.map((r) => r.tipped));
  let tries = 2;
  for (let k = 1; k <= N; k++) for (let s = 0; s < N; s++) for (const level of [0.5, 0.7, 1, 1.3]) {
    add(roles.map((r, i) => (((i - s + N) % N) < k ? r.base + level * (r.threshold - r.base) : r.base)));
    tries++;
  }
  const exits = startExits(system, p, found, roles, 'all-base', false, options, { left: 1e9 }, [], 'off');
  const indexOne = found.filter((e) => e.unstable === 1 && e.neutral === 0).length;
  console.log(`beta = ${p}: ${tries} starts, ${found.length} equilibria, ${indexOne} index-1 saddles, ${exits.exits.length} exits of all-base`);
  for (const e of found) {
    const up = e.eigenvalues.filter((l) => l.re > options.hyperbolicTolerance).sort((a, b) => b.re - a.re);
    const mean = e.x.reduce((a, b) => a + b, 0) / N;
    console.log(`  index ${String(e.unstable).padStart(2)}, mean x ${mean.toFixed(3)}: ${up.map((l) => (l.im === 0 ? l.re.toFixed(4) : `${l.re.toFixed(4)}${l.im > 0 ? '+' : '-'}${Math.abs(l.im).toFixed(4)}i`)).join(' ')}`);
  }
}
