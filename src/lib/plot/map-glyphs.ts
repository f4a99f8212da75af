/**
 * Glyphs and line styles of the two-parameter map, Brinkmap's own, chosen to differ from the
 * one-parameter glyphs (markers.ts: bow, three-blade, crossing, orbit ring, open box) by silhouette:
 *   cusp             "beak": a solid spike with concave flanks on a flat foot (two fold curves meet in a point)
 *   bogdanov-takens  "four-point star": a solid star with concave sides (a saddle-node and a Hopf curve meet)
 *   saddle-node-meets-pitchfork  "dome": a solid half disc on a flat base (a fold curve touches the symmetry-breaking curve)
 *   any other type   "hexagon", named by its type (the engine may locate more kinds than this file knows)
 * Curves differ by line style as well as colour: saddle-node solid and heavy, pitchfork long dashes,
 * Hopf dots; none relies on colour alone.
 */
import type { MapCurveType, MapPointType } from '../maps/map-types';

export const MAP_POINT_TYPES: readonly MapPointType[] = ['cusp', 'bogdanov-takens', 'saddle-node-meets-pitchfork'];
const KNOWN_LABEL: Record<string, string> = { cusp: 'Cusp', 'bogdanov-takens': 'Bogdanov–Takens', 'saddle-node-meets-pitchfork': 'Saddle-node meets pitchfork' };
/** Label of a point type; a type this file does not know is named by its words. */
export function mapPointLabel(type: string): string {
  return KNOWN_LABEL[type] ?? type.charAt(0).toUpperCase() + type.slice(1).replace(/-/g, ' ');
}
export const MAP_POINT_DESCRIPTION: Record<string, string> = {
  cusp: 'two saddle-node curves meet in a point; the fold disappears',
  'bogdanov-takens': 'a Hopf curve ends on a saddle-node curve; the eigenvalue zero is double',
  'saddle-node-meets-pitchfork': 'a saddle-node curve meets the curve where the symmetric branch splits',
};

export const MAP_CURVE_TYPES: readonly MapCurveType[] = ['saddle-node', 'pitchfork', 'hopf'];
export const MAP_CURVE_LABEL: Record<MapCurveType, string> = { 'saddle-node': 'saddle-node curve', pitchfork: 'pitchfork curve', hopf: 'Hopf curve' };
export const MAP_CURVE_STYLE: Record<MapCurveType, { readonly width: number; readonly dash?: readonly number[]; readonly linecap: 'butt' | 'round' }> = {
  'saddle-node': { width: 2.4, linecap: 'round' },
  pitchfork: { width: 2, dash: [9, 5], linecap: 'butt' },
  hopf: { width: 2.2, dash: [0.1, 5], linecap: 'round' },
};

const f = (v: number) => (Math.round(v * 100) / 100).toString();

/** Path of the glyph of `type` centred at (cx, cy), fitting in a circle of radius r. */
export function mapPointPath(type: MapPointType | string, cx: number, cy: number, r: number): string {
  if (type === 'cusp') {
    // Tip at the top, foot at the bottom; flanks are quadratic curves bowed inwards.
    const top = cy - r, foot = cy + r * 0.7, half = r * 0.8;
    return `M${f(cx)},${f(top)}Q${f(cx + half * 0.15)},${f(cy + r * 0.25)} ${f(cx + half)},${f(foot)}H${f(cx - half)}Q${f(cx - half * 0.15)},${f(cy + r * 0.25)} ${f(cx)},${f(top)}Z`;
  }
  if (type === 'saddle-node-meets-pitchfork') {
    const base = cy + r * 0.45;
    return `M${f(cx - r)},${f(base)}A${f(r)},${f(r)} 0 0 1 ${f(cx + r)},${f(base)}Z`;
  }
  if (type !== 'bogdanov-takens') {
    const pts = Array.from({ length: 6 }, (_, k) => [cx + r * 0.9 * Math.cos((Math.PI / 3) * k), cy + r * 0.9 * Math.sin((Math.PI / 3) * k)]);
    return `M${pts.map(([x, y]) => `${f(x)},${f(y)}`).join('L')}Z`;
  }
  // Four points on the axes, concave sides through a small inner square.
  const i = r * 0.22;
  return `M${f(cx)},${f(cy - r)}Q${f(cx + i)},${f(cy - i)} ${f(cx + r)},${f(cy)}Q${f(cx + i)},${f(cy + i)} ${f(cx)},${f(cy + r)}Q${f(cx - i)},${f(cy + i)} ${f(cx - r)},${f(cy)}Q${f(cx - i)},${f(cy - i)} ${f(cx)},${f(cy - r)}Z`;
}

/** Colours of curves and points from the plot palette's marker roles (the same hue per kind as the one-parameter glyphs). */
export function mapCurveColour(type: MapCurveType, marker: Record<string, string>): string {
  return marker[type] ?? marker.degenerate;
}
export function mapPointColour(type: MapPointType | string, pal: { ink: string; marker: Record<string, string> }): string {
  return type === 'cusp' ? pal.marker.transcritical : type === 'bogdanov-takens' ? pal.ink : type === 'saddle-node-meets-pitchfork' ? pal.marker.pitchfork : pal.marker.degenerate;
}
