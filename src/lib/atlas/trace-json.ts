import type { Diagram, StartCoverage } from './types.js';

/** The public JSON shape of a traced diagram (CLI output, issue 3). */
export interface TraceJson {
  parameter: string;
  branches: { id: string; points: { p: number; x: number[]; unstable: number }[] }[];
  bifurcations: { type: string; p: number; x: number[]; branches: string[]; frequency?: number; note?: string }[];
  diagnostics: { level: string; code: string; message: string; branch?: string; p?: number }[];
  /** Only when the starting patterns were restricted (docs/numerics.md §12). */
  coverage?: StartCoverage;
}

/** Reduces a Diagram to the public JSON shape: branch points as {p, x, unstable}, special points without evidence. */
export function toTraceJson(d: Diagram): TraceJson {
  return {
    parameter: d.parameter,
    branches: d.branches.map((b) => ({ id: b.id, points: b.points.map((q) => ({ p: q.p, x: q.x, unstable: q.unstable })) })),
    bifurcations: d.bifurcations.map((s) => ({
      type: s.type,
      p: s.p,
      x: s.x,
      branches: s.branches,
      ...(s.frequency !== undefined ? { frequency: s.frequency } : {}),
      ...(s.note !== undefined ? { note: s.note } : {}),
    })),
    diagnostics: d.diagnostics.map((g) => ({
      level: g.level,
      code: g.code,
      message: g.message,
      ...(g.branch !== undefined ? { branch: g.branch } : {}),
      ...(g.p !== undefined ? { p: g.p } : {}),
    })),
    ...(d.coverage ? { coverage: d.coverage } : {}),
  };
}
