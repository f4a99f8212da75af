import type { CompiledSystem } from '../model/compiled-system';
import type { Diagnostic, Diagram, SpecialPoint } from '../atlas/types';
import type { CrossoverKind, EscapeGraph, LocatedCrossover, NodeState, RegimeBand, SaddleEdge, StartState } from './types';
import { resolveOptions, type RegimeOptions } from './options';
import { elementRoles, fmt, stateRanges, type NodeRoles } from './element-roles';
import { buildEscapeGraph, maxDist } from './escape-graph';
import { changesEscapeGraph, cutName, cutPoints, type Cut } from './intervals';
import { mergeBands, type IntervalLabel } from './merge-bands';
import { isAll, progressOf } from './pattern';
import { listNames, patternWords } from './reason';
import { createLabeller, exitKind, exitName, type Labeller, type PointLabel } from './label-at';

export interface RegimeResult {
  readonly regimes: RegimeBand[];
  /** One full escape graph per band of the first start, in the middle of the band's first piece of unchanged reasons. */
  readonly escapeGraphs: EscapeGraph[];
  readonly diagnostics: Diagnostic[];
  /** Every located saddle connection and engagement crossover, in increasing p per start. */
  readonly crossovers: LocatedCrossover[];
  /**
   * Work done: labelled parameter values (and how many of them continued their equilibria from a
   * neighbour (acrossCuts: from the other side of a saddle-node cut), and how many tries at that
   * fell back to the diagram), manifold-branch integrations,
   * saddles ruled out without integrating, branches whose end the order decided (orderedLimit).
   */
  readonly work: { readonly points: number; readonly continued: number; readonly acrossCuts: number; readonly continuationFallbacks: number; readonly integrations: number; readonly skipped: number; readonly decided: number };
}

const MAX_DIAGNOSTICS = 60;

class BudgetExhausted extends Error {}

/** A stretch between two located edges with one label key (same label for the same reasons). */
interface Piece { from: number; to: number; fromBound: string; toBound: string; label: PointLabel }

/**
 * Coupling regimes along the diagram's parameter (docs/regimes.md). The label is a function of p
 * alone (createLabeller().labelAt); this function finds where it changes. [from, to] is cut at the
 * special points that can change the escape graph (exact edges). Inside each interval the label is
 * sampled (initialSamples equal pieces, halved where an exit's progress bends fast or may come near
 * the engagement threshold (movesFast), down to finestFraction of the interval); wherever two neighbouring samples differ in their label key, the change is bisected
 * to locateTolerance and named (saddle connection or engagement crossover). Bands are the maximal
 * runs of equal label. Never throws; work is capped by maxIntegrations.
 */
