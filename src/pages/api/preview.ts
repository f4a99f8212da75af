/**
 * POST /api/preview { document } → 200 { valid, issues?, diagram?, diagnostics?, elapsedMs, truncated }
 *
 * The editor's live preview: for networks of up to PREVIEW_MAX_NODES nodes (or explicit systems of
 * as many variables) it validates, compiles and traces the diagram inside the request, with caps
 * tight enough that an answer comes back within about half a second on this machine. Modelers and
 * owners only (it computes). Numerical trouble or a cap gives a partial diagram with diagnostics,
 * never a 500. Nothing is stored: a saved run is the record.
 */
import { z } from 'zod';
import { handler, json, parseJson, HttpError } from '../../lib/server/http.ts';
import { requireRole } from '../../lib/server/auth/guards.ts';
import { EDITOR_ROLES } from '../../lib/server/auth/roles.ts';
import { validateModelDocument, compileModel } from '../../lib/model/index.ts';
import { traceDiagram } from '../../lib/atlas/index.ts';
import { ENGINE_VERSION } from '../../lib/atlas/engine-version.ts';
import type { TraceSettings } from '../../lib/atlas/trace-settings.ts';
import type { Diagram, Diagnostic } from '../../lib/atlas/types.ts';

export const PREVIEW_MAX_NODES = 4;
const MAX_BODY_BYTES = 256 * 1024;

/**
 * Caps for the in-request trace (common practice, no source): coarser steps than a stored run (at most
 * 1/100 of the sweep in the parameter per step, first step 1/100), at most 3^4 uncoupled starting
 * combinations, 40 branches of up to 800 points. Measured here on the three-lake chain of issue 3
 * swept over beta in [0, 0.5]: the same 18 branches and 11 special points as the default settings in
 * about 30-90 ms instead of 1.5 s. Special points closer than 1/100 of the sweep can merge in the
 * preview; the stored run uses the engine's defaults.
 */
export const PREVIEW_SETTINGS: Partial<TraceSettings> = {
  maxPointsPerBranch: 800,
  maxBranches: 40,
  maxStartCombinations: 81,
  maxStartingPoints: 81,
  maxParameterStep: 1 / 100,
  initialStep: 1e-2,
  maxStep: 8e-2,
  multiStartCount: 8,
  rootSearchCells: 800,
  storeEigenvalues: false,
};

/**
 * Wall-clock budget of the trace itself: the engine polls `isCancelled` at every continuation step,
 * so the answer (validation + compile + trace + JSON) leaves within about half a second.
 */
export const PREVIEW_TRACE_BUDGET_MS = 380;

const bodySchema = z.object({ document: z.unknown() }).strict();

function sizeOf(document: { format: string; nodes?: unknown[]; variables?: unknown[] }): number {
  return document.format === 'brinkmap/network-1' ? (document.nodes?.length ?? 0) : (document.variables?.length ?? 0);
}

export const POST = handler(async ({ request, locals }) => {
  requireRole(locals, ...EDITOR_ROLES);
  const { document } = await parseJson(request, bodySchema, { maxBytes: MAX_BODY_BYTES });
  const started = performance.now();
  const checked = validateModelDocument(document);
  if (!checked.ok) return json({ valid: false, issues: checked.issues, elapsedMs: performance.now() - started });
  const size = sizeOf(checked.document as never);
  if (size > PREVIEW_MAX_NODES) {
    throw new HttpError(422, 'too_large_for_preview', `The live preview covers up to ${PREVIEW_MAX_NODES} nodes; this model has ${size}. Save it and start a run instead.`);
  }

  let diagram: Diagram;
  const diagnostics: Diagnostic[] = [];
  try {
    const system = compileModel(checked.document);
    const deadline = performance.now() + PREVIEW_TRACE_BUDGET_MS;
    let outOfTime = false;
    diagram = traceDiagram(system, PREVIEW_SETTINGS, {
      isCancelled: () => (outOfTime ||= performance.now() > deadline),
    });
    if (outOfTime) {
      // The engine reports the stop as a cancellation; say what it really was.
      diagram = { ...diagram, diagnostics: diagram.diagnostics.filter((d) => d.code !== 'cancelled') };
      diagnostics.push({ level: 'warning', code: 'preview-time-budget', message: `The preview stopped after ${PREVIEW_TRACE_BUDGET_MS} ms with what it had traced; a saved run computes the whole diagram.` });
    }
  } catch (err) {
    // A broken contract inside the engine must not cost the modeler their preview: say what happened.
    console.error('[brinkmap] preview trace failed', err);
    diagram = {
      parameter: (checked.document as { sweep: { parameter: string } }).sweep.parameter,
      variables: [],
      branches: [],
      bifurcations: [],
      diagnostics: [],
      settings: { ...PREVIEW_SETTINGS },
      engineVersion: ENGINE_VERSION,
    };
    diagnostics.push({ level: 'error', code: 'preview-failed', message: `The preview computation stopped: ${err instanceof Error ? err.message : String(err)}` });
  }
  const elapsedMs = performance.now() - started;
  const truncated = diagnostics.some((d) => d.code === 'preview-time-budget')
    || diagram.branches.some((b) => b.ends.includes('point-cap'))
    || diagram.diagnostics.some((d) => /cap|limit/i.test(d.code));
  return json({ valid: true, diagram, diagnostics: [...diagram.diagnostics, ...diagnostics], elapsedMs, truncated });
});
