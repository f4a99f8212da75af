import { normInf } from '../numerics/vector.js';
import type { TracedPoint } from '../numerics/branch-point-data.js';
import { BranchIndex } from './branch-index.js';
import { direction as secant, pointY as toY } from './diagram-agreement.js';
import { SpecialPointRegistry, type SpecialPointDraft } from './special-point-registry.js';
import type { ResolvedTraceSettings } from './trace-settings.js';
import type { Branch, BranchEnd, Diagnostic, StartCoverage } from './types.js';

/**
 * One block of a trace (docs/numerics.md §11): a fixed contiguous range of the starting equilibria,
 * traced by traceBlock with its own branch index and special-point registry. Plain data (settings,
 * numbers, Float64Arrays), so a block crosses a thread boundary as it is.
 */
export interface TraceBlock {
  readonly index: number;
  /** Number of blocks of the trace. */
  readonly of: number;
  readonly settings: ResolvedTraceSettings;
  /** max(sweep width, 1 + largest |x|_inf over all starts): the same arclength scale in every block. */
  readonly arcScale: number;
  /** Starting equilibria (states at settings.from) of this block, in the trace's order. */
  readonly starts: Float64Array[];
  /** Restricted starts only: near-uniform states at settings.to. */
  readonly farEnd: Float64Array[];
  /** The seed block only (interior-seeds.ts): equilibria inside the sweep, each y = [x, p]. */
  readonly seeds?: Float64Array[];
}

/** A special point as one block's registry holds it, with the block's own branch ids. */
export type BlockSpecialPoint = Omit<SpecialPointDraft, 'branches'> & { readonly branches: string[] };

/** What traceBlock returns: branches with ids b1, b2, … of the block, in the order traced. */
export interface BlockResult {
  readonly block: number;
  readonly branches: Branch[];
  /** Per branch: index in its points of its starting equilibrium or of the branch point it was switched from. */
  readonly origins: number[];
  readonly specialPoints: BlockSpecialPoint[];
  readonly diagnostics: Diagnostic[];
  readonly neutralSaddles: number;
  readonly cancelled: boolean;
  readonly branchCapHit: boolean;
  readonly coverage?: StartCoverage;
}

/** Starts from which 'auto' splits a full enumeration into two blocks (measured, docs/numerics.md §11). */
export const AUTO_BLOCKS_FROM = 512;

/** Number of blocks for `starts` starting equilibria: the setting, else the 'auto' rule; never more than the starts. */
export function blockCount(setting: 'auto' | number, starts: number): number {
  const wanted = setting === 'auto' ? (starts >= AUTO_BLOCKS_FROM ? 2 : 1) : setting;
  return Math.max(1, Math.min(wanted, starts));
}

export interface MergeOptions {
  readonly n: number;
  /** The trace's branch-index cell width (largest parameter step) and largest arclength step. */
  readonly cellWidth: number;
  readonly maxStep: number;
  readonly maxBranches: number;
}

export interface MergedBlocks {
  readonly branches: Branch[];
  readonly registry: SpecialPointRegistry;
  readonly diagnostics: Diagnostic[];
}

type Fate =
  | { readonly kind: 'kept'; readonly id: string; readonly lo: number; readonly hi: number; readonly loTo: string | null; readonly hiTo: string | null; readonly ys: Float64Array[] }
  | { readonly kind: 'dropped'; readonly to: string[] };

const END_CODES = new Set(['step-collapse', 'newton-failure', 'point-cap', 'state-bound']);

/**
 * Joins the blocks of a trace in block order as the sequential trace would have met them: a branch
 * of a later block whose start lies on a branch of an earlier block is dropped (the sequential trace
 * skips such a start), a switched branch whose two first points run along earlier branches is
 * dropped (its branch point gains those branches), and any other branch is cut where it first runs
 * onto an earlier block's branch on either side of its origin, that end becoming 'merged' (the same
 * tests and tolerances as the trace's own: BranchIndex.pointList / findParallel with the merge
 * tolerance 1e-7 (1 + |y|) + 0.05 |step|). Kept branches are renumbered b1, b2, … in block order;
 * special points keep their place and take the merged ids (a point on a cut-off or dropped part goes
 * to the branch that part ran onto), the registry listing each place once. Pure: the same blocks
 * give the same diagram, whichever thread traced them. Block 0 passes through unchanged.
 */
