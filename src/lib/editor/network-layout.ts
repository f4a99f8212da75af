/** Geometry for the small network drawing: nodes on a circle, straight links with arrow room. */
export interface Point { x: number; y: number }

/**
 * Places n nodes evenly on a circle of radius r around (cx, cy), the first at the top, going
 * clockwise (screen coordinates, y down). One node sits in the centre.
 */
export function circularLayout(n: number, cx: number, cy: number, r: number): Point[] {
  if (n === 1) return [{ x: cx, y: cy }];
  return Array.from({ length: n }, (_, k) => {
    const a = -Math.PI / 2 + (2 * Math.PI * k) / n;
    return { x: cx + r * Math.cos(a), y: cy + r * Math.sin(a) };
  });
}

/**
 * The segment from a to b shortened by `inset` at both ends (so arrows end at the node's rim), and
 * shifted sideways by `offset` (so the two directions of a pair do not overlap). Null when a and b coincide
 * closer than twice the inset.
 */
export function linkSegment(a: Point, b: Point, inset: number, offset = 0): { x1: number; y1: number; x2: number; y2: number } | null {
  const dx = b.x - a.x;
  const dy = b.y - a.y;
  const d = Math.hypot(dx, dy);
  if (d <= 2 * inset) return null;
  const ux = dx / d;
  const uy = dy / d;
  // Normal to the left of the direction a → b in screen coordinates.
  const nx = uy * offset;
  const ny = -ux * offset;
  return { x1: a.x + ux * inset + nx, y1: a.y + uy * inset + ny, x2: b.x - ux * inset + nx, y2: b.y - uy * inset + ny };
}
