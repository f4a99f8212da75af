/**
 * Special-point glyphs that would be drawn over each other (several folds at one parameter value,
 * mirror images in a symmetric network) are grouped into one mark with a count; a click fans the
 * group out around its centre so each glyph can be chosen (components/diagram/DiagramView.tsx).
 */

export interface PlacedGlyph { readonly id: string; readonly cx: number; readonly cy: number }

export interface GlyphCluster {
  /** Ids in the order given. */
  readonly ids: string[];
  /** Mean position of the members. */
  readonly cx: number;
  readonly cy: number;
}

/**
 * Single-linkage groups of glyphs: two glyphs closer than `distance` (Euclidean, pixels) are in one
 * group, and so are glyphs joined through a chain of such pairs. Groups of one are returned too.
 * O(n^2) on the glyphs in view (a diagram holds tens to a few hundred special points).
 */
export function clusterGlyphs(glyphs: readonly PlacedGlyph[], distance: number): GlyphCluster[] {
  const parent = glyphs.map((_, i) => i);
  const find = (i: number): number => {
    while (parent[i] !== i) { parent[i] = parent[parent[i]]; i = parent[i]; }
    return i;
  };
  const d2 = distance * distance;
  for (let i = 0; i < glyphs.length; i++) {
    for (let j = i + 1; j < glyphs.length; j++) {
      const dx = glyphs[i].cx - glyphs[j].cx, dy = glyphs[i].cy - glyphs[j].cy;
      if (dx * dx + dy * dy < d2) parent[find(j)] = find(i);
    }
  }
  const groups = new Map<number, number[]>();
  glyphs.forEach((_, i) => {
    const r = find(i);
    const g = groups.get(r);
    if (g) g.push(i); else groups.set(r, [i]);
  });
  return [...groups.values()].sort((a, b) => a[0] - b[0]).map((members) => ({
    ids: members.map((i) => glyphs[i].id),
    cx: members.reduce((s, i) => s + glyphs[i].cx, 0) / members.length,
    cy: members.reduce((s, i) => s + glyphs[i].cy, 0) / members.length,
  }));
}

/**
 * Positions for k glyphs fanned out around (cx, cy): evenly on a circle starting straight up,
 * clockwise, with neighbours `gap` pixels apart along the circle (radius at least `minRadius`).
 */
export function fanOut(cx: number, cy: number, k: number, gap: number, minRadius: number): { x: number; y: number }[] {
  if (k <= 0) return [];
  const r = Math.max(minRadius, (k * gap) / (2 * Math.PI));
  return Array.from({ length: k }, (_, i) => {
    const a = -Math.PI / 2 + (2 * Math.PI * i) / k;
    return { x: cx + r * Math.cos(a), y: cy + r * Math.sin(a) };
  });
}
