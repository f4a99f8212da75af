/**
 * Drawings of one escape graph: stable states as labelled nodes, index-1 saddles as edges. The small
 * one sits in the band panel; the full-size one (EscapeGraphDialog) opens from it with readable
 * patterns (the tipped nodes named under each state) and clickable states and saddles.
 */
import { useEffect, useRef, useState } from 'react';
import { layoutEscapeGraph } from '../../lib/plot/escape-layout';
import { formatValue } from '../../lib/plot/ticks';
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

type Picked = { kind: 'state'; index: number } | { kind: 'saddle'; index: number } | null;

/** Size of the full drawing: columns by tipped count, rows by the fullest column, each state a labelled box. */
export function fullSize(graph: EscapeGraph): { width: number; height: number } {
  const n = graph.states[0]?.pattern.length ?? 0;
  const perColumn = new Map<number, number>();
  for (const s of graph.states) {
    const t = s.pattern.filter((v) => v === 'tipped').length;
    perColumn.set(t, (perColumn.get(t) ?? 0) + 1);
  }
  const rows = Math.max(1, ...perColumn.values());
  return { width: Math.max(720, Math.min(1500, 190 * (n + 1))), height: Math.max(360, Math.min(2400, 86 * rows + 80)) };
}

/**
 * The full-size escape graph in a modal dialog (native <dialog>: Escape closes it, focus stays
 * inside). Every state and saddle is a button (click, or Tab and Enter); the chosen one's values
 * appear beside the drawing: its state per node, and for a saddle the two states it joins, its kind,
 * unstable eigenvalue and travel times.
 */
export function EscapeGraphDialog({ graph, names, parameter, onClose }: { graph: EscapeGraph; names: readonly string[]; parameter: string; onClose: () => void }) {
  const ref = useRef<HTMLDialogElement>(null);
  const [picked, setPicked] = useState<Picked>(null);
  useEffect(() => {
    const d = ref.current;
    if (d && !d.open) d.showModal();
    return () => { if (d?.open) d.close(); };
  }, []);
  const { width, height } = fullSize(graph);
  // The layout pads for the thumbnail's small circles; the boxes here are up to 200 px wide, so the
  // layout gets the width less a box margin on each side and is shifted right by it.
  const inset = 72;
  const { nodes, edges } = layoutEscapeGraph(graph, width - 2 * inset, height, names);
  const key = (p: Exclude<Picked, null>) => (e: React.KeyboardEvent) => {
    if (e.key === 'Enter' || e.key === ' ') { e.preventDefault(); setPicked(p); }
  };
  const isPicked = (kind: 'state' | 'saddle', index: number) => picked?.kind === kind && picked.index === index;
  return (
    <dialog ref={ref} className="dg-dialog" aria-labelledby="dg-escape-full-h" onClose={onClose} data-testid="escape-graph-dialog">
      <div className="dg-dialog-head">
        <h3 id="dg-escape-full-h">Escape graph at {parameter} = {formatValue(graph.p, 8)}</h3>
        <button type="button" className="dg-close" onClick={() => ref.current?.close()}>Close</button>
      </div>
      <p className="dg-muted">
        Stable states in columns by how many nodes are tipped (● tipped, ○ base, in the order {names.join(', ')}; the tipped
        nodes are named under each state), joined by the index-1 saddles whose unstable manifold reaches both. Click a state
        or a saddle, or tab to it and press Enter, to read its values.
      </p>
      <div className="dg-dialog-body">
        <div className="dg-escape-full-wrap">
          <svg width={width} height={height} className="dg-escape-full" role="group" aria-label={`Escape graph: ${nodes.length} stable states, ${edges.length} saddles`} data-testid="escape-graph-full">
            <text x={8} y={14} className="dg-escape-axis">fewer tipped</text>
            <text x={width - 8} y={14} className="dg-escape-axis" textAnchor="end">more tipped</text>
            <g transform={`translate(${inset},0)`}>
            {edges.map((e) => e.d ? (
              <g key={e.index} className={`dg-escape-edge${e.kind ? ` dg-edge-${e.kind}` : ''}${isPicked('saddle', e.index) ? ' is-picked' : ''}`}
                role="button" tabIndex={0} aria-pressed={isPicked('saddle', e.index)} aria-label={`saddle ${e.words}${e.kind ? `, ${e.kind}` : ''}`}
                onClick={() => setPicked({ kind: 'saddle', index: e.index })} onKeyDown={key({ kind: 'saddle', index: e.index })} data-saddle={e.index}>
                <path d={e.d} />
                <path d={e.d} className="dg-hit" />
                <rect x={e.mx - 6} y={e.my - 6} width={12} height={12} transform={`rotate(45 ${e.mx} ${e.my})`} />
              </g>
            ) : null)}
            {nodes.map((n) => {
              const tippedNames = graph.states[n.index].pattern.flatMap((s, i) => (s === 'tipped' ? [names[i] ?? `node ${i + 1}`] : []));
              const sub = tippedNames.length === 0 ? 'all base' : tippedNames.length === names.length ? 'all tipped' : tippedNames.join(', ');
              const w = Math.max(74, 8.2 * Math.max(n.label.length * 1.6, Math.min(sub.length, 22)) + 16);
              return (
                <g key={n.index} className={`dg-escape-node dg-escape-box${isPicked('state', n.index) ? ' is-picked' : ''}`} transform={`translate(${n.x},${n.y})`}
                  role="button" tabIndex={0} aria-pressed={isPicked('state', n.index)} aria-label={`stable state: ${n.words}`}
                  onClick={() => setPicked({ kind: 'state', index: n.index })} onKeyDown={key({ kind: 'state', index: n.index })} data-state={n.index}>
                  <rect x={-w / 2} y={-21} width={w} height={42} rx={8} />
                  <text y={-3} textAnchor="middle" className="dg-escape-glyphs">{n.label}</text>
                  <text y={14} textAnchor="middle" className="dg-escape-sub">{sub.length > 24 ? `${sub.slice(0, 23)}…` : sub}</text>
                </g>
              );
            })}
            </g>
          </svg>
        </div>
        <aside className="dg-escape-detail" data-testid="escape-graph-detail" aria-live="polite">
          <PickedDetail graph={graph} names={names} picked={picked} labels={nodes.map((n) => n.words)} />
        </aside>
      </div>
    </dialog>
  );
}

