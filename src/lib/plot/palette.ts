/**
 * Brinkmap's plotting palette ("watershed"), invented for this product. The interactive view reads
 * the same roles from CSS variables so it follows the theme; exported figures use the paper set.
 * Contrast of ink and marker colours against the paper was checked with contrastRatio below (WCAG 2.1
 * relative-luminance formula, https://www.w3.org/TR/WCAG21/#dfn-contrast-ratio).
 */
import type { SpecialPointType } from '../atlas/types';
import type { Regime } from '../regimes/types';

export interface PlotPalette {
  readonly paper: string;
  readonly ink: string;
  readonly muted: string;
  readonly grid: string;
  readonly stable: string;
  readonly unstable: string;
  readonly marker: Record<SpecialPointType, string>;
  readonly band: Record<Regime, string>;
  readonly bandInk: Record<Regime, string>;
}

/** Light paper set, used by exports (figures go into papers, which are light). */
export const PAPER_PALETTE: PlotPalette = {
  paper: '#fbfaf6',
  ink: '#17212b',
  muted: '#55606b',
  grid: '#e3e1d8',
  stable: '#123b57',
  unstable: '#8a4b14',
  marker: {
    'saddle-node': '#b0243f',
    pitchfork: '#1f6f5c',
    transcritical: '#5a3f9e',
    hopf: '#9c5a00',
    degenerate: '#4a4f57',
  },
  band: { weak: '#d9ece9', intermediate: '#f6e6c8', strong: '#ead9ec' },
  bandInk: { weak: '#1f5e57', intermediate: '#7a4d06', strong: '#6b2f73' },
};

/** Dark set, the same roles for the dark theme (mirrors the CSS variables of the diagram island). */
export const NIGHT_PALETTE: PlotPalette = {
  paper: '#11161c',
  ink: '#e6e9ec',
  muted: '#a5adb6',
  grid: '#27303a',
  stable: '#8fc6ea',
  unstable: '#f0b27a',
  marker: {
    'saddle-node': '#ff7d93',
    pitchfork: '#5fd3b4',
    transcritical: '#b9a5ff',
    hopf: '#ffc45c',
    degenerate: '#c5cad1',
  },
  band: { weak: '#142b2a', intermediate: '#2e2818', strong: '#2b2032' },
  bandInk: { weak: '#8fd9cc', intermediate: '#f1c97a', strong: '#e3aef0' },
};

function channel(c: number): number {
  const s = c / 255;
  return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
}

/** WCAG 2.1 relative luminance of #rrggbb. */
export function relativeLuminance(hex: string): number {
  const m = /^#?([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex);
  if (!m) throw new Error(`colour: expected #rrggbb, got ${hex}`);
  const [r, g, b] = [m[1], m[2], m[3]].map((h) => channel(parseInt(h, 16)));
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

/** WCAG 2.1 contrast ratio (L1 + 0.05) / (L2 + 0.05), L1 the lighter. */
export function contrastRatio(a: string, b: string): number {
  const la = relativeLuminance(a), lb = relativeLuminance(b);
  const [hi, lo] = la > lb ? [la, lb] : [lb, la];
  return (hi + 0.05) / (lo + 0.05);
}
