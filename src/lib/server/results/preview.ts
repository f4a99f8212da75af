import type { Diagram } from '../../atlas/types.ts';
import { thinDiagram } from './thin.ts';

/** Point budget of the drawing preview served with every result (?view=preview). */
export const PREVIEW_POINTS = 3000;

/**
 * The drawing preview of a diagram: thinned to PREVIEW_POINTS, or the diagram itself when it is no
 * larger. Stored as JSON text beside results written before the encoded form; derived from the
 * decoded diagram on read for encoded results (the same function, so the same bytes).
 */
export function previewOf(diagram: Diagram): Diagram {
  const points = diagram.branches.reduce((n, b) => n + b.points.length, 0);
  return points > PREVIEW_POINTS ? thinDiagram(diagram, PREVIEW_POINTS) : diagram;
}