function PickedDetail({ graph, names, picked, labels }: { graph: EscapeGraph; names: readonly string[]; picked: Picked; labels: readonly string[] }) {
  if (!picked) return <p className="dg-muted">Nothing chosen yet.</p>;
  const values = (x: readonly number[]) => (
    <table className="dg-kv"><caption>State</caption>
      <tbody>{names.map((n, i) => <tr key={n}><th scope="row">{n}</th><td className="num">{formatValue(x[i], 10)}</td></tr>)}</tbody>
    </table>
  );
  if (picked.kind === 'state') {
    const s = graph.states[picked.index];
    const touching = graph.saddles.filter((e) => e.from === picked.index || e.to === picked.index).length;
    return (
      <>
        <h4>Stable state: {labels[picked.index]}</h4>
        <p>{touching === 0 ? 'No saddle of the graph joins it.' : `${touching} saddle${touching > 1 ? 's' : ''} of the graph join${touching > 1 ? '' : 's'} it.`}</p>
        {values(s.x)}
      </>
    );
  }
  const e = graph.saddles[picked.index];
  return (
    <>
      <h4>Saddle: {labels.length ? `between ${labels[e.from] ?? '?'} and ${labels[e.to] ?? '?'}` : ''}</h4>
      <dl className="dg-dl">
        {e.kind ? <><dt>Kind</dt><dd>{KIND_WORDS[e.kind]}</dd></> : null}
        {e.eigenvalue !== undefined ? <><dt>Unstable eigenvalue</dt><dd className="num">{formatValue(e.eigenvalue, 8)}</dd></> : null}
        {e.travelTimes ? <><dt>Travel times</dt><dd className="num">{formatValue(e.travelTimes[0], 6)} to {labels[e.from]}, {formatValue(e.travelTimes[1], 6)} to {labels[e.to]}</dd></> : null}
        {e.slowPassage !== undefined ? <><dt>Slow passage</dt><dd className="num">{formatValue(e.slowPassage, 6)}</dd></> : null}
      </dl>
      {values(e.x)}
    </>
  );
}
