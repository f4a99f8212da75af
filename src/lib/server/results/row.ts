import type { ComputeOutput } from '../runs/compute.ts';

/**
 * The `results` row of a computed trace (without its cache key): the encoded diagram in
 * `diagram_blob`; `diagram` and `preview` (the JSON text columns of results written before the
 * encoded form) stay NULL.
 */
export function resultRow(out: ComputeOutput, engineVersion: string): Record<string, unknown> {
  const blob = out.diagramBlob;
  return {
    engine_version: engineVersion,
    diagram: null,
    diagram_blob: Buffer.from(blob.buffer, blob.byteOffset, blob.byteLength),
    regimes: out.regimesJson,
    preview: null,
    preview_points: out.previewPoints,
    branch_count: out.branchCount,
    point_count: out.pointCount,
    special_point_count: out.specialPointCount,
    compute_ms: out.computeMs,
  };
}