export function mergeBlocks(results: readonly BlockResult[], o: MergeOptions): MergedBlocks {
  const { n } = o;
  const registry = new SpecialPointRegistry();
  const branches: Branch[] = [];
  /** Bounding box of each kept branch's points in (x, p), by merged index. */
  const boxes: Box[] = [];
  const diagnostics: Diagnostic[] = [];
  const many = results.length > 1;
  let capHit = false;

  for (const [ri, r] of results.entries()) {
    const fates = new Map<string, Fate>();
    const first = ri === 0;
    const startIndex = branches.length;
    // Earlier branches a branch of this block can meet: those whose boxes come within the largest
    // test tolerance of its own (a point within tol of a segment lies within tol of the segment's
    // box). Most branches of the chains have none, and skip every test; an index of the candidates,
    // inserted in merged order, gives the same hits as one of all earlier branches.
    let index: BranchIndex | null = null;
    let candidates: number[][] = [];
    if (!first) {
      const own = r.branches.map((b) => boxOf(b.points, n));
      const union = new Set<number>();
      candidates = own.map((bx) => {
        const pad = 1e-6 * (1 + bx.size) + 0.2 * o.maxStep;
        const c: number[] = [];
        for (let k = 0; k < boxes.length; k++) if (overlaps(bx, boxes[k], pad)) { c.push(k); union.add(k); }
        return c;
      });
      if (union.size > 0) {
        index = new BranchIndex(o.cellWidth, n, o.maxStep);
        for (const k of [...union].sort((a, b) => a - b)) {
          const list = index.addList(k);
          const ys = branches[k].points.map((q) => toY(q.p, q.x, n));
          for (let j = 0; j < ys.length; j++) index.push(list, { y: ys[j], t: secant(ys, j) } as TracedPoint);
        }
      }
    }
    r.branches.forEach((b, bi) => {
      const o0 = r.origins[bi];
      const near = index !== null && candidates[bi].length > 0;
      const ys = near ? b.points.map((q) => toY(q.p, q.x, n)) : [];
      if (near) {
        const y0 = ys[o0];
        if (b.origin.kind === 'start') {
          const l = index!.pointList(y0, 1e-6 * (1 + normInf(y0)));
          if (l !== null) {
            fates.set(b.id, { kind: 'dropped', to: [branches[index!.lists[l].branch].id] });
            return;
          }
        } else {
          const tol = 1e-7 * (1 + normInf(y0)) + 0.05 * o.maxStep;
          const plus = o0 + 1 < ys.length ? hitAt(index!, ys, o0 + 1, tol) : null;
          const minus = o0 > 0 ? hitAt(index!, ys, o0 - 1, tol) : null;
          if (plus !== null && minus !== null) {
            fates.set(b.id, { kind: 'dropped', to: [branches[plus].id, branches[minus].id] });
            return;
          }
        }
      }
      let lo = 0;
      let hi = b.points.length - 1;
      let loTo: string | null = null;
      let hiTo: string | null = null;
      if (near) {
        const up = firstHit(index!, ys, o0, 1);
        if (up !== null) { hi = up.at; hiTo = branches[up.branch].id; }
        const down = firstHit(index!, ys, o0, -1);
        if (down !== null) { lo = down.at; loTo = branches[down.branch].id; }
      }
      const id = `b${branches.length + 1}`;
      const from = b.origin.kind === 'switch' && b.origin.from !== undefined ? placeOf(fates.get(b.origin.from), b.points[o0].p, b.points[o0].x, n)[0] : undefined;
      const ends: [BranchEnd, BranchEnd] = [loTo !== null ? 'merged' : b.ends[0], hiTo !== null ? 'merged' : b.ends[1]];
      branches.push({
        id,
        points: lo === 0 && hi === b.points.length - 1 ? b.points : b.points.slice(lo, hi + 1),
        origin: b.origin.kind === 'switch' ? { kind: 'switch', ...(from !== undefined ? { from } : {}) } : b.origin,
        ends,
      });
      fates.set(b.id, { kind: 'kept', id, lo, hi, loTo, hiTo, ys });
    });

    for (const d of r.specialPoints) {
      const mapped = new Set<string>();
      for (const local of d.branches) for (const id of placeOf(fates.get(local), d.p, d.x, n)) mapped.add(id);
      const evidence: SpecialPointDraft['evidence'] = { ...d.evidence };
      if (!first && typeof evidence.locatedOn === 'string') evidence.locatedOn = placeOf(fates.get(evidence.locatedOn), d.p, d.x, n)[0] ?? evidence.locatedOn;
      const draft: SpecialPointDraft = { ...d, branches: mapped, evidence };
      // The first block to locate a place keeps its location (as the sequential trace keeps the first
      // branch's, unless a later one locates it better on its own branches).
      if (first) registry.items.push(draft);
      else registry.add(draft);
    }

    for (const d of r.diagnostics) {
      if (many && d.code === 'branch-cap') { capHit = true; continue; }
      if (d.branch === undefined || first) { diagnostics.push(d); continue; }
      const fate = fates.get(d.branch);
      if (!fate) { diagnostics.push(d); continue; }
      if (fate.kind === 'dropped') {
        // The part it describes is an earlier block's branch, which has its own diagnostics.
        if (END_CODES.has(d.code)) continue;
        diagnostics.push({ ...d, branch: fate.to[0] });
        continue;
      }
      if (END_CODES.has(d.code) && !branches[Number(fate.id.slice(1)) - 1].ends.includes(d.code as BranchEnd)) continue;
      diagnostics.push({ ...d, branch: fate.id, message: d.message.replace(`branch ${d.branch} `, `branch ${fate.id} `) });
    }

    // Later blocks look for earlier blocks' branches only: their own duplicates were found when traced.
    for (let k = startIndex; k < branches.length; k++) boxes.push(boxOf(branches[k].points, n));
  }

  if (branches.length > o.maxBranches) {
    const cut = branches.length - o.maxBranches;
    const gone = new Set(branches.slice(o.maxBranches).map((b) => b.id));
    branches.length = o.maxBranches;
    for (let i = registry.items.length - 1; i >= 0; i--) {
      const d = registry.items[i];
      for (const b of [...d.branches]) if (gone.has(b)) d.branches.delete(b);
      if (d.branches.size === 0) registry.items.splice(i, 1);
    }
    for (let i = diagnostics.length - 1; i >= 0; i--) if (diagnostics[i].branch !== undefined && gone.has(diagnostics[i].branch!)) diagnostics.splice(i, 1);
    diagnostics.push({ level: 'warning', code: 'branch-cap', message: `stopped at ${o.maxBranches} branches (maxBranches); ${cut} more traced in later blocks were left out` });
  } else if (capHit) {
    diagnostics.push({ level: 'warning', code: 'branch-cap', message: `a block stopped at ${o.maxBranches} branches (maxBranches); more were not traced` });
  }
  return { branches, registry, diagnostics };
}