export function labelRegimes(system: CompiledSystem, diagram: Diagram, options?: Partial<RegimeOptions>): RegimeResult {
  const o = resolveOptions(options);
  const diagnostics: Diagnostic[] = [];
  const seen = new Set<string>();
  const note = (d: Diagnostic) => {
    const key = `${d.code}|${d.message}`;
    if (seen.has(key)) return;
    seen.add(key);
    diagnostics.push(d);
  };
  const n = system.dimension;
  const settings = diagram.settings ?? {};
  const from = o.from ?? (typeof settings.from === 'number' ? settings.from : system.sweep.from);
  const to = o.to ?? (typeof settings.to === 'number' ? settings.to : system.sweep.to);
  const starts: StartState[] = o.starts.includes('all-base') ? ['all-base', ...o.starts.filter((s) => s !== 'all-base')] : [...o.starts];
  const finish = (regimes: RegimeBand[], escapeGraphs: EscapeGraph[], crossovers: LocatedCrossover[], labeller: Labeller | null): RegimeResult => {
    if (diagnostics.length > MAX_DIAGNOSTICS) {
      const extra = diagnostics.length - MAX_DIAGNOSTICS;
      diagnostics.length = MAX_DIAGNOSTICS;
      diagnostics.push({ level: 'info', code: 'diagnostics-truncated', message: `${extra} further diagnostics were left out` });
    }
    return { regimes, escapeGraphs, diagnostics, crossovers, work: labeller ? { ...labeller.counts } : { points: 0, continued: 0, acrossCuts: 0, continuationFallbacks: 0, integrations: 0, skipped: 0, decided: 0 } };
  };

  if (!system.network && !o.roles) {
    note({ level: 'error', code: 'regimes-undefined',
      message: 'regimes undefined: the model is not a network of elements and no base, threshold and tipped roles were given' });
    return finish([], [], [], null);
  }
  const badBranch = diagram.branches.find((b) => b.points.some((q) => q.x.length !== n));
  if (badBranch) {
    note({ level: 'error', code: 'regimes-diagram-mismatch', branch: badBranch.id,
      message: `the diagram does not belong to this model: branch ${badBranch.id} has states of length ${badBranch.points.find((q) => q.x.length !== n)!.x.length}, the model has ${n} variables` });
    return finish([], [], [], null);
  }
  if (o.roles !== undefined || system.network?.sweepIsCoupling === true) {
    // Roles that do not depend on p: an element that is not bistable leaves the whole range unlabelled.
    const r = elementRoles(system, from, stateRanges(diagram, n), o.scanPoints, o.roles);
    r.diagnostics.forEach(note);
    if (r.roles.some((x) => x === null)) return finish([], [], [], null);
  }

  let ignored = 0;
  const cuts = cutPoints(diagram, from, to, 1e-9, (sp) => {
    if (o.allCuts || changesEscapeGraph(system, sp)) return true;
    ignored++;
    return false;
  });
  if (ignored > 0) {
    note({ level: 'info', code: 'cuts-ignored',
      message: `${ignored} of ${diagram.bifurcations.length} special points join only equilibria with two or more unstable eigenvalues; they cannot change the escape graph and do not cut the bands` });
  }
  const labelIntervals = (labeller: Labeller) => o.mergeCuts ? labelMerged(labeller) : labelEveryInterval(labeller);
  // Across cuts that cannot change the label (docs/regimes.md, "Cuts that cannot change a label").
  const labelMerged = (labeller: Labeller) => {
    const pieces = new Map<StartState, Piece[]>(starts.map((s) => [s, []]));
    const crossovers: LocatedCrossover[] = [];
    let exhaustedAt: number | null = null;
    const sides = foldSides(diagram);
    const spanOf = (p: number): readonly [number, number] => {
      let lo = 0;
      let hi = cuts.length - 1;
      while (hi - lo > 1) {
        const m = (lo + hi) >> 1;
        if (cuts[m].p <= p) lo = m; else hi = m;
      }
      return [cuts[lo].p, cuts[hi].p];
    };
    const range = Math.abs(to - from);
    for (const start of starts) {
      let k = 0;
      try {
        while (k + 1 < cuts.length) {
          const a = cuts[k];
          const w0 = cuts[k + 1].p - a.p;
          if (w0 < o.minimumInterval) { k++; continue; }
          const first = labeller.labelAt(a.p + Math.min(o.cutOffset * (1 + Math.abs(a.p)), 0.01 * w0), start, spanOf(a.p + 0.5 * w0));
          if (first.truncated) throw new BudgetExhausted();
          // Predicted from the first label: cuts where equilibria go away (their side is below). A cut
          // where they appear is judged by the label above it, which this one cannot stand for.
          let j = k + 1;
          while (j + 1 < cuts.length && cuts[j].points.every((sp) => sides.get(sp.id) === -1) && passable(cuts[j], sides, () => first)) j++;
          // A cut found not passable after sampling ends the interval there; the samples before it are
          // kept (the same initial grid up to that cut), so the retry costs about one new label.
          let interior: number[] | undefined;
          for (;;) {
            const found = locateInterval(labeller, a, cuts[j], start, { spanOf, range, intervals: j - k, interior });
            let bad = -1;
            for (let m = k + 1; m < j && bad < 0; m++) {
              const c = cuts[m];
              const beside = (sp: SpecialPoint) => nearestOnSide(found.seen, c.p, sides.get(sp.id)!);
              if (!passable(c, sides, beside)) bad = m;
            }
            if (bad < 0) {
              pieces.get(start)!.push(...found.pieces);
              crossovers.push(...found.crossovers);
              break;
            }
            j = bad;
            interior = found.interior;
          }
          k = j;
          if (labeller.orderBroken && labeller.counts.decided > 0) return null;
        }
      } catch (e) {
        if (!(e instanceof BudgetExhausted)) throw e;
        exhaustedAt = exhaustedAt === null ? cuts[k].p : Math.min(exhaustedAt, cuts[k].p);
      }
    }
    crossovers.sort((u, v) => (u.start === v.start ? u.p - v.p : starts.indexOf(u.start) - starts.indexOf(v.start)));
    return { pieces, crossovers, exhaustedAt };
  };
  const labelEveryInterval = (labeller: Labeller) => {
    const pieces = new Map<StartState, Piece[]>(starts.map((s) => [s, []]));
    const crossovers: LocatedCrossover[] = [];
    let exhaustedAt: number | null = null;
    for (let k = 0; k + 1 < cuts.length; k++) {
      const a = cuts[k];
      const b = cuts[k + 1];
      if (b.p - a.p < o.minimumInterval) continue;
      const found: { start: StartState; pieces: Piece[]; crossovers: LocatedCrossover[] }[] = [];
      try {
        for (const start of starts) found.push({ start, ...locateInterval(labeller, a, b, start) });
      } catch (e) {
        if (!(e instanceof BudgetExhausted)) throw e;
        exhaustedAt = a.p;
        break;
      }
      for (const f of found) {
        pieces.get(f.start)!.push(...f.pieces);
        crossovers.push(...f.crossovers);
      }
      // Labels so far rest on branch ends decided by order, which a check has just found unreliable
      // for this diagram: stop, the caller starts again integrating every branch.
      if (labeller.orderBroken && labeller.counts.decided > 0) return null;
    }
    return { pieces, crossovers, exhaustedAt };
  };
  let labeller = createLabeller(system, diagram, o, note);
  let done = labelIntervals(labeller);
  if (!done) {
    note({ level: 'info', code: 'order-off',
      message: 'the order of the equilibria did not decide manifold branch ends reliably for this diagram (see the warnings); the bands were labelled again integrating every branch' });
    labeller = createLabeller(system, diagram, { ...o, orderedLimits: false }, note);
    done = labelIntervals(labeller)!;
  }
  const { pieces, crossovers, exhaustedAt } = done;
  if (exhaustedAt !== null) {
    note({ level: 'warning', code: 'regimes-budget', p: exhaustedAt,
      message: `the cap of ${o.maxIntegrations} manifold integrations was reached in the interval from ${system.parameter} = ${fmt(exhaustedAt)}; it and the later ones are not labelled (raise maxIntegrations for larger networks)` });
  }

  const regimes = starts.flatMap((s) => mergeBands(pieces.get(s)!.map((q): IntervalLabel => ({
    from: q.from, to: q.to, fromBound: q.fromBound, toBound: q.toBound, regime: q.label.regime, reason: q.label.reason, start: s,
    exits: q.label.exits.map((e) => ({ saddle: e.saddle.slice(), engaged: e.engaged.slice(), tipping: e.tipping.slice(), destination: e.destination.slice(), kind: exitKind(e, n), ...(e.via ? { via: e.via } : {}) })),
    exitsAt: q.label.p,
  }))));
  const escapeGraphs = o.escapeGraphs ? graphsOfPieces(system, labeller, pieces.get(starts[0])!, starts, note) : [];
  return finish(regimes, escapeGraphs, crossovers, labeller);
}

