/**
 * Where a tag's name goes: the lowest free line above the tag's bar at the bottom of the plot, free
 * meaning that no drawn branch segment and no label placed before crosses the name's box
 * (components/diagram/DiagramView.tsx). Pure geometry in plot pixels (y down).
 */

export interface Box { readonly x0: number; readonly y0: number; readonly x1: number; readonly y1: number }

/** A drawn polyline as the diagram keeps it: vertices in order, `branch` per vertex; consecutive vertices of one branch are joined. */
export interface DrawnLines { readonly sx: ArrayLike<number>; readonly sy: ArrayLike<number>; readonly branch: ArrayLike<number>; readonly n: number }

/**
 * Whether the segment (ax, ay)-(bx, by) meets the box (boundary included): Liang–Barsky clipping of
 * the parametric segment against the four half-planes (Y.-D. Liang and B. A. Barsky, "A new concept
 * and method for line clipping", ACM Transactions on Graphics 3(1), 1984).
 */
export function segmentMeetsBox(ax: number, ay: number, bx: number, by: number, box: Box): boolean {
  const dx = bx - ax, dy = by - ay;
  let t0 = 0, t1 = 1;
  const clip = (p: number, q: number): boolean => {
    if (p === 0) return q >= 0;
    const r = q / p;
    if (p < 0) { if (r > t1) return false; if (r > t0) t0 = r; } else { if (r < t0) return false; if (r < t1) t1 = r; }
    return true;
  };
  return clip(-dx, ax - box.x0) && clip(dx, box.x1 - ax) && clip(-dy, ay - box.y0) && clip(dy, box.y1 - ay) && t0 <= t1;
}

/** Boxes overlap (sharing only an edge does not count: stacked rows touch). */
export function boxesMeet(a: Box, b: Box): boolean {
  return a.x0 < b.x1 && b.x0 < a.x1 && a.y0 < b.y1 && b.y0 < a.y1;
}

export function linesMeetBox(lines: DrawnLines, box: Box): boolean {
  for (let k = 0; k < lines.n; k++) {
    const x = lines.sx[k], y = lines.sy[k];
    if (x >= box.x0 && x <= box.x1 && y >= box.y0 && y <= box.y1) return true;
    if (k + 1 < lines.n && lines.branch[k + 1] === lines.branch[k] && segmentMeetsBox(x, y, lines.sx[k + 1], lines.sy[k + 1], box)) return true;
  }
  return false;
}

/**
 * Row per label (0 = the line just above the bars), in the order given: the lowest row up to
 * maxRows − 1 whose box meets neither the lines nor a label placed before; when every row is taken,
 * the lowest row that meets no label placed before (the name then crosses a branch and is drawn
 * with a halo). `boxAt(i, row)` gives label i's box in that row; against the lines it is grown by
 * `lineMargin` on every side (half the widest stroke, so that a line passing just outside the box
 * does not ink it).
 */
export function placeLabels(count: number, boxAt: (i: number, row: number) => Box, lines: DrawnLines, maxRows: number, lineMargin = 0): number[] {
  const grown = (b: Box): Box => ({ x0: b.x0 - lineMargin, y0: b.y0 - lineMargin, x1: b.x1 + lineMargin, y1: b.y1 + lineMargin });
  const placed: Box[] = [];
  const rows: number[] = [];
  for (let i = 0; i < count; i++) {
    let chosen = -1;
    let fallback = -1;
    for (let row = 0; row < maxRows; row++) {
      const box = boxAt(i, row);
      if (placed.some((b) => boxesMeet(b, box))) continue;
      if (fallback < 0) fallback = row;
      if (!linesMeetBox(lines, grown(box))) { chosen = row; break; }
    }
    const row = chosen >= 0 ? chosen : fallback >= 0 ? fallback : 0;
    rows.push(row);
    placed.push(boxAt(i, row));
  }
  return rows;
}
