import type { CompiledSystem } from '../model/compiled-system.js';
import { BorderedWorkspace, nullSpace, tangentAt } from '../numerics/bordered.js';
import { pointData, type TracedPoint } from '../numerics/branch-point-data.js';
import { nearZeroCount, spectralScale } from '../numerics/eigenvalues.js';
import { locateCountChange, locateZero, type TestFunctionKind } from '../numerics/locate.js';
import { continueBranch, type ContinuationOptions, type DirectionEnd } from '../numerics/pseudo-arclength.js';
import { switchAtBranchPoint } from '../numerics/branch-switch.js';
import { dist2, normInf } from '../numerics/vector.js';
import { BranchIndex } from './branch-index.js';
import { ENGINE_VERSION } from './engine-version.js';
import { SpecialPointRegistry, type SpecialPointDraft } from './special-point-registry.js';
import { findStartingEquilibria, formatCount, type StartRestriction } from './starting-equilibria.js';
import { growthRound } from './start-growth.js';
import { blockCount, mergeBlocks, type BlockResult, type TraceBlock } from './trace-blocks.js';
import { interiorSeeds, untracedSeeds } from './interior-seeds.js';
import { defaultTraceSettings, type ResolvedTraceSettings, type TraceSettings } from './trace-settings.js';
import type { Branch, BranchEnd, BranchPoint, Diagnostic, Diagram, StartCoverage } from './types.js';

export interface TraceHooks {
  /** Called often with the estimated fraction done (0..1, non-decreasing) and a short phrase. */
  onProgress?: (fraction: number, phrase: string) => void;
  /** Polled at every continuation step; true stops the trace with a partial diagram and a 'cancelled' diagnostic. */
  isCancelled?: () => boolean;
}

type Task =
  | { kind: 'start'; y: Float64Array; seed?: true }
  | { kind: 'switch'; from: string; draft: SpecialPointDraft; yStar: Float64Array; across: Float64Array; plus: Float64Array | null; minus: Float64Array | null; plusT: Float64Array | null; minusT: Float64Array | null; plusDet: number; minusDet: number };

interface Insert {
  after: TracedPoint;
  point: TracedPoint;
}

/**
 * The whole bifurcation diagram of a compiled system over its swept parameter: every branch through
 * the starting equilibria at `from`, traced both ways by Keller's pseudo-arclength continuation, every
 * branch found by switching at branch points, saddle-node / pitchfork / transcritical / Hopf points
 * located by sign changes of test functions and listed once. Synchronous and pure; never throws on
 * numerical trouble (the diagram is then partial and `diagnostics` says why). See docs/numerics.md.
 */
export function traceDiagram(system: CompiledSystem, settings: Partial<TraceSettings> = {}, hooks: TraceHooks = {}): Diagram {
  const plan = planTrace(system, settings, hooks);
  if (plan.diagram) return plan.diagram;
  const progress = blockProgress(plan, hooks);
  const results = plan.blocks.map((b) => traceBlock(system, b, { onProgress: (f, phrase) => progress(b.index, f, phrase), isCancelled: hooks.isCancelled }, plan.growth));
  return finishTrace(system, plan, withSeedBlock(system, plan, results, hooks), hooks);
}

/**
 * traceDiagram with the blocks of a full enumeration (planTrace) handed to `runner`, e.g. one thread
 * each (src/worker/trace-pool.ts). The blocks and their merge are the same as traceDiagram's, so the
 * diagram is the same whatever the runner does with them, as long as it returns traceBlock's results
 * in block order. A one-block plan (small networks, restricted starts) is traced in this thread.
 */
export async function traceDiagramWith(system: CompiledSystem, settings: Partial<TraceSettings>, hooks: TraceHooks, runner: TraceBlockRunner): Promise<Diagram> {
  const plan = planTrace(system, settings, hooks);
  if (plan.diagram) return plan.diagram;
  const progress = blockProgress(plan, hooks);
  const results = plan.blocks.length === 1
    ? [traceBlock(system, plan.blocks[0], { onProgress: (f, phrase) => progress(0, f, phrase), isCancelled: hooks.isCancelled }, plan.growth)]
    : await runner(plan.blocks, { onProgress: progress, isCancelled: hooks.isCancelled });
  return finishTrace(system, plan, withSeedBlock(system, plan, results, hooks), hooks);
}

/**
 * The blocks' results plus, when interior seeds (interior-seeds.ts) found equilibria that no traced
 * branch passes through, one more block traced from them in this thread, last, so that mergeBlocks
 * cuts its branches where they run onto the others. The seeds and the filter depend only on the
 * blocks' results, so the diagram stays the same for any thread count.
 */