/**
 * Where the two equilibria of each saddle-node exist: on the side of its parameter value where the
 * branch through it has its points near the fold (a fold turns the branch back, Kuznetsov, Elements
 * of Applied Bifurcation Theory, 3rd ed., section 3.3). -1: below, +1: above; other special points,
 * and folds whose side the points do not tell, are left out.
 */
function foldSides(diagram: Diagram): Map<string, -1 | 1> {
  const sides = new Map<string, -1 | 1>();
  const byId = new Map(diagram.branches.map((b) => [b.id, b]));
  for (const sp of diagram.bifurcations) {
    if (sp.type !== 'saddle-node') continue;
    const b = byId.get(sp.branches[0]);
    if (!b) continue;
    let best = Infinity;
    let side = 0;
    for (const q of b.points) {
      if (q.p === sp.p) continue;
      const d = maxDist(q.x, sp.x);
      if (d < best) { best = d; side = Math.sign(q.p - sp.p); }
    }
    if (side !== 0) sides.set(sp.id, side as -1 | 1);
  }
  return sides;
}

/** The sampled label nearest to p on the given side of it (or undefined). */
function nearestOnSide(seen: readonly PointLabel[], p: number, side: -1 | 1): PointLabel | undefined {
  let best: PointLabel | undefined;
  for (const l of seen) if ((l.p - p) * side > 0 && (!best || Math.abs(l.p - p) < Math.abs(best.p - p))) best = l;
  return best;
}

