import { useId } from 'react';
import { circularLayout, linkSegment, type LinkRow } from '../../lib/editor';

/**
 * A small drawing of the network: nodes on a circle, one-way links with an arrow at the target,
 * two-way links with arrows at both ends. Opposite one-way links are drawn side by side.
 */
export function NetworkDrawing({ nodeIds, links }: { nodeIds: string[]; links: LinkRow[] }) {
  const uid = useId().replace(/[^A-Za-z0-9]/g, '');
  const size = 240;
  const nodeR = nodeIds.length > 12 ? 7 : 13;
  const pos = circularLayout(nodeIds.length, size / 2, size / 2, size / 2 - nodeR - 22);
  const index = new Map(nodeIds.map((id, i) => [id, i]));
  const pairs = new Set(links.filter((l) => !l.twoWay).map((l) => `${l.from}\u0000${l.to}`));
  const oneWay = links.filter((l) => !l.twoWay).length;
  const twoWay = links.length - oneWay;
  const summary = `Network drawing: ${nodeIds.length} node${nodeIds.length === 1 ? '' : 's'}, ${oneWay} one-way and ${twoWay} two-way link${twoWay === 1 ? '' : 's'}.`;
  return (
    <svg className="ed-network" viewBox={`0 0 ${size} ${size}`} role="img" aria-label={summary} data-testid="network-drawing">
      <defs>
        <marker id={`${uid}-arrow`} viewBox="0 0 10 10" refX="9" refY="5" markerWidth="7" markerHeight="7" orient="auto-start-reverse">
          <path d="M0,1 L9,5 L0,9 z" className="ed-arrowhead" />
        </marker>
      </defs>
      {nodeIds.length === 0 ? (
        <text x={size / 2} y={size / 2} textAnchor="middle" className="ed-net-empty">
          No nodes yet
        </text>
      ) : null}
      {links.map((l, k) => {
        const i = index.get(l.from);
        const j = index.get(l.to);
        if (i === undefined || j === undefined) return null;
        if (i === j) {
          const p = pos[i];
          return (
            <path key={k} className="ed-link" d={`M${p.x - 5},${p.y - nodeR} C${p.x - 22},${p.y - nodeR - 28} ${p.x + 22},${p.y - nodeR - 28} ${p.x + 5},${p.y - nodeR}`} fill="none" markerEnd={`url(#${uid}-arrow)`} data-link={`${l.from}->${l.to}`} />
          );
        }
        const offset = !l.twoWay && pairs.has(`${l.to}\u0000${l.from}`) ? 4 : 0;
        const s = linkSegment(pos[i], pos[j], nodeR + 2, offset);
        if (!s) return null;
        return (
          <line
            key={k}
            {...s}
            className="ed-link"
            markerEnd={`url(#${uid}-arrow)`}
            markerStart={l.twoWay ? `url(#${uid}-arrow)` : undefined}
            data-link={`${l.from}${l.twoWay ? '<->' : '->'}${l.to}`}
          />
        );
      })}
      {nodeIds.map((id, i) => (
        <g key={id + i} className="ed-node">
          <circle cx={pos[i].x} cy={pos[i].y} r={nodeR} />
          <text x={pos[i].x} y={pos[i].y + nodeR + 13} textAnchor="middle">
            {id.length > 12 ? `${id.slice(0, 11)}…` : id}
          </text>
        </g>
      ))}
    </svg>
  );
}