function withSeedBlock(system: CompiledSystem, plan: TracePlan, results: BlockResult[], hooks: TraceHooks): BlockResult[] {
  const { s } = plan;
  // Restricted starts choose the branches that matter for cascades on purpose (docs/numerics.md §12);
  // random seeds there land on arbitrary patterns of a huge space (measured: 52 more branches and
  // 12x the time on a 64-node chain), so seeds complete full enumerations only.
  if (plan.growth || s.interiorSeedValues <= 0 || results.some((r) => r.cancelled || r.branchCapHit) || hooks.isCancelled?.()) return results;
  const maxStep = s.maxStep * plan.blocks[0].arcScale;
  // Seeds count against maxStartingPoints like every start.
  const room = s.maxStartingPoints - plan.blocks.reduce((q, b) => q + b.starts.length + b.farEnd.length, 0);
  if (room <= 0) return results;
  const seeds = untracedSeeds(system, interiorSeeds(system, s), results.flatMap((r) => r.branches), { cellWidth: Math.max(s.maxParameterStep * Math.abs(s.to - s.from), 1e-12), maxStep }).slice(0, room);
  if (seeds.length === 0) return results;
  const block: TraceBlock = { index: results.length, of: results.length + 1, settings: s, arcScale: plan.blocks[0].arcScale, starts: [], farEnd: [], seeds };
  const r = traceBlock(system, block, { isCancelled: hooks.isCancelled });
  return [...results, { ...r, diagnostics: [{ level: 'info', code: 'interior-seeds', message: `${seeds.length} equilibri${seeds.length === 1 ? 'um' : 'a'} found by multi-start Newton inside the sweep ${seeds.length === 1 ? 'lies' : 'lie'} on no branch through the starting equilibria; ${r.branches.length} branch${r.branches.length === 1 ? '' : 'es'} through them ${r.branches.length === 1 ? 'was' : 'were'} traced too (${system.parameter} = ${[...new Set(seeds.map((y) => fmt([y[system.dimension]])))].join(', ')})` }, ...r.diagnostics] }];
}

/** Runs the given blocks (traceBlock on each, anywhere) and returns their results in block order. */
export type TraceBlockRunner = (blocks: readonly TraceBlock[], hooks: { onProgress: (block: number, fraction: number, phrase: string) => void; isCancelled?: () => boolean }) => Promise<BlockResult[]>;

interface TracePlan {
  readonly s: ResolvedTraceSettings;
  readonly diagnostics: Diagnostic[];
  readonly blocks: TraceBlock[];
  readonly growth?: GrowthContext;
  /** Set when there is nothing to trace (invalid settings, no starts could be computed). */
  readonly diagram?: Diagram;
}

/** Restricted starts: what growth from the start state's escape graph and the coverage need (one block only). */
interface GrowthContext {
  readonly restriction: StartRestriction;
}

/** Settings, starting equilibria and their fixed split into blocks (docs/numerics.md §11). */
function planTrace(system: CompiledSystem, settings: Partial<TraceSettings>, hooks: TraceHooks): TracePlan {
  const s: ResolvedTraceSettings = { ...defaultTraceSettings, from: system.sweep.from, to: system.sweep.to, ...stripUndefined(settings) };
  const diagnostics: Diagnostic[] = [];
  const empty = (): TracePlan => ({ s, diagnostics, blocks: [], diagram: { parameter: system.parameter, variables: [...system.variables], branches: [], bifurcations: [], diagnostics, settings: { ...s }, engineVersion: ENGINE_VERSION } });
  const bad = checkSettings(s);
  if (bad) {
    diagnostics.push({ level: 'error', code: 'invalid-settings', message: bad });
    return empty();
  }
  hooks.onProgress?.(0, 'finding starting equilibria');
  let starts;
  try {
    starts = findStartingEquilibria(system, s.from, s);
  } catch (e) {
    diagnostics.push({ level: 'error', code: 'start-failed', message: `starting equilibria could not be computed: ${errorText(e)}` });
    return empty();
  }
  diagnostics.push(...starts.diagnostics);
  // Arclength runs through state and parameter alike, so steps scale with the larger of the sweep
  // width and the size of the starting states; the parameter step stays a fraction of the width.
  let stateSize = 0;
  for (const q of starts.points) stateSize = Math.max(stateSize, normInf(q));
  const arcScale = Math.max(Math.abs(s.to - s.from), 1 + stateSize);
  const farEnd = starts.farEnd ?? [];
  if (starts.restriction) {
    return { s, diagnostics, blocks: [{ index: 0, of: 1, settings: s, arcScale, starts: starts.points, farEnd }], growth: { restriction: starts.restriction } };
  }
  const count = blockCount(s.traceBlocks, starts.points.length);
  const blocks: TraceBlock[] = [];
  for (let b = 0; b < count; b++) {
    const a = Math.floor((b * starts.points.length) / count);
    const z = Math.floor(((b + 1) * starts.points.length) / count);
    blocks.push({ index: b, of: count, settings: s, arcScale, starts: starts.points.slice(a, z), farEnd: b === 0 ? farEnd : [] });
  }
  return { s, diagnostics, blocks };
}

/** Overall progress over the blocks: the mean of their fractions, non-decreasing. */
function blockProgress(plan: TracePlan, hooks: TraceHooks): (block: number, fraction: number, phrase: string) => void {
  const fractions = plan.blocks.map(() => 0);
  let last = 0;
  return (block, fraction, phrase) => {
    fractions[block] = Math.max(fractions[block], Math.min(1, fraction));
    last = Math.max(last, fractions.reduce((q, f) => q + f, 0) / fractions.length);
    hooks.onProgress?.(last, plan.blocks.length > 1 ? `block ${block + 1} of ${plan.blocks.length}: ${phrase}` : phrase);
  };
}