/**
 * Whether a cut cannot change the label: every special point of it that joins an equilibrium with
 * fewer than two unstable eigenvalues is a saddle-node with a known side, and the label beside it on
 * that side (where its two equilibria exist) rests on none of the branches through it. A label is a
 * function of the start state, its exit saddles and their destinations (docs/regimes.md, "The rule");
 * a saddle-node that takes away or brings two other equilibria leaves all of these in place and
 * moving smoothly, so the label is the same on both sides (docs/regimes.md, "Cuts that cannot change
 * a label", for the non-generic cases this passes over).
 */
function passable(c: Cut, sides: ReadonlyMap<string, -1 | 1>, beside: (sp: SpecialPoint) => PointLabel | undefined): boolean {
  if (c.points.length === 0) return false;
  for (const sp of c.points) {
    if (sp.type !== 'saddle-node' || !sides.has(sp.id)) return false;
    const l = beside(sp);
    if (!l || l.regime === null || !l.restsOn) return false;
    if (sp.branches.some((id) => l.restsOn!.includes(id))) return false;
  }
  return true;
}

/**
 * Sample, refine and bisect one interval between cuts (see labelRegimes). `merged`: the interval
 * runs over cuts that cannot change the label; each label is asked for with the span between cuts
 * that holds it, and the interval is first cut into pieces of at most maxSampleSpacing of the range.
 */
