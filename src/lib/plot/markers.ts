/**
 * Brinkmap's own glyphs for special points. Each glyph is an SVG path (usable as Path2D on canvas
 * and in exported figures), readable without colour: the silhouette alone tells the type.
 *   saddle-node   "bow": two wedges meeting point to point (two branches meet and vanish)
 *   pitchfork     "three-blade": three blades from one centre (three branches meet)
 *   transcritical "crossing": a heavy X (two branches cross and exchange stability)
 *   hopf          "orbit ring": a ring with a centre dot (an oscillation is born around the point)
 *   degenerate    "open box": a square frame with a diagonal bar inside (type not settled)
 */
import type { SpecialPointType } from '../atlas/types';

export const SPECIAL_TYPES: readonly SpecialPointType[] = ['saddle-node', 'pitchfork', 'transcritical', 'hopf', 'degenerate'];

export const SPECIAL_LABEL: Record<SpecialPointType, string> = {
  'saddle-node': 'Saddle-node',
  pitchfork: 'Pitchfork',
  transcritical: 'Transcritical',
  hopf: 'Hopf',
  degenerate: 'Degenerate',
};

/** What each glyph says, for legends and screen readers. */
export const SPECIAL_DESCRIPTION: Record<SpecialPointType, string> = {
  'saddle-node': 'two equilibria meet and vanish',
  pitchfork: 'a symmetric branch splits into three',
  transcritical: 'two branches cross and exchange stability',
  hopf: 'a pair of eigenvalues crosses the imaginary axis; an oscillation starts',
  degenerate: 'classification not settled; see the note',
};

/** Whether a glyph path is drawn with the even-odd fill rule (it has holes). */
export function markerFillRule(type: SpecialPointType): 'nonzero' | 'evenodd' {
  return type === 'hopf' || type === 'degenerate' ? 'evenodd' : 'nonzero';
}

const f = (v: number) => (Math.round(v * 100) / 100).toString();

function polygon(pts: [number, number][]): string {
  return 'M' + pts.map(([x, y]) => `${f(x)},${f(y)}`).join('L') + 'Z';
}

function circle(cx: number, cy: number, r: number): string {
  return `M${f(cx - r)},${f(cy)}A${f(r)},${f(r)} 0 1 0 ${f(cx + r)},${f(cy)}A${f(r)},${f(r)} 0 1 0 ${f(cx - r)},${f(cy)}Z`;
}

/** Path of the glyph of `type` centred at (cx, cy), fitting in a circle of radius r. */
export function markerPath(type: SpecialPointType, cx: number, cy: number, r: number): string {
  switch (type) {
    case 'saddle-node': {
      const h = r * 0.78, g = r * 0.12;
      return polygon([[cx - r, cy - h], [cx - g, cy], [cx - r, cy + h]]) + polygon([[cx + r, cy - h], [cx + g, cy], [cx + r, cy + h]]);
    }
    case 'pitchfork': {
      const pts: [number, number][] = [];
      for (let k = 0; k < 3; k++) {
        const a = -Math.PI / 2 + (k * 2 * Math.PI) / 3;
        const w = 0.32;
        pts.push([cx + r * 0.28 * Math.cos(a - Math.PI / 3), cy + r * 0.28 * Math.sin(a - Math.PI / 3)]);
        pts.push([cx + r * Math.cos(a - w), cy + r * Math.sin(a - w)]);
        pts.push([cx + r * Math.cos(a + w), cy + r * Math.sin(a + w)]);
      }
      return polygon(pts);
    }
    case 'transcritical': {
      const t = r * 0.3, e = r * 0.92;
      // A cross of two bars of half-width t, rotated 45°, as one 12-gon.
      const q = t / Math.SQRT2 * 2;
      return polygon([
        [cx, cy - q], [cx + e - q, cy - e], [cx + e, cy - e + q], [cx + q, cy],
        [cx + e, cy + e - q], [cx + e - q, cy + e], [cx, cy + q], [cx - e + q, cy + e],
        [cx - e, cy + e - q], [cx - q, cy], [cx - e, cy - e + q], [cx - e + q, cy - e],
      ]);
    }
    case 'hopf':
      return circle(cx, cy, r) + circle(cx, cy, r * 0.6) + circle(cx, cy, r * 0.24);
    case 'degenerate': {
      const o = r * 0.86, i = r * 0.5, b = r * 0.16;
      return polygon([[cx - o, cy - o], [cx + o, cy - o], [cx + o, cy + o], [cx - o, cy + o]])
        + polygon([[cx - i, cy - i], [cx + i, cy - i], [cx + i, cy + i], [cx - i, cy + i]])
        + polygon([[cx - i, cy + i - b], [cx + i - b, cy - i], [cx + i, cy - i + b], [cx - i + b, cy + i]]);
    }
  }
}