/** The merged blocks as a diagram, with the trace-wide diagnostics (coverage, neutral saddles, cancellation). */
function finishTrace(system: CompiledSystem, plan: TracePlan, results: readonly BlockResult[], hooks: TraceHooks): Diagram {
  const { s } = plan;
  const n = system.dimension;
  const maxStep = s.maxStep * plan.blocks[0].arcScale;
  const merged = mergeBlocks(results, { n, cellWidth: Math.max(s.maxParameterStep * Math.abs(s.to - s.from), 1e-12), maxStep, maxBranches: s.maxBranches });
  const diagnostics = [...plan.diagnostics, ...merged.diagnostics];
  const coverage = plan.growth ? results[0].coverage : undefined;
  if (coverage) diagnostics.push({ level: 'info', code: 'start-coverage', message: coverage.text });
  const neutralSaddles = results.reduce((q, r) => q + r.neutralSaddles, 0);
  if (neutralSaddles > 0) {
    diagnostics.push({ level: 'info', code: 'neutral-saddle', message: `${neutralSaddles} sign change(s) of the Hopf test function came from neutral saddles (two real eigenvalues summing to zero) and are not Hopf points` });
  }
  const cancelled = results.some((r) => r.cancelled);
  if (cancelled) diagnostics.push({ level: 'warning', code: 'cancelled', message: 'the trace was cancelled; the diagram is partial' });
  else hooks.onProgress?.(1, 'done');
  return {
    parameter: system.parameter,
    variables: [...system.variables],
    branches: merged.branches,
    bifurcations: merged.registry.finish(),
    diagnostics,
    settings: { ...s },
    engineVersion: ENGINE_VERSION,
    ...(coverage ? { coverage } : {}),
  };
}

/**
 * One block of a trace: the existing sequential loop over the block's starting equilibria (and the
 * branches found by switching from them), with its own branch index and special-point registry.
 * Pure and synchronous; the same input gives the same result in any thread (mergeBlocks then joins
 * the blocks in block order). `growth` only for the one block of restricted starts.
 */