function locateInterval(labeller: Labeller, a: Cut, b: Cut, start: StartState, merged?: { spanOf: (p: number) => readonly [number, number]; range: number; intervals: number; interior?: readonly number[] }): { pieces: Piece[]; crossovers: LocatedCrossover[]; seen: PointLabel[]; interior: number[] } {
  const o = labeller.options;
  const w = b.p - a.p;
  const span = [a.p, b.p] as const;
  const seen: PointLabel[] = [];
  const at = (p: number) => {
    const l = labeller.labelAt(p, start, merged ? merged.spanOf(p) : span);
    if (l.truncated) throw new BudgetExhausted();
    seen.push(l);
    return l;
  };
  // A piece's label (same key throughout): the sampled one nearest the piece's middle, so that the
  // exits shown for it are taken inside the piece, not 1e-7 from a cut.
  const central = (from: number, to: number, fallback: PointLabel): PointLabel => {
    const mid = 0.5 * (from + to);
    let best = fallback;
    for (const l of seen) if (l.key === fallback.key && l.p >= from && l.p <= to && Math.abs(l.p - mid) < Math.abs(best.p - mid)) best = l;
    return best;
  };
  const inA = a.p + Math.min(o.cutOffset * (1 + Math.abs(a.p)), 0.01 * w);
  const inB = b.p - Math.min(o.cutOffset * (1 + Math.abs(b.p)), 0.01 * w);
  const grid = [inA];
  if (merged?.interior) grid.push(...merged.interior.filter((q) => q > inA && q < inB));
  else {
    // Merged: never more samples than the intervals would have had one by one.
    const spacing = merged && merged.intervals > 1 ? o.maxSampleSpacing * merged.range : Infinity;
    const count = Math.min(o.initialSamples * (merged?.intervals ?? 1), Math.max(o.initialSamples, Math.ceil(w / spacing)));
    for (let k = 1; k < count; k++) grid.push(a.p + (w * k) / count);
  }
  grid.push(inB);
  const samples = grid.map(at);
  const finest = o.finestFraction * w / (merged?.intervals ?? 1);
  const events: { left: PointLabel; right: PointLabel }[] = [];

  const midLabel = (l: PointLabel, r: PointLabel): PointLabel => {
    let m = at(0.5 * (l.p + r.p));
    // An exit branch passing right through another saddle (at a saddle connection) may settle there:
    // step aside a little rather than report a spurious gap.
    for (const f of [0.37, 0.63]) {
      if (m.key !== 'none:unresolved' || l.key === m.key || r.key === m.key) break;
      m = at(l.p + f * (r.p - l.p));
    }
    return m;
  };
  // Points placed on both sides of a located engagement root, with the node whose progress sits at
  // the threshold there: that node's nearness to the threshold at that end is the root itself, not a
  // sign of another crossover (movesFast leaves it out).
  const anchored = new Map<number, number>();
  const refine = (l: PointLabel, r: PointLabel) => {
    if (l.key !== r.key) {
      if (r.p - l.p <= o.locateTolerance) { events.push({ left: l, right: r }); return; }
      const root = engagementRoot(labeller, l, r, start);
      const h = 0.45 * o.locateTolerance;
      if (root && root.p - h > l.p && root.p + h < r.p) {
        // Full labels on both sides of the root, 0.9 locateTolerance apart: the bracket that the
        // bisection would have ended with, reached in a few Newton steps on one saddle instead.
        const la = at(root.p - h);
        const lb = at(root.p + h);
        anchored.set(la.p, root.node);
        anchored.set(lb.p, root.node);
        refine(l, la);
        refine(la, lb);
        refine(lb, r);
        return;
      }
      const m = midLabel(l, r);
      refine(l, m);
      refine(m, r);
      return;
    }
    if (r.p - l.p > finest && movesFast(l, r, o.progressStep, o.engagedProgress, anchored.get(l.p), anchored.get(r.p))) {
      const m = midLabel(l, r);
      refine(l, m);
      refine(m, r);
    }
  };
  for (let k = 0; k + 1 < samples.length; k++) refine(samples[k], samples[k + 1]);

  const pieces: Piece[] = [];
  const crossovers: LocatedCrossover[] = [];
  let lo = a.p;
  let loBound = cutName(a);
  for (const e of events) {
    const c = describeCrossover(e.left, e.right, labeller.names, start);
    crossovers.push(c);
    pieces.push({ from: lo, to: c.p, fromBound: loBound, toBound: c.description, label: central(lo, c.p, e.left) });
    lo = c.p;
    loBound = c.description;
  }
  pieces.push({ from: lo, to: b.p, fromBound: loBound, toBound: cutName(b), label: central(lo, b.p, events.length ? events[events.length - 1].right : samples[0]) });
  return { pieces, crossovers, seen, interior: grid.slice(1, -1) };
}

/**
 * Whether a piece [l, r] with one label key must be halved. Per exit and node, the progress s(p) is
 * modelled by the cubic Hermite interpolant H of its values and slopes at l and r (slopes from the
 * implicit function theorem, Exit.slope), and e = max |H - secant| at t = 1/4, 1/2, 3/4 estimates how
 * far s can be from a straight line there (common practice, no source: the Hermite-minus-secant
 * difference as an error indicator). Halve when e > step (the progress moves fast and bends), or when
 * H or an end comes within e of the engagement threshold (a crossover could hide inside).
 * Without slopes, |s(r) - s(l)| stands in for e. An end placed at a located engagement root of node
 * i (anchoredLeft / anchoredRight = i) does not count as near the threshold for node i.
 */
