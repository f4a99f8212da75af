/** A small drawing of one escape graph: stable states as labelled nodes, index-1 saddles as edges. */
import { layoutEscapeGraph } from '../../lib/plot/escape-layout';
import type { EscapeGraph } from '../../lib/regimes/types';

const KIND_WORDS: Record<string, string> = {
  contained: 'contained: the others can stay put',
  cascading: 'cascading: tipping spreads one after another',
  synchronous: 'synchronous: the nodes tip together',
};

export function EscapeGraphDrawing({ graph, names, width = 280, height = 170 }: { graph: EscapeGraph; names: readonly string[]; width?: number; height?: number }) {
  const { nodes, edges } = layoutEscapeGraph(graph, width, height, names);
  return (
    <figure className="dg-escape">
      <svg width={width} height={height} role="img" aria-label={`Escape graph at ${graph.p}: ${nodes.length} stable states, ${edges.length} saddles`} data-testid="escape-graph">
        <text x={6} y={12} className="dg-escape-axis">fewer tipped</text>
        <text x={width - 6} y={12} className="dg-escape-axis" textAnchor="end">more tipped</text>
        {edges.map((e) => e.d ? (
          <g key={e.index} className={`dg-escape-edge${e.kind ? ` dg-edge-${e.kind}` : ''}`}>
            <path d={e.d} />
            <rect x={e.mx - 4} y={e.my - 4} width={8} height={8} transform={`rotate(45 ${e.mx} ${e.my})`} />
            <title>{`saddle ${e.words}${e.kind ? `; ${KIND_WORDS[e.kind]}` : ''}`}</title>
          </g>
        ) : null)}
        {nodes.map((n) => (
          <g key={n.index} className="dg-escape-node" transform={`translate(${n.x},${n.y})`}>
            <circle r={15} />
            <text dy="0.35em" textAnchor="middle">{n.label}</text>
            <title>{`stable state: ${n.words}`}</title>
          </g>
        ))}
      </svg>
      <figcaption>
        Stable states (circles; ● tipped node, ○ base node, in the order {names.join(', ')}) joined by saddles (diamonds).
      </figcaption>
      {edges.length ? (
        <ul className="dg-escape-list">
          {edges.map((e) => (
            <li key={e.index}>
              Saddle {e.label} ({e.words}) joins {nodes[e.from]?.label ?? '?'} and {nodes[e.to]?.label ?? '?'}{e.kind ? <> — <em>{KIND_WORDS[e.kind]}</em></> : null}
            </li>
          ))}
        </ul>
      ) : <p className="dg-muted">No index-1 saddles at this parameter: nothing can tip here by a small push.</p>}
    </figure>
  );
}
