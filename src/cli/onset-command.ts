/** `atlas onset MODEL.json`: critical coupling per node (src/lib/onset, docs/onset.md). */
import { criticalCoupling, OnsetInputError } from '../lib/onset/index.js';
import { compile, emit, emitText, parseModelCommand, readModel, UsageError, type Command } from './cli-common.js';

const HELP = `Usage: npm run --silent atlas -- onset MODEL.json [--from P] [--to P] [--out FILE]

Critical coupling per node: for every node i, the coupling at which the state "only node i tipped"
stops existing (the first saddle-node of its branch, followed from the sweep start in the sweep
direction) and which nodes tip next there (where the flow just past that fold settles). Traces one
branch per node, not the whole diagram. The document must sweep its coupling parameter.

Prints JSON (or writes it to FILE):
  { "parameter": "beta", "from": 0, "to": 1,
    "nodes": [ { "id": "lake1", "critical": 0.178, "next": ["lake2"], "recovered": [], "status": "fold" } ],
    "diagnostics": [ { "level": "info", "code": "none-in-range", "message": ".." } ] }
"critical" is null when the state does not fold inside the sweep ("status": "none-in-range") or the
analysis failed ("failed", with a diagnostic); "next" lists nodes base before and tipped after,
"recovered" nodes tipped before and base after (null when unresolved). Method: docs/onset.md.

Options:
  --from P     sweep start (the single-tipped patterns are built here); default sweep.from
  --to P       sweep end; default sweep.to
  --out FILE   write the JSON to FILE instead of standard output
  --help       this text

Exit codes: 0 done, 2 invalid input (message names the field), 1 internal error.
Results are indicative; defer to domain experts and local regulation.`;

export const onset: Command = {
  summary: 'critical coupling per node: where "only this node tipped" ends and who tips next',
  help: HELP,
  run(argv) {
    const args = parseModelCommand(argv, HELP);
    if (!args) return;
    const { values } = args;
    const system = compile(readModel(args.modelPath), args.from, args.to);
    let result;
    try {
      result = criticalCoupling(system);
    } catch (e) {
      if (e instanceof OnsetInputError) throw new UsageError(e.message);
      throw e;
    }
    emit({
      parameter: result.parameter,
      from: result.from,
      to: result.to,
      nodes: result.nodes.map((q) => ({ id: q.id, critical: q.critical, next: q.next, recovered: q.recovered, status: q.status })),
      diagnostics: result.diagnostics,
    }, args.out);
  },
};