function movesFast(l: PointLabel, r: PointLabel, step: number, engaged: number, anchoredLeft?: number, anchoredRight?: number): boolean {
  if (l.exits.length !== r.exits.length) return false;
  // A moving edge state's snapshot is not a smooth function of p (it is one point of a moving set).
  if (l.exits.some((e) => e.via) || r.exits.some((e) => e.via)) return false;
  const el = sortedExits(l);
  const er = sortedExits(r);
  const h = r.p - l.p;
  for (let k = 0; k < el.length; k++) {
    const a = el[k];
    const b = er[k];
    for (let i = 0; i < a.progress.length; i++) {
      const s0 = a.progress[i];
      const s1 = b.progress[i];
      const values: number[] = [];
      if (anchoredLeft !== i) values.push(s0);
      if (anchoredRight !== i) values.push(s1);
      let e = Math.abs(s1 - s0);
      if (a.slope && b.slope) {
        e = 0;
        const d0 = a.slope[i] * h;
        const d1 = b.slope[i] * h;
        for (const t of [0.25, 0.5, 0.75]) {
          const t2 = t * t;
          const t3 = t2 * t;
          const hv = (2 * t3 - 3 * t2 + 1) * s0 + (t3 - 2 * t2 + t) * d0 + (-2 * t3 + 3 * t2) * s1 + (t3 - t2) * d1;
          e = Math.max(e, Math.abs(hv - (s0 + t * (s1 - s0))));
          values.push(hv);
        }
      }
      if (e > step) return true;
      if (values.some((v) => Math.abs(v - engaged) < e)) return true;
    }
  }
  return false;
}

/** A label's exits sorted by key (keyOf), once per label: movesFast compares every neighbouring pair. */
const sortedCache = new WeakMap<PointLabel, PointLabel['exits'][number][]>();
function sortedExits(l: PointLabel): PointLabel['exits'][number][] {
  let hit = sortedCache.get(l);
  if (!hit) {
    const keys = new Map(l.exits.map((e) => [e, keyOf(e)]));
    hit = [...l.exits].sort((u, v) => keys.get(u)!.localeCompare(keys.get(v)!));
    sortedCache.set(l, hit);
  }
  return hit;
}

/** Index of the exit whose saddle is nearest `saddle` (max norm) among those not in `used`; -1 when none. */
function nearestUnused(exits: readonly PointLabel['exits'][number][], saddle: readonly number[], used: ReadonlySet<number>): number {
  let best = -1;
  let bestD = Infinity;
  exits.forEach((e, k) => {
    const d = maxDist(e.saddle, saddle);
    if (!used.has(k) && d < bestD) { bestD = d; best = k; }
  });
  return best;
}

const keyOf = (e: PointLabel['exits'][number]) => `${e.engaged.join(',')}>${e.tipping.join(',')}`;

/**
 * Where a node's progress at an exit saddle crosses engagedProgress between two labels whose keys
 * differ, when that is what differs: both have the same number of exits, each exit of l has a
 * nearest exit of r with the same changed nodes, and for some matched pair a node is engaged on one
 * side only. The root of g(p) = s_i(p) - engagedProgress is found by Newton's method on p with the
 * slope ds_i/dp of the implicit function theorem (Exit.slope), the saddle followed by Newton's
 * method at fixed p from the straight line between the two saddles, kept inside the bracket (a step
 * leaving it, or one that does not shrink |g| by half, is replaced by bisection; the safeguarded
 * Newton iteration of Press et al., Numerical Recipes, 3rd ed., section 9.4, "rtsafe"). Stops when the
 * bracket or the step is below 1e-3 locateTolerance. Null when the difference is of another kind
 * (a saddle connection), when Newton's method at fixed p fails or wanders off the straight line by
 * more than the two saddles' distance, or when roles depend on p: the caller then bisects.
 */
