/**
 * Brinkmap command line: `npm run --silent atlas -- <command> ...`.
 * Exit codes: 0 done (numerical trouble is reported in the output's diagnostics), 2 invalid input
 * (one line on stderr naming the field), 1 unexpected internal error.
 */
import { availableParallelism } from 'node:os';
import { toTraceJson, traceDiagram, traceDiagramWith, type Diagram } from '../lib/atlas/index.js';
import type { CompiledSystem } from '../lib/model/index.js';
import { TracePool } from '../worker/trace-pool.ts';
import { ModelError } from '../lib/model/index.js';
import { bandEdgeKind, labelRegimes, type RegimeBand } from '../lib/regimes/index.js';
import { compile, emit, emitText, numberOption, parseModelCommand, readModel, UsageError, type Command, type ModelCommandArgs } from './cli-common.js';
import { escapes } from './escapes-command.js';
import { barriersCommand } from './barriers-command.js';
import { onset } from './onset-command.js';
import { mapCommand } from './map-command.js';

const TRACE_HELP = `Usage: npm run --silent atlas -- trace MODEL.json [--from P] [--to P] [--threads N] [--out FILE]

Traces every equilibrium branch of the model over its swept parameter (the document's "sweep",
or --from/--to) and locates saddle-node, pitchfork, transcritical and Hopf points.

Prints JSON (or writes it to FILE):
  { "parameter": "beta",
    "branches": [ { "id": "b1", "points": [ { "p": 0, "x": [..], "unstable": 0 } ] } ],
    "bifurcations": [ { "type": "pitchfork", "p": .., "x": [..], "branches": ["b1", "b2"] } ],
    "diagnostics": [ { "level": "info", "code": "..", "message": ".." } ] }
"unstable" counts eigenvalues with positive real part; Hopf points add "frequency".
Beyond 3^8 patterns (more than eight three-root nodes) only a restricted set of starting patterns is
traced, and "coverage": { "mode": "restricted", "maxOffBase": k, "starts": .., "of": "3^20",
"text": "branches through patterns with at most k nodes off base: .." } says which (docs/numerics.md §12).
It also carries the coupling regimes (docs/regimes.md):
    "regimes": [ { "from": 0, "to": 0.03, "regime": "weak", "bounds": ["sweep-bound", "saddle-node"],
                   "reason": "..." } ],
    "escapeGraphs": [ { "p": 0.015, "states": [ { "x": [..], "pattern": ["base", ..] } ],
                        "saddles": [ { "x": [..], "from": 0, "to": 3, "pattern": [..], "kind": "contained" } ] } ],
    "crossovers": [ { "p": 0.39, "kind": "engagement-crossover", "start": "all-base",
                      "description": "engagement crossover: ..", "below": "intermediate", "above": "intermediate" } ]

Options:
  --from P     sweep start (starting equilibria are computed here); default sweep.from
  --to P       sweep end; default sweep.to
  --threads N  threads for the trace, 1 to the number of cores; default 1. The same output for any N:
               512 or more starting patterns are traced in two fixed blocks, merged in order
               (docs/numerics.md §11); N = 2 runs them side by side (measured 1.6x at 8 nodes on free
               cores, little at 6, slower on a busy machine) and changes nothing below 512
  --out FILE   write the JSON to FILE instead of standard output
  --help       this text

Exit codes: 0 done, 2 invalid input (message names the field), 1 internal error.
Results are indicative; defer to domain experts and local regulation.`;

const REGIMES_HELP = `Usage: npm run --silent atlas -- regimes MODEL.json [--from P] [--to P] [--recovery] [--threads N] [--out FILE]

Traces the model like "trace" and prints only its coupling-regime bands as a table: from, to,
regime (weak, intermediate, strong), start, the kind of each edge (special point, saddle
connection, engagement crossover, sweep bound), what bounds the band in words and the reason.
Diagnostics of the regime analysis follow the table (e.g. "regimes undefined" for elements that are
not bistable). Method: docs/regimes.md.

Options:
  --from P     sweep start; default sweep.from
  --to P       sweep end; default sweep.to
  --recovery   also label recovery from the all-tipped state
  --threads N  threads for the trace, 1 to the number of cores; default 1 (same output for any N; see trace --help)
  --out FILE   write the table to FILE instead of standard output
  --help       this text

Exit codes: 0 done, 2 invalid input (message names the field), 1 internal error.
Results are indicative; defer to domain experts and local regulation.`;


/**
 * The diagram of the command's model on --threads threads (trace pool, src/worker/trace-pool.ts),
 * or in this thread for 1: the same diagram either way.
 */
async function tracedOnThreads(args: ModelCommandArgs, model: unknown, system: CompiledSystem): Promise<Diagram> {
  const threads = threadsOption(args.values.threads as string | undefined);
  if (threads === 1) return traceDiagram(system);
  const pool = new TracePool(threads);
  try {
    const compileOptions = args.from === undefined && args.to === undefined ? undefined : { sweep: system.sweep };
    return await traceDiagramWith(system, {}, {}, pool.runner(model, compileOptions));
  } finally {
    await pool.close();
  }
}