/** Merged ids of the branch(es) at (p, x) of a block's branch: itself, or what its cut-off or dropped part ran onto. */
function placeOf(fate: Fate | undefined, p: number, x: readonly number[], n: number): string[] {
  if (!fate) return [];
  if (fate.kind === 'dropped') return fate.to;
  if (fate.loTo === null && fate.hiTo === null) return [fate.id];
  const y = toY(p, x, n);
  let best = 0;
  let bestD = Infinity;
  for (let j = 0; j < fate.ys.length; j++) {
    let d = 0;
    for (let i = 0; i <= n; i++) d += (fate.ys[j][i] - y[i]) ** 2;
    if (d < bestD) { bestD = d; best = j; }
  }
  if (best < fate.lo && fate.loTo !== null) return [fate.loTo];
  if (best > fate.hi && fate.hiTo !== null) return [fate.hiTo];
  return [fate.id];
}

interface Box {
  readonly lo: Float64Array;
  readonly hi: Float64Array;
  /** Largest |coordinate| in the box. */
  readonly size: number;
}

function boxOf(points: readonly { p: number; x: readonly number[] }[], n: number): Box {
  const lo = new Float64Array(n + 1).fill(Infinity);
  const hi = new Float64Array(n + 1).fill(-Infinity);
  for (const q of points) {
    for (let i = 0; i < n; i++) {
      if (q.x[i] < lo[i]) lo[i] = q.x[i];
      if (q.x[i] > hi[i]) hi[i] = q.x[i];
    }
    if (q.p < lo[n]) lo[n] = q.p;
    if (q.p > hi[n]) hi[n] = q.p;
  }
  let size = 0;
  for (let i = 0; i <= n; i++) size = Math.max(size, Math.abs(lo[i]), Math.abs(hi[i]));
  return { lo, hi, size };
}

function overlaps(a: Box, b: Box, pad: number): boolean {
  for (let i = 0; i < a.lo.length; i++) if (a.lo[i] > b.hi[i] + pad || b.lo[i] > a.hi[i] + pad) return false;
  return true;
}

/** Points tested per stride when walking out from a branch's origin (see firstHit). */
const STRIDE = 4;

/**
 * The first point from the origin o outward (step +1 or -1) that runs along an earlier block's
 * branch, with that branch's merged index. Tests the first point, then every STRIDE-th point and the
 * last one, and on a hit looks back over the points skipped: once a branch has run onto another it
 * stays on it (the same curve) until one of them ends, so a contact shorter than STRIDE points
 * would need the earlier branch to end within it. A missed contact of that kind leaves a short
 * stretch traced twice, never a branch lost. (Testing every point cost ~0.3 s of a 1.8 s six-node
 * trace in two blocks.)
 */
function firstHit(index: BranchIndex, ys: Float64Array[], o: number, dir: 1 | -1): { at: number; branch: number } | null {
  const end = dir > 0 ? ys.length - 1 : 0;
  if (o === end) return null;
  const test = (j: number) => hitAt(index, ys, j, mergeTol(ys[j - dir], ys[j]));
  let prev = o;
  for (let j = o + dir; ; ) {
    const h = test(j);
    if (h !== null) {
      for (let k = prev + dir; k !== j; k += dir) {
        const e = test(k);
        if (e !== null) return { at: k, branch: e };
      }
      return { at: j, branch: h };
    }
    if (j === end) return null;
    prev = j;
    j = dir > 0 ? Math.min(end, j + STRIDE) : Math.max(end, j - STRIDE);
  }
}

/** The merged index of an earlier block's branch that point j of ys runs along (parallel, within tol), or null. */
function hitAt(index: BranchIndex, ys: Float64Array[], j: number, tol: number): number | null {
  const h = index.findParallel(ys[j], secant(ys, j), tol, () => false);
  return h === null ? null : index.lists[h.list].branch;
}

function mergeTol(a: Float64Array, b: Float64Array): number {
  let d = 0;
  for (let i = 0; i < a.length; i++) d += (a[i] - b[i]) ** 2;
  return 1e-7 * (1 + normInf(b)) + 0.05 * Math.sqrt(d);
}