function engagementRoot(labeller: Labeller, l: PointLabel, r: PointLabel, start: StartState): { p: number; node: number } | null {
  if (l.regime === null || r.regime === null || l.exits.length !== r.exits.length || l.exits.length === 0) return null;
  if (l.exits.some((x) => x.via) || r.exits.some((x) => x.via)) return null;
  const e = labeller.options.engagedProgress;
  const used = new Set<number>();
  let pair: { a: PointLabel['exits'][number]; b: PointLabel['exits'][number]; node: number } | null = null;
  for (const a of l.exits) {
    const best = nearestUnused(r.exits, a.saddle, used);
    if (best < 0) return null;
    used.add(best);
    const b = r.exits[best];
    if (a.tipping.join(',') !== b.tipping.join(',')) return null;
    if (pair) continue;
    for (let i = 0; i < a.progress.length; i++) {
      if ((a.progress[i] >= e) !== (b.progress[i] >= e)) { pair = { a, b, node: i }; break; }
    }
  }
  if (!pair) return null;
  const { a, b, node } = pair;
  const spread = maxDist(a.saddle, b.saddle);
  const tol = 1e-3 * labeller.options.locateTolerance;
  let lo = l.p;
  let hi = r.p;
  const gLo = a.progress[node] - e;
  const rising = gLo < 0;
  const evalAt = (p: number) => {
    const t = (p - l.p) / (r.p - l.p);
    const guess = a.saddle.map((c, i) => c + t * (b.saddle[i] - c));
    const q = labeller.progressAt(p, guess, start);
    if (!q || maxDist(q.x, guess) > spread + 1e-9 * (1 + Math.max(...guess.map(Math.abs)))) return null;
    return { g: q.progress[node] - e, slope: q.slope ? q.slope[node] : null };
  };
  // Start from the secant through the two ends.
  const gHi = b.progress[node] - e;
  let p = gHi === gLo ? 0.5 * (lo + hi) : lo + (hi - lo) * (gLo / (gLo - gHi));
  if (!(p > lo && p < hi)) p = 0.5 * (lo + hi);
  let lastG = Infinity;
  for (let it = 0; it < 60; it++) {
    const v = evalAt(p);
    if (!v) return null;
    if ((v.g < 0) === rising) lo = p; else hi = p;
    if (v.g === 0 || hi - lo < tol) return { p, node };
    let next = Number.NaN;
    if (v.slope !== null && v.slope !== 0 && Number.isFinite(v.slope)) next = p - v.g / v.slope;
    if (!(next > lo && next < hi) || Math.abs(v.g) > 0.5 * Math.abs(lastG)) next = 0.5 * (lo + hi);
    lastG = v.g;
    if (Math.abs(next - p) < tol) return { p: next, node };
    p = next;
  }
  return null;
}

/** Names what changed between two labels a bisection bracket apart. */
function describeCrossover(l: PointLabel, r: PointLabel, names: readonly string[], start: StartState): LocatedCrossover {
  const p = 0.5 * (l.p + r.p);
  const base = { p, start, below: l.regime, above: r.regime, bracket: r.p - l.p };
  if (l.regime === null || r.regime === null) {
    const text = r.regime === null ? `no label above: ${r.reason}` : `no label below: ${l.reason}`;
    return { ...base, kind: 'label-undefined', description: `label undefined: ${text}` };
  }
  const connections: string[] = [];
  const engagement: string[] = [];
  const used = new Set<number>();
  const words = (pattern: readonly NodeState[]) => patternWords(pattern, names);
  const engagedWord = start === 'all-tipped' ? 'engaged towards recovery' : 'engaged';
  for (const er of r.exits) {
    const best = nearestUnused(l.exits, er.saddle, used);
    const bestD = best < 0 ? Infinity : maxDist(l.exits[best].saddle, er.saddle);
    const scale = 1e-3 * (1 + Math.max(...er.saddle.map(Math.abs)));
    if (best < 0 || bestD > scale) {
      connections.push(`${exitName(er, names).replace('the exit', 'the saddle')} becomes an exit of ${start}, ending in ${words(er.destination)}`);
      continue;
    }
    used.add(best);
    const el = l.exits[best];
    if (el.tipping.join(',') !== er.tipping.join(',')) {
      connections.push(`${exitName(el, names)} now ends in ${words(er.destination)} (was ${words(el.destination)})`);
    }
    const gained = er.engaged.filter((i) => !el.engaged.includes(i));
    const lost = el.engaged.filter((i) => !er.engaged.includes(i));
    if (gained.length > 0) engagement.push(`${listNames(gained.map((i) => names[i]))} now ${engagedWord} at ${exitName(el, names)}`);
    if (lost.length > 0) engagement.push(`${listNames(lost.map((i) => names[i]))} no longer ${engagedWord} at ${exitName(el, names)}`);
  }
  l.exits.forEach((el, k) => {
    if (!used.has(k)) connections.push(`${exitName(el, names)} no longer leads out of ${start}`);
  });
  const kind: CrossoverKind = connections.length > 0 ? 'saddle-connection' : 'engagement-crossover';
  const parts = kind === 'saddle-connection' ? [...connections, ...engagement] : engagement;
  const label = kind === 'saddle-connection' ? 'saddle connection' : 'engagement crossover';
  return { ...base, kind, description: `${label}: ${parts.length > 0 ? parts.join('; ') : 'the exits change'}` };
}

