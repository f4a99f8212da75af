/**
 * Layout of an escape graph for a small drawing: stable states are placed in columns by how many nodes
 * they have tipped (all-base on the left, all-tipped on the right), saddles are curved edges between the
 * two states their unstable manifold reaches.
 */
import type { EscapeGraph, NodeState } from '../regimes/types';

export interface LaidNode { readonly index: number; readonly x: number; readonly y: number; readonly label: string; readonly words: string; readonly tipped: number }
export interface LaidEdge { readonly index: number; readonly d: string; readonly mx: number; readonly my: number; readonly label: string; readonly words: string; readonly kind?: string; readonly from: number; readonly to: number }

/** Compact pattern: ● tipped, ○ base, one per node in node order. */
export function patternGlyphs(pattern: readonly NodeState[]): string {
  return pattern.map((s) => (s === 'tipped' ? '●' : '○')).join('');
}

/** Pattern in words, for screen readers and tables. */
export function patternWords(pattern: readonly NodeState[], names?: readonly string[]): string {
  const tipped = pattern.map((s, i) => (s === 'tipped' ? names?.[i] ?? `node ${i + 1}` : null)).filter(Boolean);
  if (tipped.length === 0) return 'all base';
  if (tipped.length === pattern.length) return 'all tipped';
  return `tipped: ${tipped.join(', ')}`;
}

export function layoutEscapeGraph(g: EscapeGraph, width: number, height: number, names?: readonly string[]): { nodes: LaidNode[]; edges: LaidEdge[] } {
  const n = g.states[0]?.pattern.length ?? 0;
  const cols = new Map<number, number[]>();
  g.states.forEach((s, i) => {
    const t = s.pattern.filter((v) => v === 'tipped').length;
    cols.set(t, [...(cols.get(t) ?? []), i]);
  });
  const pad = 28;
  const nodes: LaidNode[] = [];
  for (const [t, ids] of cols) {
    const x = n === 0 ? width / 2 : pad + ((width - 2 * pad) * t) / Math.max(n, 1);
    ids.forEach((id, k) => {
      const y = pad + ((height - 2 * pad) * (k + 0.5)) / ids.length;
      const s = g.states[id];
      nodes.push({ index: id, x, y, label: patternGlyphs(s.pattern), words: patternWords(s.pattern, names), tipped: t });
    });
  }
  nodes.sort((a, b) => a.index - b.index);
  const pairCount = new Map<string, number>();
  const edges: LaidEdge[] = g.saddles.map((s, i) => {
    const a = nodes[s.from], b = nodes[s.to];
    const key = `${Math.min(s.from, s.to)}-${Math.max(s.from, s.to)}`;
    const k = pairCount.get(key) ?? 0;
    pairCount.set(key, k + 1);
    if (!a || !b) return { index: i, d: '', mx: 0, my: 0, label: patternGlyphs(s.pattern), words: patternWords(s.pattern, names), kind: s.kind, from: s.from, to: s.to };
    const bend = (k % 2 === 0 ? 1 : -1) * (14 + 12 * Math.floor(k / 2));
    const dx = b.x - a.x, dy = b.y - a.y, len = Math.hypot(dx, dy) || 1;
    const mx = (a.x + b.x) / 2 - (dy / len) * bend, my = (a.y + b.y) / 2 + (dx / len) * bend;
    // Quadratic Bézier through (mx, my) at t = 1/2: control point = 2·mid − (a + b)/2.
    const cx = 2 * mx - (a.x + b.x) / 2, cy = 2 * my - (a.y + b.y) / 2;
    return { index: i, d: `M${a.x},${a.y}Q${cx},${cy} ${b.x},${b.y}`, mx, my, label: patternGlyphs(s.pattern), words: patternWords(s.pattern, names), kind: s.kind, from: s.from, to: s.to };
  });
  return { nodes, edges };
}
