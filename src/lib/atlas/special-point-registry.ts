import type { SpecialPoint, SpecialPointType } from './types.js';

/** Two special points are the same when their types agree, |dp| < 1e-7 and |dx|_inf < 1e-5 (issue 3). */
export const SAME_POINT_PARAMETER = 1e-7;
export const SAME_POINT_STATE = 1e-5;

export interface SpecialPointDraft {
  type: SpecialPointType;
  p: number;
  x: number[];
  branches: Set<string>;
  frequency?: number;
  evidence: { reason: string; [key: string]: unknown };
  note?: string;
}

const BRANCH_POINT_TYPES: ReadonlySet<SpecialPointType> = new Set(['pitchfork', 'transcritical', 'degenerate']);

export function samePlace(a: { p: number; x: readonly number[] }, b: { p: number; x: readonly number[] }): boolean {
  if (Math.abs(a.p - b.p) >= SAME_POINT_PARAMETER) return false;
  for (let i = 0; i < a.x.length; i++) if (!(Math.abs(a.x[i] - b.x[i]) < SAME_POINT_STATE)) return false;
  return true;
}

/** Keeps every special point once; branch points (any classification) match each other. */
export class SpecialPointRegistry {
  readonly items: SpecialPointDraft[] = [];

  /** A registered branch point (pitchfork, transcritical or degenerate branch point) at the place, if any. */
  findBranchPoint(p: number, x: readonly number[]): SpecialPointDraft | undefined {
    return this.items.find((s) => s.evidence.kind === 'branch-point' && BRANCH_POINT_TYPES.has(s.type) && samePlace(s, { p, x }));
  }

  find(type: SpecialPointType, p: number, x: readonly number[]): SpecialPointDraft | undefined {
    return this.items.find((s) => s.type === type && samePlace(s, { p, x }));
  }

  /** Adds the point, or merges its branches into an identical one already present. Returns the stored draft. */
  add(d: SpecialPointDraft): SpecialPointDraft {
    const same = d.evidence.kind === 'branch-point' ? this.findBranchPoint(d.p, d.x) : this.find(d.type, d.p, d.x);
    if (same) {
      for (const b of d.branches) same.branches.add(b);
      return same;
    }
    this.items.push(d);
    return d;
  }

  /**
   * Final list: saddle-nodes that coincide with a branch point are the branch point seen from the
   * branch that folds there (a pitchfork's bending branch) and are dropped, noting it on the branch point.
   */
  finish(): SpecialPoint[] {
    const out: SpecialPoint[] = [];
    const bps = this.items.filter((s) => s.evidence.kind === 'branch-point');
    for (const s of this.items) {
      if (s.type === 'saddle-node') {
        const bp = bps.find((b) => samePlace(b, s));
        if (bp) {
          for (const b of s.branches) bp.branches.add(b);
          bp.evidence.foldOnBranch = true;
          continue;
        }
      }
      out.push(s as unknown as SpecialPoint);
    }
    return out
      .sort((a, b) => a.p - b.p || a.x[0] - b.x[0])
      .map((s, i) => {
        const d = s as unknown as SpecialPointDraft;
        const sp: SpecialPoint = {
          id: `s${i + 1}`,
          type: d.type,
          p: d.p,
          x: d.x,
          branches: [...d.branches].sort(byBranchId),
          ...(d.frequency !== undefined ? { frequency: d.frequency } : {}),
          evidence: d.evidence,
          ...(d.note !== undefined ? { note: d.note } : {}),
        };
        return sp;
      });
  }
}

function byBranchId(a: string, b: string): number {
  return Number(a.slice(1)) - Number(b.slice(1)) || a.localeCompare(b);
}
