/**
 * One drawing primitive of a Figure (src/lib/plot/figure.ts) as a React SVG element, for the islands
 * that draw on screen the Figure their export writes (escape-study charts, the map). `data` entries
 * become data-* attributes; clipped primitives use the plot's clip path `clipId`.
 */
import type { Prim } from '../../lib/plot/figure';
import { MONO } from '../../lib/plot/svg';

export default function PrimNode({ p, clipId }: { p: Prim; clipId: string }) {
  const clip = p.clip ? `url(#${clipId})` : undefined;
  const data = Object.fromEntries(Object.entries(p.data ?? {}).map(([k, v]) => [`data-${k}`, v]));
  switch (p.t) {
    case 'rect':
      return <rect x={p.x} y={p.y} width={p.w} height={p.h} fill={p.fill} fillOpacity={p.opacity} stroke={p.stroke} strokeWidth={p.stroke ? p.strokeWidth ?? 1 : undefined} clipPath={clip} {...data} />;
    case 'path':
      return <path d={p.d} fill={p.fill ?? 'none'} fillRule={p.fillRule} stroke={p.stroke} strokeWidth={p.stroke ? p.strokeWidth ?? 1 : undefined} strokeDasharray={p.dash?.join(' ')} strokeLinecap={p.linecap} strokeLinejoin={p.linecap ? 'round' : undefined} opacity={p.opacity} clipPath={clip} {...data} />;
    case 'text':
      return <text x={p.x} y={p.y} fontSize={p.size} fontWeight={p.weight === 600 ? 600 : undefined} fontStyle={p.italic ? 'italic' : undefined} textAnchor={p.anchor} fill={p.fill} fontFamily={p.mono ? MONO : undefined} transform={p.rotate ? `rotate(${p.rotate} ${p.x} ${p.y})` : undefined} clipPath={clip} {...data}>{p.text}</text>;
  }
}