function threadsOption(value: string | undefined): number {
  const cores = availableParallelism();
  const v = numberOption('threads', value);
  if (v === undefined) return 1;
  if (!Number.isInteger(v) || v < 1 || v > cores) throw new UsageError(`--threads: expected an integer from 1 to ${cores} (the cores of this machine), got '${value}'`);
  return v;
}

const trace: Command = {
  summary: 'equilibrium branches and bifurcations of a model document',
  help: TRACE_HELP,
  async run(argv) {
    const args = parseModelCommand(argv, TRACE_HELP, { threads: 'string' });
    if (!args) return;
    const model = readModel(args.modelPath);
    const system = compile(model, args.from, args.to);
    const diagram = await tracedOnThreads(args, model, system);
    // Later sections (e.g. coupling regimes) add their keys to this object.
    const traced = toTraceJson(diagram);
    const labelled = labelRegimes(system, diagram);
    const output: Record<string, unknown> = {
      ...traced,
      diagnostics: [...traced.diagnostics, ...labelled.diagnostics],
      regimes: labelled.regimes,
      escapeGraphs: labelled.escapeGraphs,
      crossovers: labelled.crossovers,
    };
    emit(output, args.out);
  },
};

function regimesTable(bands: readonly RegimeBand[]): string {
  const head = ['from', 'to', 'regime', 'start', 'edges', 'bounds', 'reason'];
  const rows = bands.map((b) => [num(b.from), num(b.to), b.regime, b.start ?? 'all-base', b.bounds.map(bandEdgeKind).join(' | '), b.bounds.join(' | '), b.reason]);
  const widths = head.slice(0, -1).map((h, i) => Math.max(h.length, ...rows.map((r) => r[i].length)));
  const line = (r: string[]) => r.map((c, i) => (i < widths.length ? c.padEnd(widths[i]) : c)).join('  ').trimEnd();
  return [line(head), ...rows.map(line)].join('\n');
}

function num(v: number): string {
  return Number(v.toPrecision(10)).toString();
}

const regimes: Command = {
  summary: 'weak / intermediate / strong coupling bands of a model document, as a table',
  help: REGIMES_HELP,
  async run(argv) {
    const args = parseModelCommand(argv, REGIMES_HELP, { recovery: 'boolean', threads: 'string' });
    if (!args) return;
    const { values } = args;
    const model = readModel(args.modelPath);
    const system = compile(model, args.from, args.to);
    const diagram = await tracedOnThreads(args, model, system);
    const labelled = labelRegimes(system, diagram, values.recovery ? { starts: ['all-base', 'all-tipped'] } : {});
    const lines = [labelled.regimes.length > 0 ? regimesTable(labelled.regimes) : 'no regime bands'];
    if (diagram.coverage) lines.push(`coverage: ${diagram.coverage.text}`);
    for (const d of labelled.diagnostics) lines.push(`${d.level}: ${d.code}: ${d.message}`);
    emitText(`${lines.join('\n')}\n`, args.out);
  },
};

/** Subcommands; each parses its own options. A new command lives in its own file and adds one line here. */
const commands: Record<string, Command> = {
  trace,
  regimes,
  onset,
  barriers: barriersCommand,
  escapes,
  map: mapCommand,
};

function helpText(): string {
  const width = Math.max(...Object.keys(commands).map((k) => k.length));
  const list = Object.entries(commands).map(([name, c]) => `  ${name.padEnd(width)}  ${c.summary}`).join('\n');
  return `Usage: npm run --silent atlas -- <command> [options]\n\nCommands:\n${list}\n\nRun a command with --help for its options.`;
}

async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  try {
    if (name === undefined || name === '--help' || name === '-h' || name === 'help') {
      process.stdout.write(`${helpText()}\n`);
      return name === undefined ? 2 : 0;
    }
    const cmd = commands[name];
    if (!cmd) throw new UsageError(`command: unknown command '${name}' (commands: ${Object.keys(commands).join(', ')})`);
    await cmd.run(rest);
    return 0;
  } catch (e) {
    if (e instanceof UsageError || e instanceof ModelError) {
      process.stderr.write(`${oneLine(e.message)}\n`);
      return 2;
    }
    if (e instanceof TypeError && (e as { code?: string }).code?.startsWith('ERR_PARSE_ARGS')) {
      process.stderr.write(`${oneLine(e.message)} (see --help)\n`);
      return 2;
    }
    process.stderr.write(`internal error: ${oneLine(e instanceof Error ? e.message : String(e))}\n`);
    return 1;
  }
}

function oneLine(s: string): string {
  return s.replace(/\s+/g, ' ').trim();
}

// A closed pipe (e.g. `| head`) is not an error of ours.
process.stdout.on('error', (e: NodeJS.ErrnoException) => {
  if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0);
  throw e;
});
process.exitCode = await main(process.argv.slice(2));
