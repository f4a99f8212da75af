import { useId } from 'react';
import { circularLayout, linkSegment, parseNumber, type LinkRow } from '../../lib/editor';

/**
 * A small drawing of the network: nodes on a circle, one-way links with an arrow at the target,
 * two-way links with arrows at both ends. Opposite one-way links are drawn side by side. Weights are
 * signed: the line width grows with |weight| (1 to 4.5 px, relative to the largest), and negative
 * links are dashed in their own colour, so the sign survives greyscale print and colour blindness.
 */
const MIN_WIDTH = 1;
const MAX_WIDTH = 4.5;
export function NetworkDrawing({ nodeIds, links }: { nodeIds: string[]; links: LinkRow[] }) {
  const uid = useId().replace(/[^A-Za-z0-9]/g, '');
  const size = 240;
  const nodeR = nodeIds.length > 12 ? 7 : 13;
  const pos = circularLayout(nodeIds.length, size / 2, size / 2, size / 2 - nodeR - 22);
  const index = new Map(nodeIds.map((id, i) => [id, i]));
  const pairs = new Set(links.filter((l) => !l.twoWay).map((l) => `${l.from}\u0000${l.to}`));
  const oneWay = links.filter((l) => !l.twoWay).length;
  const twoWay = links.length - oneWay;
  const weights = links.map((l) => parseNumber(l.weight) ?? 0);
  const largest = Math.max(0, ...weights.map(Math.abs));
  const width = (w: number) => (largest === 0 ? MIN_WIDTH : MIN_WIDTH + ((MAX_WIDTH - MIN_WIDTH) * Math.abs(w)) / largest);
  const negative = weights.filter((w) => w < 0).length;
  const summary = `Network drawing: ${nodeIds.length} node${nodeIds.length === 1 ? '' : 's'}, ${oneWay} one-way and ${twoWay} two-way link${twoWay === 1 ? '' : 's'}${negative ? `, ${negative} with a negative weight (dashed)` : ''}; line width shows the size of the weight.`;
  return (
    <svg className="ed-network" viewBox={`0 0 ${size} ${size}`} role="img" aria-label={summary} data-testid="network-drawing">
      <defs>
        <marker id={`${uid}-arrow`} viewBox="0 0 10 10" refX="9" refY="5" markerUnits="userSpaceOnUse" markerWidth="10" markerHeight="10" orient="auto-start-reverse">
          <path d="M0,1 L9,5 L0,9 z" className="ed-arrowhead" />
        </marker>
        <marker id={`${uid}-arrow-neg`} viewBox="0 0 10 10" refX="9" refY="5" markerUnits="userSpaceOnUse" markerWidth="10" markerHeight="10" orient="auto-start-reverse">
          <path d="M0,1 L9,5 L0,9 z" className="ed-arrowhead ed-arrowhead-negative" />
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
        const w = weights[k];
        const look = {
          className: w < 0 ? 'ed-link ed-link-negative' : 'ed-link',
          style: { strokeWidth: width(w) },
          'data-weight': String(w),
        };
        const arrow = `url(#${uid}-arrow${w < 0 ? '-neg' : ''})`;
        if (i === j) {
          const p = pos[i];
          return (
            <path key={k} {...look} d={`M${p.x - 5},${p.y - nodeR} C${p.x - 22},${p.y - nodeR - 28} ${p.x + 22},${p.y - nodeR - 28} ${p.x + 5},${p.y - nodeR}`} fill="none" markerEnd={arrow} data-link={`${l.from}->${l.to}`} />
          );
        }
        // Opposite one-way links sit side by side, far enough apart for the widest line.
        const offset = !l.twoWay && pairs.has(`${l.to}\u0000${l.from}`) ? 2 + MAX_WIDTH / 2 : 0;
        const s = linkSegment(pos[i], pos[j], nodeR + 2, offset);
        if (!s) return null;
        return (
          <line
            key={k}
            {...s}
            {...look}
            markerEnd={arrow}
            markerStart={l.twoWay ? arrow : undefined}
            data-link={`${l.from}${l.twoWay ? '<->' : '->'}${l.to}`}
          />
        );
      })}
      {nodeIds.map((id, i) => (
        <g key={id + i} className="ed-node">
          <circle cx={pos[i].x} cy={pos[i].y} r={nodeR} />
          <text {...labelPlace(pos[i], size / 2, nodeR)}>
            {id.length > 12 ? `${id.slice(0, 11)}…` : id}
          </text>
        </g>
      ))}
    </svg>
  );
}

/**
 * A node's label: above the nodes on the upper part of the circle, below the others, so the links
 * running into a top node from below do not cross its name (side labels would overflow the box).
 */
function labelPlace(p: { x: number; y: number }, centre: number, nodeR: number): { x: number; y: number; textAnchor: 'middle' } {
  const above = p.y < centre - nodeR;
  return { x: p.x, y: above ? p.y - nodeR - 5 : p.y + nodeR + 13, textAnchor: 'middle' };
}