/**
 * The full escape graph (every index-1 saddle, both branches; buildEscapeGraph) for every band, in
 * the middle of the band's first piece, with the kinds of the edges out of each start state
 * (exitKind). Detail for the escape-graph drawing; the labels never depend on it.
 */
function graphsOfPieces(system: CompiledSystem, labeller: Labeller, pieces: readonly Piece[], starts: readonly StartState[], note: (d: Diagnostic) => void): EscapeGraph[] {
  // One graph per band, in the middle of its first piece: the piece whose reasons the band's reason quotes.
  const runs: { from: number; to: number }[] = [];
  pieces.forEach((q, k) => {
    const prev = k > 0 ? pieces[k - 1] : null;
    if (q.label.regime === null) return;
    if (prev && prev.to === q.from && prev.label.regime === q.label.regime) return;
    runs.push({ from: q.from, to: q.to });
  });
  const graphs: EscapeGraph[] = [];
  const o = labeller.options;
  for (const run of runs) {
    const p = 0.5 * (run.from + run.to);
    try {
      const roles = labeller.rolesAt(p);
      if (roles.some((r) => r === null)) continue;
      const nodeRoles = roles as NodeRoles[];
      const g = buildEscapeGraph(system, p, labeller.equilibriaAt(p), nodeRoles, o, labeller.budget);
      g.diagnostics.forEach(note);
      if (g.truncated) {
        note({ level: 'warning', code: 'regimes-budget', p, message: `the cap of ${o.maxIntegrations} manifold integrations was reached while drawing the escape graph at ${system.parameter} = ${fmt(p)}; the later escape graphs are left out (the labels are complete)` });
        break;
      }
      const states = g.graph.states;
      const edges: SaddleEdge[] = g.graph.saddles.map((e) => ({ ...e }));
      for (const start of starts) {
        const recovery = start === 'all-tipped';
        const level: NodeState = recovery ? 'tipped' : 'base';
        const s0 = states.findIndex((s) => isAll(s.pattern, level));
        if (s0 < 0) continue;
        const frameRoles = recovery ? nodeRoles.map((r) => ({ base: -r.tipped, threshold: -r.threshold, tipped: -r.base })) : nodeRoles;
        edges.forEach((e, i) => {
          if (e.from !== s0 && e.to !== s0) return;
          const target = states[e.from === s0 ? e.to : e.from].pattern;
          const progress = progressOf(recovery ? e.x.map((c) => -c) : e.x, frameRoles);
          const engaged = progress.flatMap((s, j) => (s >= o.engagedProgress ? [j] : []));
          const tipping = target.flatMap((s, j) => (s !== level ? [j] : []));
          const kind = exitKind({ engaged, tipping }, system.dimension);
          const branch = g.saddles[i].branches[e.from === s0 ? 1 : 0];
          if (recovery) edges[i] = { ...edges[i], kinds: { ...(edges[i].kinds ?? {}), [start]: kind } };
          else edges[i] = { ...edges[i], kind, ...(kind === 'cascading' ? { slowPassage: branch.slowTime } : {}) };
        });
      }
      graphs.push({ p, states, saddles: edges });
    } catch (e) {
      note({ level: 'error', code: 'regimes-failed', p,
        message: `escape graph at ${system.parameter} = ${fmt(p)} failed: ${e instanceof Error ? e.message : String(e)}; it is left out` });
    }
  }
  return graphs;
}
