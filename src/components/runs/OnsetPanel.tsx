/**
 * Critical coupling per node on the run page (docs/onset.md): for every node, the coupling at which
 * the state "only this node tipped" stops existing (its saddle-node) and which nodes tip next there.
 * A table sortable by critical coupling or by node, and the network drawn with each node coloured by
 * its critical coupling (one light-to-dark ramp of our own, nodes without a fold in the range hatched
 * grey), so that the lakes that drag others along first stand out.
 */
import { useId, useMemo, useState } from 'react';
import { circularLayout, linkSegment } from '../../lib/editor/network-layout';
import { formatValue } from '../../lib/plot/ticks';
import { onsetRows, sortOnsetRows, rampColour, type OnsetRow, type OnsetSort, type OnsetInput } from '../../lib/plot/onset-table';
import './runs.css';

export interface OnsetPanelProps {
  readonly onset: OnsetInput;
  /** Links of the network as the document states them (node ids; twoWay drawn with two arrow heads). */
  readonly links: readonly { readonly from: string; readonly to: string; readonly weight: number; readonly twoWay?: boolean }[];
}

const STATUS_WORDS: Record<string, string> = {
  fold: '',
  'none-in-range': 'no fold in the swept range: the state survives every coupling shown',
  failed: 'not found (see the diagnostics)',
  cancelled: 'not computed (the run was cancelled)',
};

export default function OnsetPanel({ onset, links }: OnsetPanelProps) {
  const [sort, setSort] = useState<OnsetSort>({ key: 'critical', descending: false });
  const rows = useMemo(() => sortOnsetRows(onsetRows(onset), sort), [onset, sort]);
  const range = useMemo(() => {
    const cs = rows.flatMap((r) => (r.critical === null ? [] : [r.critical]));
    return cs.length ? { lo: Math.min(...cs), hi: Math.max(...cs) } : null;
  }, [rows]);
  const header = (key: OnsetSort['key'], label: string) => {
    const active = sort.key === key;
    return (
      <th scope="col" aria-sort={active ? (sort.descending ? 'descending' : 'ascending') : 'none'}>
        <button type="button" className="bm-sort" onClick={() => setSort({ key, descending: active ? !sort.descending : false })} data-testid={`onset-sort-${key}`}>
          {label}{active ? (sort.descending ? ' ↓' : ' ↑') : ''}
        </button>
      </th>
    );
  };
  return (
    <section className="bm-card mb-6" aria-labelledby="onset-h" data-testid="onset-panel">
      <h2 id="onset-h" className="mb-1">Critical coupling per node</h2>
      <p className="text-sm text-ink-soft mb-3">
        For each node: the {onset.parameter} at which the state with only that node tipped stops existing (a saddle-node of its
        branch), and the nodes that tip next just past it. Model results are indicative; defer to domain experts and local regulation.
      </p>
      <div className="flex flex-wrap gap-6 items-start">
        <table className="bm-table text-sm" style={{ width: "auto", minWidth: "26rem" }} data-testid="onset-table">
          <thead>
            <tr>{header('node', 'Node')}{header('critical', `Critical ${onset.parameter}`)}<th scope="col">Tip next</th></tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.id} data-node={r.id}>
                <th scope="row"><span className="onset-swatch" style={{ background: r.critical === null || !range ? undefined : rampColour(r.critical, range.lo, range.hi) }} aria-hidden="true" />{r.id}</th>
                <td className="num">{r.critical === null ? '—' : formatValue(r.critical, 8)}</td>
                <td>{r.critical === null ? STATUS_WORDS[r.status] : r.next === null ? 'not resolved' : r.next.length === 0 ? 'none: it falls back or stays alone' : r.next.join(', ')}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <OnsetNetwork rows={rows} links={links} range={range} parameter={onset.parameter} />
      </div>
    </section>
  );
}

function OnsetNetwork({ rows, links, range, parameter }: { rows: readonly OnsetRow[]; links: OnsetPanelProps['links']; range: { lo: number; hi: number } | null; parameter: string }) {
  const uid = useId().replace(/[^A-Za-z0-9]/g, '');
  const byIndex = [...rows].sort((a, b) => a.index - b.index);
  const size = 260;
  const nodeR = byIndex.length > 12 ? 8 : 15;
  const pos = circularLayout(byIndex.length, size / 2, size / 2, size / 2 - nodeR - 24);
  const index = new Map(byIndex.map((r, i) => [r.id, i]));
  return (
    <figure className="onset-network">
      <svg viewBox={`0 0 ${size} ${size + 34}`} width={size} height={size + 34} role="img" data-testid="onset-network"
        aria-label={`Network coloured by critical ${parameter}: darker tips at a weaker coupling`}>
        <defs>
          <marker id={`${uid}-a`} viewBox="0 0 10 10" refX="9" refY="5" markerUnits="userSpaceOnUse" markerWidth="9" markerHeight="9" orient="auto-start-reverse">
            <path d="M0,1 L9,5 L0,9 z" className="onset-arrow" />
          </marker>
          <pattern id={`${uid}-h`} width="5" height="5" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
            <rect width="5" height="5" className="onset-none-fill" /><line x1="0" y1="0" x2="0" y2="5" className="onset-none-line" />
          </pattern>
        </defs>
        {links.map((l, k) => {
          const a = index.get(l.from), b = index.get(l.to);
          if (a === undefined || b === undefined) return null;
          const seg = linkSegment(pos[a], pos[b], nodeR + 3);
          if (!seg) return null;
          return <line key={k} {...seg} className="onset-link" markerEnd={`url(#${uid}-a)`} markerStart={l.twoWay ? `url(#${uid}-a)` : undefined} />;
        })}
        {byIndex.map((r, i) => (
          <g key={r.id} transform={`translate(${pos[i].x},${pos[i].y})`} data-node={r.id} data-critical={r.critical ?? ''}>
            <circle r={nodeR} className="onset-node" fill={r.critical === null || !range ? `url(#${uid}-h)` : rampColour(r.critical, range.lo, range.hi)} />
            <text y={nodeR + 12} textAnchor="middle" className="onset-label">{r.id}</text>
            <title>{`${r.id}: ${r.critical === null ? STATUS_WORDS[r.status] : `critical ${parameter} = ${formatValue(r.critical, 8)}`}`}</title>
          </g>
        ))}
        {range ? (
          <g transform={`translate(20,${size + 8})`} aria-hidden="true">
            <defs>
              <linearGradient id={`${uid}-g`}>
                {[0, 0.25, 0.5, 0.75, 1].map((t) => <stop key={t} offset={t} stopColor={rampColour(range.lo + t * (range.hi - range.lo), range.lo, range.hi)} />)}
              </linearGradient>
            </defs>
            <rect width={size - 40} height={9} fill={`url(#${uid}-g)`} className="onset-ramp" />
            <text y={22} className="onset-label">{formatValue(range.lo, 4)} (tips first)</text>
            <text x={size - 40} y={22} textAnchor="end" className="onset-label">{formatValue(range.hi, 4)}</text>
          </g>
        ) : null}
      </svg>
      <figcaption className="text-xs text-ink-soft">Darker: the node’s own tipping drags others along at a weaker coupling. Hatched: no fold in the range.</figcaption>
    </figure>
  );
}