export function traceBlock(system: CompiledSystem, block: TraceBlock, hooks: TraceHooks = {}, growthContext?: GrowthContext): BlockResult {
  const s = block.settings;
  const diagnostics: Diagnostic[] = [];
  const branches: Branch[] = [];
  const origins: number[] = [];
  const registry = new SpecialPointRegistry();
  const n = system.dimension;
  const result = (): Diagram => ({
    parameter: system.parameter,
    variables: [...system.variables],
    branches,
    bifurcations: registry.finish(),
    diagnostics,
    settings: { ...s },
    engineVersion: ENGINE_VERSION,
  });
  const width = Math.abs(s.to - s.from);
  const lo = Math.min(s.from, s.to);
  const hi = Math.max(s.from, s.to);
  let cancelled = false;
  let lastFraction = 0;
  const progress = (f: number, phrase: string) => {
    lastFraction = Math.max(lastFraction, Math.min(1, f));
    hooks.onProgress?.(lastFraction, phrase);
  };
  const isCancelled = () => {
    if (!cancelled && hooks.isCancelled?.()) cancelled = true;
    return cancelled;
  };
  const arcScale = block.arcScale;
  const copts: ContinuationOptions = {
    lo,
    hi,
    initialStep: s.initialStep * arcScale,
    minStep: s.minStep * arcScale,
    maxStep: s.maxStep * arcScale,
    maxParameterStep: s.maxParameterStep * width,
    maxTurn: s.maxTurn,
    maxPoints: Math.max(2, Math.floor(s.maxPointsPerBranch / 2)),
    stateBound: s.stateBound,
    residualTolerance: s.residualTolerance,
    stepTolerance: s.stepTolerance,
    maxCorrectorIterations: s.maxCorrectorIterations,
  };
  const index = new BranchIndex(Math.max(copts.maxParameterStep, 1e-12), n, copts.maxStep);
  const tasks: Task[] = block.starts.map((y0) => {
    const y = new Float64Array(n + 1);
    y.set(y0);
    y[n] = s.from;
    return { kind: 'start', y };
  });
  // Restricted starts: the near-uniform states at the far end of the sweep (farEndSeeds).
  for (const x of block.farEnd) {
    const y = new Float64Array(n + 1);
    y.set(x);
    y[n] = s.to;
    tasks.push({ kind: 'start', y });
  }
  // Interior seeds (the seed block of withSeedBlock): equilibria inside the sweep, y = [x, p].
  for (const y of block.seeds ?? []) tasks.push({ kind: 'start', y: Float64Array.from(y), seed: true });
  const farEndCount = block.farEnd.length;
  let done = 0;
  let pointsSinceProgress = 0;
  let branchCapHit = false;
  let neutralSaddles = 0;
  const ws = new BorderedWorkspace(n);
  const locOpts = { parameterTolerance: s.locateParameterTolerance, maxIterations: s.locateMaxIterations };
  const restriction = growthContext?.restriction;
  const starts = { points: block.starts };
  let coverage: StartCoverage | undefined;
  const growth = { values: 0, states: 0, integrations: 0, rounds: 0, stoppedBy: (restriction && s.growthIntegrations > 0 ? 'nothing-new' : 'off') as StartCoverage['grown']['stoppedBy'] };
  let untracedStarts = 0;


  for (;;) {
    while (tasks.length > 0) {
      if (isCancelled()) break;
      const task = tasks.shift()!;
      const frac = (k: number) => (done + k) / (done + tasks.length + 1);
      if (branches.length >= s.maxBranches) {
        if (!branchCapHit) diagnostics.push({ level: 'warning', code: 'branch-cap', message: `stopped at ${s.maxBranches} branches (maxBranches); ${tasks.length + 1} more were not traced` });
        branchCapHit = true;
        untracedStarts = tasks.filter((t) => t.kind === 'start').length + (task.kind === 'start' ? 1 : 0);
        break;
      }
      const id = `b${branches.length + 1}`;
      const bIndex = branches.length;
      let inserts: Insert[] = [];

      const onStep = (a: TracedPoint, b: TracedPoint) => {
        pointsSinceProgress++;
        if (pointsSinceProgress >= 200) {
          pointsSinceProgress = 0;
          progress(frac(0.5), `tracing branch ${id}`);
        }
        const kinds: TestFunctionKind[] = [];
        const bp = Number.isFinite(a.det) && Number.isFinite(b.det) && a.det * b.det < 0;
        if (bp) kinds.push('branch');
        if (a.t[n] * b.t[n] < 0 && !bp) kinds.push('fold');
        if (n >= 2 && Number.isFinite(a.hopf.value) && Number.isFinite(b.hopf.value) && a.hopf.value * b.hopf.value < 0) {
          // Two real eigenvalues summing through zero at both ends: a neutral saddle, never a Hopf point.
          if (a.hopf.critical?.kind === 'real-pair' && b.hopf.critical?.kind === 'real-pair') neutralSaddles++;
          else kinds.push('hopf');
        }
        // Two or more eigenvalues crossing zero at once (a symmetry-forced multiple zero eigenvalue)
        // leave det [DH; t] with its sign; only the unstable count shows it.
        // Only when no other test function explains the jump (a complex pair, or a fold and a branch
        // point in one step, also change the count by 2).
        if (Math.abs(b.unstable - a.unstable) >= 2 && kinds.length === 0) {
          try {
            handleMultipleCrossing(a, b);
          } catch (e) {
            diagnostics.push({ level: 'warning', code: 'locate-failed', message: `locating a multiple zero eigenvalue failed: ${errorText(e)}`, branch: id, p: a.y[n] });
          }
        }
        for (const kind of kinds) {
          try {
            handleSignChange(kind, a, b, a.t[n] * b.t[n] < 0);
          } catch (e) {
            diagnostics.push({ level: 'warning', code: 'locate-failed', message: `locating a ${kind} test-function zero failed: ${errorText(e)}`, branch: id, p: a.y[n] });
          }
        }
      };

      const handleMultipleCrossing = (a: TracedPoint, b: TracedPoint) => {
        const loc = locateCountChange(system, a, b, locOpts);
        const pt = loc.point;
        const k = Math.abs(b.unstable - a.unstable);
        registry.add({
          type: 'degenerate',
          p: pt.y[n],
          x: Array.from(pt.y.subarray(0, n)),
          branches: new Set([id]),
          evidence: {
            kind: 'multiple-zero',
            reason: `the unstable count changes by ${k} (${a.unstable} -> ${b.unstable}) with no sign change of the Hopf test: ${k} real eigenvalues cross zero together`,
            parameterBracket: loc.parameterBracket,
            iterations: loc.iterations,
            eigenvalues: Array.from(pt.spectrum.re, (re, i) => ({ re, im: pt.spectrum.im[i] })),
          },
          note: `${k} eigenvalues cross zero together (a multiple zero eigenvalue, typical of symmetric networks): several branches may meet here; the branch-point test does not change sign, so no branch switching was attempted`,
        });
        inserts.push({ after: a, point: pt });
      };

      const handleSignChange = (kind: TestFunctionKind, a: TracedPoint, b: TracedPoint, foldToo: boolean) => {
        // A branch that bends back at a branch point (a pitchfork's parabola) has t_p = 0 exactly there,
        // and t_p is a well-conditioned test function along it, unlike det near the singular point.
        const locKind: TestFunctionKind = kind === 'branch' && foldToo ? 'fold' : kind;
        const loc = locateZero(system, locKind, a, b, locOpts);
        const pt = loc.point;
        const p = pt.y[n];
        const x = Array.from(pt.y.subarray(0, n));
        if (!loc.converged && loc.parameterBracket >= 1e-10) {
          diagnostics.push({ level: 'warning', code: 'locate-not-converged', message: `${kind} test function: location stopped with a parameter bracket of ${loc.parameterBracket.toExponential(2)}${loc.interpolated ? ' (zero interpolated inside it)' : ''}`, branch: id, p });
        }
        const eig = Array.from(pt.spectrum.re, (re, i) => ({ re, im: pt.spectrum.im[i] }));
        const common = { iterations: loc.iterations, parameterBracket: loc.parameterBracket, testValue: loc.value, interpolated: loc.interpolated, eigenvalues: eig };
        if (kind === 'fold') {
          const zeros = nearZeroCount(pt.spectrum);
          const draft: SpecialPointDraft = {
            type: zeros >= 2 ? 'degenerate' : 'saddle-node',
            p,
            x,
            branches: new Set([id]),
            evidence: { kind: 'fold', reason: 'the parameter component of the branch tangent changes sign', tangentP: pt.t[n], zeroEigenvalues: zeros, ...common },
            ...(zeros >= 2 ? { note: `fold with ${zeros} eigenvalues near zero (double-zero eigenvalue: a fold meeting a Hopf or another fold)` } : {}),
          };
          registry.add(draft);
          inserts.push({ after: a, point: pt });
          return;
        }
        if (kind === 'hopf') {
          const c = pt.hopf.critical;
          const scale = spectralScale(pt.spectrum);
          if (c && c.kind === 'complex-pair' && c.im > 1e-6 * scale) {
            registry.add({
              type: 'hopf',
              p,
              x,
              branches: new Set([id]),
              frequency: c.im,
              evidence: { kind: 'hopf', reason: 'a complex-conjugate pair of eigenvalues crosses the imaginary axis', criticalRe: c.re, criticalIm: c.im, ...common },
            });
            inserts.push({ after: a, point: pt });
          } else {
            neutralSaddles++;
          }
          return;
        }
        // Branch point.
        const known = registry.findBranchPoint(p, x);
        if (known) {
          known.branches.add(id);
          // Keep the better-conditioned location: converged, narrower bracket, not interpolated.
          const ke = known.evidence as { parameterBracket?: number; interpolated?: boolean; converged?: boolean };
          const better = loc.converged && (!ke.converged || (ke.interpolated && !loc.interpolated) || (!!ke.interpolated === loc.interpolated && loc.parameterBracket < (ke.parameterBracket ?? Infinity)));
          if (better) {
            known.p = p;
            known.x = x;
            Object.assign(known.evidence, { ...common, converged: loc.converged, locatedOn: id, locatedBy: locKind });
          }
          inserts.push({ after: a, point: pt });
          return;
        }
        const sw = switchAtBranchPoint(system, pt.y, pt.t, { probeStep: s.switchStep * width });
        const draft: SpecialPointDraft = {
          type: sw.classification,
          p,
          x,
          branches: new Set([id]),
          evidence: {
            kind: 'branch-point',
            reason: sw.reason,
            singularValues: sw.singularValues.slice(0, 3),
            crossingVelocity: sw.crossing.velocity,
            tracedVelocity: sw.traced.velocity,
            crossingOddEven: [sw.crossing.odd, sw.crossing.even],
            tracedOddEven: [sw.traced.odd, sw.traced.even],
            foldTestChanged: foldToo,
            ...common,
            converged: loc.converged,
            locatedOn: id,
            locatedBy: locKind,
          },
          ...(sw.classification === 'degenerate' ? { note: sw.reason } : {}),
        };
        registry.add(draft);
        inserts.push({ after: a, point: pt });
        if (sw.ok && sw.crossing.plus && sw.crossing.minus) {
          // Crossing branch already traced (e.g. from its own starting equilibrium): nothing to switch to.
          const tol = 1e-7 * (1 + normInf(pt.y)) + 0.05 * copts.maxStep;
          const onPlus = index.findParallel(sw.crossing.plus, sw.plusTangent ?? sw.across, tol, () => false);
          const onMinus = index.findParallel(sw.crossing.minus, sw.minusTangent ?? sw.across, tol, () => false);
          if (onPlus && onMinus) {
            draft.branches.add(branchId(index.lists[onPlus.list].branch));
            draft.branches.add(branchId(index.lists[onMinus.list].branch));
            return;
          }
        }
        if (!sw.ok) {
          diagnostics.push({ level: 'warning', code: 'switch-failed', message: `branch point found but the crossing branch could not be computed: ${sw.reason}`, branch: id, p });
          return;
        }
        tasks.push({ kind: 'switch', from: id, draft, yStar: pt.y, across: sw.across, plus: sw.crossing.plus, minus: sw.crossing.minus, plusT: sw.plusTangent, minusT: sw.minusTangent, plusDet: sw.plusDet, minusDet: sw.minusDet });
      };

      const runDirection = (y: Float64Array, t: Float64Array, det: number): { points: TracedPoint[]; end: DirectionEnd; inserts: Insert[] } => {
        const list = index.addList(bIndex);
        inserts = [];
        const startY = y;
        const mergeTol = (a: TracedPoint, b: TracedPoint) => 1e-7 * (1 + normInf(b.y)) + 0.05 * dist2(a.y, b.y);
        let prev: TracedPoint | null = null;
        let lastPushed: TracedPoint | null = null;
        const r = continueBranch(system, y, t, det, copts, {
          onStep: (a, b) => {
            prev = a;
            onStep(a, b);
            // Once its step is examined, a point's spectrum is needed again only when eigenvalues are
            // stored: dropping it here keeps the points of the branch being traced small (they live
            // until the branch ends, so they outlast the young generation; garbage collection was
            // ~30 % of the 6-node trace, docs/numerics.md §11). Located points keep theirs.
            if (!s.storeEigenvalues) releaseSpectrum(a);
          },
          stopAt: (b, idx, arc) => {
            const a = prev!;
            if (idx === 1) index.push(list, a);
            index.push(list, b);
            lastPushed = b;
            const tol = mergeTol(a, b);
            const hit = index.findParallel(b.y, b.t, tol, (l) => l === list || (index.lists[l].branch === bIndex && arc < 4 * copts.maxStep));
            if (hit) return index.lists[hit.list].branch === bIndex ? 'closed-loop' : 'merged';
            if (idx > 10 && arc > 4 * copts.maxStep && dist2(b.y, startY) < Math.max(tol, 0.5 * dist2(a.y, b.y))) return 'closed-loop';
            return null;
          },
          isCancelled,
        });
        // Points the hook did not see (the start of a one-point direction, the end on a sweep bound).
        const last = r.points[r.points.length - 1];
        if (lastPushed === null) for (const q of r.points) index.push(list, q);
        else if (last !== lastPushed) index.push(list, last);
        return { points: r.points, end: r.end, inserts };
      };

      let plusPts: TracedPoint[] = [];
      let minusPts: TracedPoint[] = [];
      let ends: [BranchEnd, BranchEnd] = ['sweep-bound', 'sweep-bound'];
      let origin: Branch['origin'];
      let ordered: TracedPoint[] = [];
      let originAt = 0;
      try {
        if (task.kind === 'start') {
          if (index.hasPoint(task.y, 1e-6 * (1 + normInf(task.y)))) {
            done++;
            continue;
          }
          origin = { kind: 'start' };
          const ns = nullSpace(system, task.y, ws);
          if (ns.vectors.length === 0) {
            diagnostics.push({ level: 'warning', code: 'start-non-finite', message: `Jacobian not finite at a starting equilibrium`, p: s.from });
            done++;
            continue;
          }
          let v = ns.vectors[0];
          const smax = ns.singularValues[ns.singularValues.length - 1] || 1;
          if (ns.singularValues.length >= 2 && ns.singularValues[1] < 1e-8 * smax) {
            diagnostics.push({ level: 'warning', code: 'singular-start', message: `starting equilibrium x = [${fmt(task.y.subarray(0, n))}] is a branch point (two-dimensional null space of [J_x | F_p]); traced along one direction only`, p: s.from });
          }
          const dir = s.to >= s.from ? 1 : -1;
          if (v[n] * dir < 0 || (v[n] === 0 && false)) v = v.map((q) => -q);
          const tan = tangentAt(system, task.y, v, ws);
          const t0 = tan.ok ? tan.tangent : v;
          // A seed inside the sweep lies between the points of a branch traced from another seed.
          if (task.seed && index.findParallel(task.y, t0, 1e-7 * (1 + normInf(task.y)) + 0.05 * copts.maxStep, () => false)) {
            done++;
            continue;
          }
          const sp = pointData(system, task.y, t0, tan.determinant, ws);
          if (nearZeroCount(sp.spectrum, 1e-9) > 0) {
            diagnostics.push({ level: 'info', code: 'singular-start', message: `J_x is singular at the starting equilibrium x = [${fmt(task.y.subarray(0, n))}] (a special point sits on the sweep bound; it is not reported)`, p: s.from });
          }
          const fw = runDirection(task.y, t0, tan.determinant);
          const bw = runDirection(task.y, t0.map((q) => -q), -tan.determinant);
          ends = [bw.end === 'cancelled' ? 'point-cap' : bw.end, fw.end === 'cancelled' ? 'point-cap' : fw.end];
          const back = withInserts(bw.points, bw.inserts);
          originAt = back.length - 1;
          ordered = back.reverse().slice(0, -1).concat(withInserts(fw.points, fw.inserts));
        } else {
          if (task.plus && task.minus) {
            // Traced meanwhile from a starting equilibrium? Then the branch point just gains that branch.
            const tol = 1e-7 * (1 + normInf(task.yStar)) + 0.05 * copts.maxStep;
            const onPlus = index.findParallel(task.plus, task.plusT ?? task.across, tol, () => false);
            const onMinus = index.findParallel(task.minus, task.minusT ?? task.across, tol, () => false);
            if (onPlus && onMinus) {
              task.draft.branches.add(branchId(index.lists[onPlus.list].branch));
              task.draft.branches.add(branchId(index.lists[onMinus.list].branch));
              done++;
              continue;
            }
          }
          origin = { kind: 'switch', from: task.from };
          task.draft.branches.add(id);
          const star = pointData(system, task.yStar, task.across, Number.NaN, ws);
          let fEnd: DirectionEnd = 'newton-failure';
          let bEnd: DirectionEnd = 'newton-failure';
          if (task.plus && task.plusT) {
            const fw = runDirection(task.plus, task.plusT, task.plusDet);
            plusPts = withInserts(fw.points, fw.inserts);
            fEnd = fw.end;
          }
          if (task.minus && task.minusT) {
            const bw = runDirection(task.minus, task.minusT, task.minusDet);
            minusPts = withInserts(bw.points, bw.inserts);
            bEnd = bw.end;
          }
          ends = [bEnd === 'cancelled' ? 'point-cap' : bEnd, fEnd === 'cancelled' ? 'point-cap' : fEnd];
          originAt = minusPts.length;
          ordered = minusPts.reverse().concat([star], plusPts);
        }
      } catch (e) {
        diagnostics.push({ level: 'error', code: 'branch-failed', message: `tracing stopped by an unexpected error: ${errorText(e)}`, branch: id });
        done++;
        continue;
      }
      branches.push({
        id,
        points: ordered.map((q) => toBranchPoint(q, n, s.storeEigenvalues)),
        origin: origin!,
        ends,
      });
      origins.push(originAt);
      for (const e of ends) {
        if (e === 'step-collapse' || e === 'newton-failure' || e === 'point-cap' || e === 'state-bound') {
          const msg: Record<string, string> = {
            'step-collapse': 'the step size fell below the minimum (the branch may end in a singularity or leave the domain of the rates)',
            'newton-failure': 'the corrector failed repeatedly',
            'point-cap': `the point cap was reached (${copts.maxPoints} points per direction, maxPointsPerBranch = ${s.maxPointsPerBranch})`,
            'state-bound': `the state left the box |x| <= ${s.stateBound}`,
          };
          if (!cancelled) diagnostics.push({ level: 'warning', code: e, message: `branch ${id} stopped: ${msg[e]}`, branch: id });
        }
      }
      done++;
      progress(frac(0), `traced branch ${id}`);
    }
    // Restricted starts: grow the set from the start state's escape graph (docs/numerics.md §12).
    if (!restriction || growth.stoppedBy === 'off') break;
    if (branchCapHit) { growth.stoppedBy = 'branch-cap'; break; }
    if (cancelled || isCancelled()) { growth.stoppedBy = 'cancelled'; break; }
    if (tasks.length > 0) break;
    if (growth.rounds >= 3) { growth.stoppedBy = 'round-cap'; break; }
    const room = Math.min(restriction.budget, s.maxStartingPoints) - starts.points.length - farEndCount - growth.states;
    const left = s.growthIntegrations - growth.integrations;
    if (room <= 0) { growth.stoppedBy = 'start-budget'; break; }
    if (left <= 0) { growth.stoppedBy = 'integration-cap'; break; }
    progress(done / (done + 1), 'following the start state\'s escape graph');
    let round;
    try {
      round = growthRound(system, result(), {
        from: s.from,
        to: s.to,
        values: s.growthValues,
        integrations: left,
        maxStates: room,
        isTraced: (x, p) => {
          const y = new Float64Array(n + 1);
          y.set(x);
          y[n] = p;
          return index.hasPoint(y, 1e-6 * (1 + normInf(y)));
        },
        isCancelled,
      });
    } catch (e) {
      diagnostics.push({ level: 'warning', code: 'growth-failed', message: `following the start state's escape graph stopped by an unexpected error: ${errorText(e)}` });
      growth.stoppedBy = 'failed';
      break;
    }
    growth.rounds++;
    growth.values = Math.max(growth.values, round.values);
    growth.integrations += round.integrations;
    growth.states += round.found.length;
    for (const f of round.found) {
      const y = new Float64Array(n + 1);
      y.set(f.x);
      y[n] = f.p;
      tasks.push({ kind: 'start', y });
    }
    if (round.found.length > 0) {
      diagnostics.push({ level: 'info', code: 'start-grown', message: `the start state's escape graph reached ${round.found.length} stable state${round.found.length === 1 ? '' : 's'} no traced branch passed through (at ${system.parameter} = ${[...new Set(round.found.map((f) => fmt([f.p])))].join(', ')}); ${round.found.length === 1 ? 'its branch was' : 'their branches were'} traced too` });
    }
    if (round.stoppedBy !== 'found') {
      growth.stoppedBy = round.stoppedBy;
      if (round.found.length === 0) break;
    }
  }
  if (restriction) coverage = coverageOf(restriction, starts.points.length, farEndCount, s.to, restriction.budget, growth, untracedStarts, system.parameter);
  if (!cancelled) progress(1, 'block done');
  return {
    block: block.index,
    branches,
    origins,
    specialPoints: registry.items.map((d) => ({ ...d, branches: [...d.branches] })),
    diagnostics,
    neutralSaddles,
    cancelled,
    branchCapHit,
    ...(coverage ? { coverage } : {}),
  };
}

