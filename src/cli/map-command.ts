/** `atlas map MODEL.json --second NAME --from A --to B`: the two-parameter map (src/lib/maps, docs/maps.md). */
import { ModelError, formatIssue } from '../lib/model/index.js';
import { compileTwoParameter, traceMap } from '../lib/maps/index.js';
import { emit, numberOption, parseModelCommand, readModel, UsageError, type Command } from './cli-common.js';

const HELP = `Usage: npm run --silent atlas -- map MODEL.json --second NAME --from A --to B
                                   [--sweep-from P] [--sweep-to P] [--seeds K] [--cross-seeds K]
                                   [--columns C] [--rows R] [--out FILE]

The two-parameter map: the document's swept parameter (first) against a second model parameter
NAME varied from A to B. One-parameter diagrams are traced at a few values of NAME (and, in NAME, at
a few values of the swept parameter); from each of
their saddle-nodes the curve of saddle-nodes is continued in both parameters, from each Hopf point
the Hopf curve, and from each pitchfork of a symmetric network the curve of symmetry-breaking
points. Cusp points (a saddle-node curve turns back, the fold's quadratic coefficient vanishes) and
Bogdanov-Takens points (a double zero eigenvalue, where a Hopf curve ends on a saddle-node curve)
are located on the curves. The coupling regime (weak, intermediate, strong) is sampled on a coarse grid only to say
which curves bound which region. Method: docs/maps.md.

Prints JSON (or writes it to FILE):
  { "parameters": ["beta", "r"], "ranges": { "first": [0, 1], "second": [A, B] },
    "curves": [ { "id": "sn1", "type": "saddle-node", "points": [ { "p": [beta, r], "x": [..] } ],
                  "ends": ["parameter-bound", "parameter-bound"], "seed": { "second": .., "p": .., "x": [..] } } ],
    "points": [ { "id": "cusp1", "type": "cusp", "p": [beta, r], "x": [..], "curves": ["sn1"],
                  "evidence": { "reason": "..", "before": .., "after": .. } } ],
    "regions": [ { "id": "r1", "regime": "weak", "samples": [[beta, r], ..], "boundedBy": ["sn1"],
                   "unlocatedEdges": 0 } ],
    "diagnostics": [ { "level": "info", "code": "..", "message": ".." } ] }
Curve types: "saddle-node", "hopf" (points add "frequency"), "pitchfork". Point types: "cusp",
"bogdanov-takens" (a saddle-node curve meets a Hopf curve; listed once with both curves),
"saddle-node-meets-pitchfork" (the symmetric branch folds on a pitchfork curve),
"degenerate-pitchfork" (the pitchfork changes side; an asymmetric saddle-node curve ends there).

Options:
  --second NAME    the second parameter (required): the coupling parameter or an element
                   parameter (network documents), any parameter (ode documents)
  --from A         start of the second parameter's range (required; negative: --from=-0.5)
  --to B           end of the second parameter's range (required)
  --sweep-from P   range of the swept parameter; default sweep.from
  --sweep-to P     default sweep.to
  --seeds K        one-parameter diagrams that seed curves, evenly spaced over [A, B] (default 5)
  --cross-seeds K  diagrams in NAME at K evenly spaced values of the swept parameter that also seed
                   curves, e.g. folds that do not depend on it (default 3; 0: none)
  --columns C      regime grid columns in the swept parameter (default 9; 0 with --rows 0: no regions)
  --rows R         regime grid rows in the second parameter (default 5; these rows also seed curves)
  --out FILE       write the JSON to FILE instead of standard output
  --help           this text

Exit codes: 0 done, 2 invalid input (message names the field), 1 internal error.
Results are indicative; defer to domain experts and local regulation.`;

function integerOption(name: string, value: string | undefined, min: number, max: number): number | undefined {
  const v = numberOption(name, value);
  if (v === undefined) return undefined;
  if (!Number.isInteger(v) || v < min || v > max) throw new UsageError(`--${name}: expected an integer from ${min} to ${max}, got '${value}'`);
  return v;
}

export const mapCommand: Command = {
  summary: 'two-parameter map: saddle-node, Hopf and pitchfork curves, cusp and Bogdanov-Takens points, regime regions',
  help: HELP,
  run(argv) {
    const args = parseModelCommand(argv, HELP, {
      second: 'string', 'sweep-from': 'string', 'sweep-to': 'string', seeds: 'string', 'cross-seeds': 'string', columns: 'string', rows: 'string',
    });
    if (!args) return;
    const { values } = args;
    const model = readModel(args.modelPath);
    const second = values.second as string | undefined;
    if (second === undefined || second === '') throw new UsageError('--second: required (the name of the second parameter)');
    if (args.from === undefined) throw new UsageError('--from: required (start of the second parameter\'s range)');
    if (args.to === undefined) throw new UsageError('--to: required (end of the second parameter\'s range)');
    if (args.from === args.to) throw new UsageError(`--to: the range needs from != to (both are ${args.from})`);
    const sweepFrom = numberOption('sweep-from', values['sweep-from'] as string | undefined);
    const sweepTo = numberOption('sweep-to', values['sweep-to'] as string | undefined);
    const seeds = integerOption('seeds', values.seeds as string | undefined, 1, 50);
    const crossSeeds = integerOption('cross-seeds', values['cross-seeds'] as string | undefined, 0, 50);
    const columns = integerOption('columns', values.columns as string | undefined, 0, 100);
    const rows = integerOption('rows', values.rows as string | undefined, 0, 100);
    if ((columns === 0) !== (rows === 0) && columns !== undefined && rows !== undefined) throw new UsageError('--rows: give --columns 0 and --rows 0 together to skip the regions');
    let system;
    try {
      const base = compileTwoParameter(model, { second });
      const sweep = { from: sweepFrom ?? base.sweep.from, to: sweepTo ?? base.sweep.to };
      if (sweep.from === sweep.to) throw new UsageError(`--sweep-to: the sweep needs from != to (both are ${sweep.from})`);
      system = sweepFrom === undefined && sweepTo === undefined ? base : compileTwoParameter(model, { second, sweep });
    } catch (e) {
      if (e instanceof ModelError && e.issues[0]?.path === 'second') throw new UsageError(`--${formatIssue(e.issues[0])}`);
      throw e;
    }
    const map = traceMap(system, {
      secondFrom: args.from,
      secondTo: args.to,
      ...(seeds !== undefined ? { seeds } : {}),
      ...(crossSeeds !== undefined ? { crossSeeds } : {}),
      ...(columns !== undefined ? { regionColumns: columns } : {}),
      ...(rows !== undefined ? { regionRows: rows } : {}),
      ...(columns === 0 && rows === undefined ? { regionRows: 0 } : {}),
      ...(rows === 0 && columns === undefined ? { regionColumns: 0 } : {}),
    });
    emit({
      parameters: map.parameters,
      ranges: map.ranges,
      curves: map.curves,
      points: map.points,
      regions: map.regions,
      diagnostics: map.diagnostics,
    }, args.out);
  },
};
