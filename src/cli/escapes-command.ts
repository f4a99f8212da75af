/** `atlas escapes`: Monte Carlo escape sequences at one parameter value, with the weak-noise prediction beside them. */
import { availableParallelism } from 'node:os';
import { parseArgs } from 'node:util';
import { traceDiagram } from '../lib/atlas/index.js';
import { compileModelJson, validateModelDocument } from '../lib/model/index.js';
import { NoiseSettingError, resolveNoise } from '../lib/noise/noise-spec.js';
import { BudgetExceededError } from '../lib/noise/budget.js';
import { escapeReport, prepareEscapes, MAX_PATHS, type EscapeStart } from '../lib/noise/escapes.js';
import { EscapePool } from '../worker/escape-pool.js';
import { emit, numberOption, readModel, UsageError, type Command } from './cli-common.js';

const HELP = `Usage: npm run --silent atlas -- escapes MODEL.json --at P [--noise S] [--paths N] [--dt H]
         [--t-max T] [--seed K] [--threads M] [--start all-base|all-tipped] [--budget B] [--out FILE]

Simulates N Euler–Maruyama paths of dx = F(x; P) dt + sigma dW from the start state until every
node has passed its escape threshold (halfway between its threshold and tipped roots) or T, and
reports the order in which the nodes first escape, the k-th escape times, returns and capped
paths, the weak-noise prediction beside them and a step-halving check (docs/noise.md).

Prints JSON: { "parameter", "p", "noise", "paths", "dt", "seed", "nodeSteps",
  "sequences": [ { "order": ["n0", "n1"], "count", "probability", "low", "high" } ],
  "escapeTimes": [ { "k": 1, "mean", "median", "q05", "q95", ... } ], "returns", "capped",
  "prediction": { "sequences": [ { "order", "probability" } ], "meanFirstEscape" }, "stepCheck",
  "diagnostics" }   (low/high: Wilson 95 % interval)

Options:
  --at P        parameter value (required); the model is traced over a range covering P
  --noise S     noise level sigma > 0; default the document's noise.amplitude
  --paths N     number of paths, 1 to 10^7; default 1000
  --dt H        time step > 0; default 0.05 / (fastest eigenvalue modulus at the start state)
  --t-max T     time cap per path > 0; default from a pilot of the first 32 paths: 5 x their
                longest last-escape time, at least 10 x the predicted mean (docs/noise.md)
  --seed K      integer seed in [0, 2^32 - 1]; default 1 (path i uses MT19937 keyed [K, i])
  --threads M   worker threads, 1 to the number of cores; default 1 (same output for any M)
  --start S     all-base (default) or all-tipped
  --budget B    refuse runs estimated above B node-steps; default 4e9
  --out FILE    write the JSON to FILE instead of standard output
  --help        this text

Exit codes: 0 done, 2 invalid input (message names the field), 1 internal error.
Results are indicative; defer to domain experts and local regulation.`;

function integerOption(name: string, value: string | undefined, lo: number, hi: number): number | undefined {
  const v = numberOption(name, value);
  if (v === undefined) return undefined;
  if (!Number.isInteger(v) || v < lo || v > hi) throw new UsageError(`--${name}: must be an integer from ${lo} to ${hi}, got '${value}'`);
  return v;
}

function positiveOption(name: string, value: string | undefined): number | undefined {
  const v = numberOption(name, value);
  if (v !== undefined && !(v > 0)) throw new UsageError(`--${name}: must be positive, got '${value}'`);
  return v;
}

const FIELD_FLAGS: Record<string, string> = { noise: 'noise', paths: 'paths', dt: 'dt', tMax: 't-max', seed: 'seed', start: 'start', at: 'at', budget: 'budget' };

export const escapes: Command = {
  summary: 'Monte Carlo escape sequences and times at one parameter value, with the weak-noise prediction',
  help: HELP,
  async run(argv) {
    const { values, positionals } = parseArgs({
      args: argv,
      allowPositionals: true,
      options: {
        at: { type: 'string' }, noise: { type: 'string' }, paths: { type: 'string' }, dt: { type: 'string' },
        't-max': { type: 'string' }, seed: { type: 'string' }, threads: { type: 'string' }, start: { type: 'string' },
        budget: { type: 'string' }, out: { type: 'string' }, help: { type: 'boolean' },
      },
    });
    if (values.help) {
      process.stdout.write(`${HELP}\n`);
      return;
    }
    if (positionals.length > 1) throw new UsageError(`MODEL.json: expected one model file, got ${positionals.length}`);
    const model = readModel(positionals[0]);
    const p = numberOption('at', values.at);
    if (p === undefined) throw new UsageError('--at: missing parameter value (see --help)');
    const level = positiveOption('noise', values.noise);
    const paths = integerOption('paths', values.paths, 1, MAX_PATHS) ?? 1000;
    const dt = positiveOption('dt', values.dt);
    const tMax = positiveOption('t-max', values['t-max']);
    const seed = integerOption('seed', values.seed, 0, 4294967295) ?? 1;
    const cores = availableParallelism();
    const threads = integerOption('threads', values.threads, 1, cores) ?? 1;
    const budget = positiveOption('budget', values.budget);
    const start = (values.start ?? 'all-base') as EscapeStart;
    if (start !== 'all-base' && start !== 'all-tipped') throw new UsageError(`--start: expected all-base or all-tipped, got '${values.start}'`);
    const validated = validateModelDocument(model);
    const base = compileModelJson(model);
    if (!validated.ok) throw new UsageError('MODEL.json: invalid model document');
    const width = Math.abs(base.sweep.to - base.sweep.from);
    const sweep = p >= Math.min(base.sweep.from, base.sweep.to) && p <= Math.max(base.sweep.from, base.sweep.to)
      ? base.sweep
      : { from: Math.min(base.sweep.from, p - 0.05 * width), to: Math.max(base.sweep.to, p + 0.05 * width) };
    const system = sweep === base.sweep ? base : compileModelJson(model, { sweep });
    try {
      const spec = resolveNoise(validated.document, level);
      const diagram = traceDiagram(system);
      const prep = prepareEscapes(system, diagram, spec, p, { paths, dt, tMax, seed, start, budget });
      const pool = new EscapePool(threads);
      try {
        const batch = await pool.run({ model, setup: prep.setup, dt: prep.dt, tMax: prep.tMax, seed: prep.seed, count: prep.paths });
        const half = prep.stepCheckPaths > 0 ? await pool.run({ model, setup: prep.setup, dt: prep.dt / 2, tMax: prep.tMax, seed: prep.seed, count: prep.stepCheckPaths }) : null;
        emit(escapeReport(system, prep, spec.level, batch, half), values.out);
      } finally {
        await pool.close();
      }
    } catch (e) {
      if (e instanceof NoiseSettingError) throw new UsageError(`--${FIELD_FLAGS[e.field] ?? e.field}: ${e.message.slice(e.field.length + 2)}`);
      if (e instanceof BudgetExceededError) throw new UsageError(e.message.replace(/^budget:/, '--budget:'));
      throw e;
    }
  },
};