/** The plain statement of what a restricted trace started from (Diagram.coverage). */
function coverageOf(r: StartRestriction, startCount: number, farEnd: number, to: number, budget: number, grown: StartCoverage['grown'], untraced: number, parameter: string): StartCoverage {
  const k = r.maxOffBase;
  const c = r.counts;
  const near = c.nearAllTipped > 1 ? `, all-tipped and its ${formatCount(c.nearAllTipped - 1)} neighbouring saddles` : c.nearAllTipped === 1 ? ', all-tipped' : '';
  const capped = r.patterns < c.total ? ` (cut to the budget of ${formatCount(budget)})` : '';
  let text = `branches through patterns with at most ${k} node${k === 1 ? '' : 's'} off base (tipped or at the threshold; ${formatCount(c.withinK)} patterns, ${formatCount(c.stable)} of them stable at zero coupling)${near}: ${formatCount(r.patterns)} of ${r.of} patterns${capped}`;
  if (farEnd > 0) text += `; ${farEnd} near-uniform state${farEnd === 1 ? '' : 's'} at ${parameter} = ${fmt([to])}`;
  const why: Record<StartCoverage['grown']['stoppedBy'], string> = {
    'nothing-new': 'nothing new was reached',
    'start-budget': 'the start budget was spent',
    'integration-cap': `the cap of integrations (growthIntegrations) was reached`,
    'round-cap': 'three rounds were done',
    'branch-cap': 'the branch cap was reached',
    'not-bistable': 'not every element is bistable, so there is no start state',
    'no-start-state': 'no all-base stable state was found',
    cancelled: 'the trace was cancelled',
    failed: 'an unexpected error stopped it (growth-failed)',
    off: 'growth is off',
  };
  if (grown.stoppedBy === 'off') text += '; the start state\'s escape graph was not followed (growthIntegrations 0)';
  else if (grown.rounds === 0 && grown.stoppedBy === 'start-budget') text += '; the start budget left no room for states from the start state\'s escape graph';
  else text += `; following the start state's escape graph at ${grown.values} value${grown.values === 1 ? '' : 's'} of ${parameter} added ${grown.states} stable state${grown.states === 1 ? '' : 's'} (${grown.integrations} integrations; stopped because ${why[grown.stoppedBy]})`;
  if (untraced > 0) text += `; ${formatCount(untraced)} starts were not traced (branch cap, maxBranches)`;
  text += '. Branches through no selected pattern are missing unless switching or growth reached them.';
  return {
    mode: 'restricted',
    maxOffBase: k,
    patterns: { withinK: c.withinK, stable: c.stable, nearAllTipped: c.nearAllTipped },
    starts: startCount,
    farEnd,
    of: r.of,
    ofCount: r.ofCount,
    budget,
    grown: { ...grown },
    untraced,
    text,
  };
}

