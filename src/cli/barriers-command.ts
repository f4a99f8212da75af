/** `atlas barriers`: Freidlin–Wentzell exit barriers of every escape-graph edge and the exit switches along the sweep. */
import { traceDiagram } from '../lib/atlas/index.js';
import type { Diagnostic } from '../lib/atlas/types.js';
import { validateModelDocument } from '../lib/model/index.js';
import { barriersAt, exitSwitches, noiseGraphAt, resolveNoise, saddleKeys, stateLabel } from '../lib/noise/index.js';
import { changesEscapeGraph, cutPoints } from '../lib/regimes/index.js';
import { compile, emit, emitText, parseModelCommand, readModel, UsageError, type Command } from './cli-common.js';

const HELP = `Usage: npm run --silent atlas -- barriers MODEL.json [--from P --to P] [--out FILE]

Quasi-potential barriers (Freidlin–Wentzell) of the model's escape graphs: for every stable state
and every index-1 saddle next to it, the barrier from the state to the saddle and the
minimum-action path. Gradient fields (detected, not assumed) use the potential, 2 (V(saddle) -
V(state)); other fields the geometric minimum action method (Heymann & Vanden-Eijnden 2008).
Barriers are in units of sigma^2 for the document's noise weights ("noise.perNode" /
"noise.perVariable" relative to "noise.amplitude"; equal weights without a noise field): escape
rates go like exp(-barrier / sigma^2). Method, tolerances and limits: docs/noise.md.

Barriers are computed at the representative parameters (the midpoint of every interval between
special points that can change the escape graph). Exit switches - where the lowest barrier out
of a state passes from one saddle to another - are searched over the whole sweep (or --from/--to)
and located by bisection to 1e-8 in the parameter.

Prints JSON (or writes it to FILE):
  { "parameter": "beta",
    "states": [ { "p": 0.05, "state": "all-base", "x": [..] } ],
    "edges": [ { "p": 0.05, "from": "all-base", "saddle": "all-base -> a tipped", "to": "a tipped",
                 "barrier": 0.31, "method": "potential", "converged": true, "path": [[..], ..] } ],
    "exitSwitches": [ { "p": 0.1, "state": "all-base", "saddles": ["all-base -> b tipped", "all-base -> a tipped"],
                        "barrier": 0.31 } ],
    "weights": [1, 1],
    "diagnostics": [ { "level": "warning", "code": "..", "message": "..", "p": .. } ] }
"states": every stable state of the escape graph at each representative p: "state" is its label,
  "all-base", "all-tipped" or the tipped nodes ("a, c tipped"; a node is tipped above the
  threshold root of its uncoupled element), "x" its coordinates.
"from" / "to": the label of the state left / of the state on the other side of the saddle.
"saddle": the saddle named by the two states its unstable manifold joins, fewer tipped nodes
  first ("all-base -> a tipped"). When two saddles join the same two states, " via" and the
  saddle's own pattern is added ("all-base -> all-tipped via b tipped"), and " #2" if that is
  the same too.
"barrier": the quasi-potential of the saddle relative to "from" (units of sigma^2).
"method": "potential" or "minimum-action"; "converged": whether that method met its tolerance.
"path": the minimum-action path from the state to the saddle (original coordinates).
"exitSwitches"."saddles": the saddle with the lower barrier below the switch, then above it.

Options:
  --from P     start of the exit-switch search (and of the traced sweep); default sweep.from
  --to P       end; default sweep.to
  --out FILE   write the JSON to FILE instead of standard output
  --help       this text

Exit codes: 0 done (numerical trouble is reported in "diagnostics"), 2 invalid input (message
names the field), 1 internal error.
Results are indicative; defer to domain experts and local regulation.`;

const MAX_DIAGNOSTICS = 60;

export const barriersCommand: Command = {
  summary: 'exit barriers (quasi-potential) of every escape-graph edge and the exit switches',
  help: HELP,
  run(argv) {
    const args = parseModelCommand(argv, HELP);
    if (!args) return;
    const { values, from, to } = args;
    const model = readModel(args.modelPath);
    const system = compile(model, from, to);
    const checked = validateModelDocument(model);
    const weights = checked.ok && checked.document.noise ? resolveNoise(checked.document).weights : new Float64Array(system.dimension).fill(1);
    const names = system.network?.nodeIds ?? system.variables;
    const diagram = traceDiagram(system);
    const lo = Math.min(system.sweep.from, system.sweep.to);
    const hi = Math.max(system.sweep.from, system.sweep.to);

    const diagnostics: Diagnostic[] = [];
    const seen = new Set<string>();
    const note = (d: Diagnostic) => {
      const key = `${d.code}|${d.message}`;
      if (!seen.has(key)) { seen.add(key); diagnostics.push(d); }
    };
    diagram.diagnostics.forEach(note);
    const cuts = cutPoints(diagram, lo, hi, 1e-9, (sp) => changesEscapeGraph(system, sp));
    const states: { p: number; state: string; x: number[] }[] = [];
    const edges: Record<string, unknown>[] = [];
    for (let k = 0; k + 1 < cuts.length; k++) {
      if (!(cuts[k + 1].p - cuts[k].p > 1e-12)) continue;
      const p = 0.5 * (cuts[k].p + cuts[k + 1].p);
      const g = noiseGraphAt(system, diagram, p);
      g.diagnostics.forEach(note);
      if (!g.ok) {
        note({ level: 'warning', code: 'barriers-no-graph', p, message: `no escape graph at ${system.parameter} = ${p}: ${g.reason}` });
        continue;
      }
      const labels = g.graph.states.map((s) => stateLabel(s.pattern, names));
      const keys = saddleKeys(g, names);
      g.graph.states.forEach((s, i) => states.push({ p, state: labels[i], x: s.x }));
      const res = barriersAt(system, g, weights);
      res.diagnostics.forEach(note);
      for (const b of res.barriers) {
        edges.push({ p, from: labels[b.from], saddle: keys[b.saddle], to: labels[b.to], barrier: b.barrier, method: b.method, converged: b.converged, path: b.path });
      }
    }
    const sw = exitSwitches(system, diagram, lo, hi, weights);
    sw.diagnostics.forEach(note);
    if (diagnostics.length > MAX_DIAGNOSTICS) {
      const extra = diagnostics.length - MAX_DIAGNOSTICS;
      diagnostics.length = MAX_DIAGNOSTICS;
      diagnostics.push({ level: 'info', code: 'diagnostics-truncated', message: `${extra} further diagnostics were left out` });
    }
    emit({ parameter: system.parameter, states, edges, exitSwitches: sw.switches, weights: Array.from(weights), diagnostics }, args.out);
  },
};
