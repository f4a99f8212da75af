/**
 * The whole computation behind a trace run, from stored document text to what is stored as the
 * result: compile, trace the diagram, label the coupling regimes, encode the diagram for storage
 * (src/lib/storage, docs/storage.md). No database and no I/O, so the worker thread, the demo seed
 * and tests all run exactly this.
 */
import { compileModelJson } from '../../model/index.ts';
import { traceDiagram, traceDiagramWith, type TraceBlockRunner } from '../../atlas/index.ts';
import type { CompiledSystem } from '../../model/compiled-system.ts';
import { labelRegimes } from '../../regimes/index.ts';
import { criticalCoupling, OnsetInputError, type CriticalCouplingResult } from '../../onset/index.ts';
import type { Diagram } from '../../atlas/types.ts';
import type { RunSettings } from './schemas.ts';
import { encodeForStorage } from '../results/stored-diagram.ts';
import { documentAtSecond } from '../../plot/map-slice.ts';

/**
 * The document the run traces: the stored version, or a copy with the settings' override applied (a
 * slice of a map, docs/maps.md "From the map back to one parameter"; the name was checked when the
 * run started, so a missing one is a broken contract). The engine gets the settings without it.
 */
export function documentForRun(documentText: string, settings: RunSettings): { document: unknown; engineSettings: Omit<RunSettings, 'override' | 'threads'> } {
  // threads only says where the blocks run (the diagram is the same for any count), so the engine never sees it.
  const { override, threads: _threads, ...engineSettings } = settings;
  const document = JSON.parse(documentText) as unknown;
  if (!override) return { document, engineSettings };
  const changed = documentAtSecond(document, override.parameter, override.value);
  if (!changed) throw new Error(`settings.override.parameter: the model version has no parameter ${override.parameter}`);
  return { document: changed, engineSettings };
}

export interface ComputeHooks {
  /** fraction in 0..1 of the whole run, and a short phrase saying what is being done. */
  onProgress(fraction: number, phrase: string): void;
  isCancelled(): boolean;
}

export interface ComputeOutput {
  /** The diagram encoded for the `results` row (decodeDiagramText gives back its JSON text). */
  readonly diagramBlob: Uint8Array;
  readonly regimesJson: string;
  /** Points in the drawing preview (the diagram thinned to PREVIEW_POINTS, or all when fewer). */
  readonly previewPoints: number;
  readonly branchCount: number;
  readonly pointCount: number;
  readonly specialPointCount: number;
  readonly computeMs: number;
  /** Wall milliseconds per part: compile + trace, band labelling, critical coupling, encoding for storage. */
  readonly phasesMs: { readonly trace: number; readonly label: number; readonly onset: number; readonly encode: number };
  readonly cancelled: boolean;
}

/** Share of the progress bar given to tracing; then regime labelling, then the critical coupling per node. */
const TRACE_SHARE = 0.8;
const ONSET_AT = 0.95;

export function computeTrace(documentText: string, settings: RunSettings, hooks: ComputeHooks): ComputeOutput {
  const started = performance.now();
  hooks.onProgress(0, 'compiling the model');
  const { document, engineSettings } = documentForRun(documentText, settings);
  const system = compileModelJson(document);
  const diagram: Diagram = traceDiagram(system, { ...engineSettings }, traceHooks(hooks));
  return afterTrace(system, diagram, started, hooks);
}

/**
 * computeTrace with the trace's blocks handed to the runner that `blocksOn` gives for the run's
 * document (the trace pool, src/worker/trace-pool.ts): the same output, the blocks on several threads.
 */
export async function computeTraceOn(documentText: string, settings: RunSettings, hooks: ComputeHooks, blocksOn: (document: unknown) => TraceBlockRunner): Promise<ComputeOutput> {
  const started = performance.now();
  hooks.onProgress(0, 'compiling the model');
  const { document, engineSettings } = documentForRun(documentText, settings);
  const system = compileModelJson(document);
  const diagram: Diagram = await traceDiagramWith(system, { ...engineSettings }, traceHooks(hooks), blocksOn(document));
  return afterTrace(system, diagram, started, hooks);
}

function traceHooks(hooks: ComputeHooks) {
  return {
    onProgress: (f: number, phrase: string) => hooks.onProgress(TRACE_SHARE * Math.min(1, Math.max(0, f)), phrase),
    isCancelled: () => hooks.isCancelled(),
  };
}

/** Bands, critical coupling and the encoded diagram after the trace. */
function afterTrace(system: CompiledSystem, diagram: Diagram, started: number, hooks: ComputeHooks): ComputeOutput {
  const traced = performance.now();
  let regimes: object = { regimes: [], escapeGraphs: [], diagnostics: [] };
  if (!hooks.isCancelled()) {
    hooks.onProgress(TRACE_SHARE, 'labelling coupling regimes');
    regimes = labelRegimes(system, diagram);
  }
  // Critical coupling per node (docs/onset.md): n fold continuations, stored beside the bands for the
  // run page's table and network colouring. Only for networks swept over their coupling.
  const labelled = performance.now();
  let onset: CriticalCouplingResult | null = null;
  if (!hooks.isCancelled() && system.network?.sweepIsCoupling) {
    hooks.onProgress(ONSET_AT, 'critical coupling per node');
    try {
      const num = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? v : undefined);
      onset = criticalCoupling(system, { from: num(diagram.settings?.from), to: num(diagram.settings?.to) }, { isCancelled: () => hooks.isCancelled() });
    } catch (e) {
      if (!(e instanceof OnsetInputError)) throw e;
    }
  }
  if (onset) regimes = { ...regimes, onset };
  const onsetDone = performance.now();
  const pointCount = diagram.branches.reduce((n, b) => n + b.points.length, 0);
  hooks.onProgress(1, 'storing the result');
  const { blob, previewPoints } = encodeForStorage(diagram);
  const regimesJson = JSON.stringify(regimes);
  const done = performance.now();
  return {
    diagramBlob: blob,
    previewPoints,
    regimesJson,
    branchCount: diagram.branches.length,
    pointCount,
    specialPointCount: diagram.bifurcations.length,
    computeMs: Math.round(done - started),
    phasesMs: { trace: Math.round(traced - started), label: Math.round(labelled - traced), onset: Math.round(onsetDone - labelled), encode: Math.round(done - onsetDone) },
    cancelled: hooks.isCancelled(),
  };
}