function branchId(index: number): string {
  return `b${index + 1}`;
}

function withInserts(points: TracedPoint[], inserts: Insert[]): TracedPoint[] {
  if (inserts.length === 0) return points;
  const byAfter = new Map<TracedPoint, Insert[]>();
  for (const i of inserts) {
    const l = byAfter.get(i.after);
    if (l) l.push(i);
    else byAfter.set(i.after, [i]);
  }
  const out: TracedPoint[] = [];
  for (const q of points) {
    out.push(q);
    const here = byAfter.get(q);
    if (!here) continue;
    here.sort((u, v) => dist2(u.point.y, q.y) - dist2(v.point.y, q.y));
    for (const i of here) out.push(i.point);
  }
  return out;
}

const releasedSpectrum = Object.freeze({ re: new Float64Array(0), im: new Float64Array(0), ok: true });

/** Drops the spectrum of a traced point whose step has been examined (see runDirection); unstable, det, t, y stay. */
function releaseSpectrum(q: TracedPoint): void {
  const w = q as { spectrum: TracedPoint['spectrum']; hopf: TracedPoint['hopf'] };
  w.spectrum = releasedSpectrum;
  w.hopf = { value: q.hopf.value, critical: null };
}

function toBranchPoint(q: TracedPoint, n: number, withEig: boolean): BranchPoint {
  // A plain loop: a subarray view plus Array.from per point cost more than the copy itself.
  const x: number[] = [];
  for (let i = 0; i < n; i++) x.push(q.y[i]);
  const bp: BranchPoint = { p: q.y[n], x, unstable: q.unstable };
  if (withEig) return { ...bp, eigenvalues: Array.from(q.spectrum.re, (re, i) => ({ re, im: q.spectrum.im[i] })) };
  return bp;
}

function checkSettings(s: ResolvedTraceSettings): string | null {
  if (!Number.isFinite(s.from)) return 'settings.from must be a finite number';
  if (!Number.isFinite(s.to)) return 'settings.to must be a finite number';
  if (s.from === s.to) return 'settings.from and settings.to must differ';
  const positive: (keyof ResolvedTraceSettings)[] = ['initialStep', 'minStep', 'maxStep', 'maxParameterStep', 'maxTurn', 'maxPointsPerBranch', 'maxBranches', 'maxStartCombinations', 'maxStartingPoints', 'residualTolerance', 'stepTolerance', 'maxCorrectorIterations', 'locateParameterTolerance', 'locateMaxIterations', 'stateBound', 'rootSearchBound', 'rootSearchCells', 'multiStartBox', 'switchStep'];
  for (const k of positive) {
    const v = s[k];
    if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) return `settings.${k} must be a positive finite number`;
  }
  if (!(s.minStep <= s.initialStep && s.initialStep <= s.maxStep)) return 'settings: need minStep <= initialStep <= maxStep';
  if (!Number.isInteger(s.multiStartCount) || s.multiStartCount < 0) return 'settings.multiStartCount must be a non-negative integer';
  if (s.startSelection !== 'auto' && s.startSelection !== 'restricted') return "settings.startSelection must be 'auto' or 'restricted'";
  if (!Number.isInteger(s.startBudget) || s.startBudget < 2) return 'settings.startBudget must be an integer of at least 2';
  if (!Number.isInteger(s.growthIntegrations) || s.growthIntegrations < 0) return 'settings.growthIntegrations must be a non-negative integer';
  if (!Number.isInteger(s.growthValues) || s.growthValues < 0) return 'settings.growthValues must be a non-negative integer';
  if (!Number.isInteger(s.interiorSeedValues) || s.interiorSeedValues < 0 || s.interiorSeedValues > 64) return 'settings.interiorSeedValues must be an integer from 0 to 64';
  if (s.traceBlocks !== 'auto' && !(Number.isInteger(s.traceBlocks) && s.traceBlocks >= 1 && s.traceBlocks <= 1024)) return "settings.traceBlocks must be 'auto' or an integer from 1 to 1024";
  return null;
}

function stripUndefined<T extends object>(o: T): Partial<T> {
  const out: Partial<T> = {};
  for (const [k, v] of Object.entries(o)) if (v !== undefined) (out as Record<string, unknown>)[k] = v;
  return out;
}

function fmt(a: ArrayLike<number>): string {
  return Array.from(a, (v) => v.toPrecision(6)).join(', ');
}

function errorText(e: unknown): string {
  return e instanceof Error ? e.message : String(e);
}
