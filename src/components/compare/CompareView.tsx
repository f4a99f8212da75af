/**
 * Two to four diagrams against one shared, locked parameter axis (zoom or pan one, all follow), stacked
 * (so one parameter value lines up down the page) or overlaid, and tables aligning their special points
 * (by type, on corresponding branches, nearest in parameter and state) and band edges, with differences.
 */
import { useEffect, useMemo, useRef, useState } from 'react';
import { scaleLinear, select, zoom, zoomIdentity, type ZoomTransform } from 'd3';
import type { Diagram } from '../../lib/atlas/types';
import { alignBandEdges, alignSpecialPoints, defaultProjectionKey, type AlignedRow } from '../../lib/plot/compare';
import { diagramExtent, REGIME_LABEL, STABLE_WIDTH, UNSTABLE_DASH, UNSTABLE_WIDTH } from '../../lib/plot/figure';
import { markerFillRule, markerPath, SPECIAL_LABEL } from '../../lib/plot/markers';
import { project, projectionLabel, type Projection } from '../../lib/plot/projection';
import { INDICATIVE_NOTE, type Provenance } from '../../lib/plot/provenance';
import { splitRuns } from '../../lib/plot/runs';
import { thinToBudget } from '../../lib/plot/thin';
import { formatValue, linearAxis } from '../../lib/plot/ticks';
import type { RegimeBand } from '../../lib/regimes/types';
import { useWidth } from '../diagram/use-width';
import '../diagram/diagram.css';
import './compare.css';

export interface CompareItem {
  /** Full name, e.g. "Fenn lakes: restored upper lake v1 (run 3)": panel titles and hover text. */
  readonly label: string;
  /** Short name for column headers, e.g. "run 3" (default: the numeral). */
  readonly shortLabel?: string;
  readonly diagram: Diagram;
  readonly regimes?: RegimeBand[];
  readonly provenance?: Provenance;
}

export interface CompareViewProps {
  /** Two to four diagrams; they must sweep the same parameter. */
  readonly items: CompareItem[];
  readonly initialMode?: 'side' | 'overlay';
}

const M = { left: 66, right: 14, top: 28, bottom: 42 };
/** Overlay identities (compare.css): colour plus a numeral beside every glyph, so diagrams differ without colour too. */
const OVERLAY = ['var(--cmp-line-1)', 'var(--cmp-line-2)', 'var(--cmp-line-3)', 'var(--cmp-line-4)'];
/** Panel heights: as tall as the run page's diagram for two, a little less each for three or four; the overlay taller. */
const panelHeight = (mode: 'side' | 'overlay', count: number) => (mode === 'overlay' ? 540 : count <= 2 ? 420 : 340);

/** The variables all diagrams share (the first n of the shortest list). */
const commonVariables = (items: readonly CompareItem[]) => (items.length ? items[0].diagram.variables.slice(0, Math.min(...items.map((i) => i.diagram.variables.length))) : []);

/** The run page's choices (availableProjections without thresholds) over the shared variables. */
function commonProjections(items: readonly CompareItem[]): { key: string; label: string; projection: Projection }[] {
  const names = commonVariables(items);
  const n = names.length;
  const out: { key: string; label: string; projection: Projection }[] = [];
  for (let i = 0; i < n; i++) out.push({ key: `node:${i}`, label: projectionLabel({ kind: 'node', index: i }, names), projection: { kind: 'node', index: i } });
  if (n > 1) out.push({ key: 'mean', label: 'mean state', projection: { kind: 'mean' } });
  out.push({ key: 'norm', label: 'Euclidean norm of the state', projection: { kind: 'norm' } });
  return out;
}

const shortOf = (items: readonly CompareItem[], i: number) => items[i].shortLabel ?? String(i + 1);

function Panel({ items, indices, projection, transform, onZoom, width, height, overlay, pExtent }: {
  items: readonly CompareItem[]; indices: number[]; projection: Projection; transform: ZoomTransform; onZoom: (t: ZoomTransform) => void;
  width: number; height: number; overlay: boolean; pExtent: [number, number];
}) {
  const ref = useRef<SVGSVGElement>(null);
  const plotW = Math.max(80, width - M.left - M.right), plotH = height - M.top - M.bottom;
  // One vertical range for every panel (the run page's 6 % margins), so stacked panels read alike.
  const yExt = useMemo(() => {
    let lo = Infinity, hi = -Infinity;
    for (const it of items) { const e = diagramExtent(it.diagram, projection).y; lo = Math.min(lo, e[0]); hi = Math.max(hi, e[1]); }
    const s = (hi - lo) || 1;
    return [lo - 0.06 * s, hi + 0.06 * s] as [number, number];
  }, [items, projection]);
  const base = useMemo(() => scaleLinear().domain(pExtent).range([0, plotW]), [pExtent, plotW]);
  const xs = transform.rescaleX(base);
  const ys = scaleLinear().domain(yExt).range([plotH, 0]);
  const xAxis = linearAxis(xs.domain() as [number, number], [0, plotW], Math.max(3, Math.round(plotW / 90)));
  const yAxis = linearAxis(yExt, [plotH, 0], 5);

  useEffect(() => {
    const svg = ref.current;
    if (!svg) return;
    const z = zoom<SVGSVGElement, unknown>().scaleExtent([1, 5000]).extent([[M.left, M.top], [M.left + plotW, M.top + plotH]])
      .translateExtent([[M.left, -Infinity], [M.left + plotW, Infinity]])
      .on('zoom', (ev) => { if (ev.sourceEvent) onZoom(ev.transform); });
    select(svg).call(z).on('dblclick.zoom', null);
    return () => { select(svg).on('.zoom', null); };
  }, [plotW, plotH, onZoom]);
  useEffect(() => {
    // Keep d3's own state in step with the shared transform set through the other panels.
    if (ref.current) (ref.current as unknown as { __zoom: ZoomTransform }).__zoom = transform;
  }, [transform]);

  const clip = `cmp-clip-${indices.join('-')}-${overlay ? 'o' : 's'}`;
  const [d0, d1] = xs.domain() as [number, number];
  const budget = Math.round(plotW * 2);
  return (
    <svg ref={ref} width={width} height={height} className="dg-compare-panel" role="img" data-diagram-indices={indices.join(',')}
      aria-label={`${indices.map((i) => items[i].label).join(' and ')}: ${projectionLabel(projection, items[indices[0]].diagram.variables)} against ${items[0].diagram.parameter}`}>
      <defs><clipPath id={clip}><rect width={plotW} height={plotH} /></clipPath></defs>
      <g transform={`translate(${M.left},${M.top})`}>
        <rect className="dg-plot-bg" width={plotW} height={plotH} />
        <g clipPath={`url(#${clip})`}>
          {!overlay && (items[indices[0]].regimes ?? []).map((b, k) => {
            const x0 = xs(b.from), x1 = xs(b.to);
            return x1 > 0 && x0 < plotW ? <rect key={k} className={`dg-band dg-band-${b.regime}`} x={x0} width={x1 - x0} height={plotH} /> : null;
          })}
          {xAxis.ticks.map((t) => <line key={t.value} className="dg-grid" x1={t.pos} x2={t.pos} y2={plotH} />)}
          {yAxis.ticks.map((t) => <line key={t.value} className="dg-grid" x2={plotW} y1={t.pos} y2={t.pos} />)}
          {indices.map((i) => items[i].diagram.branches.flatMap((b) => splitRuns(b).map((run) => {
            const pts = b.points.slice(run.start, run.end + 1).filter((p, j, arr) => (p.p >= d0 && p.p <= d1) || (arr[j - 1] && arr[j - 1].p >= d0 && arr[j - 1].p <= d1) || (arr[j + 1] && arr[j + 1].p >= d0 && arr[j + 1].p <= d1));
            if (pts.length < 2) return null;
            const sx = pts.map((p) => xs(p.p)), sy = pts.map((p) => ys(project(p.x, projection)));
            const keep = thinToBudget(sx, sy, budget);
            const d = keep.map((k, j) => `${j ? 'L' : 'M'}${sx[k].toFixed(1)},${sy[k].toFixed(1)}`).join('');
            return <path key={`${i}-${b.id}-${run.runIndex}`} d={d} fill="none" data-diagram={i} data-branch={b.id}
              stroke={overlay ? OVERLAY[i] : run.stable ? 'var(--dg-stable)' : 'var(--dg-unstable)'}
              strokeWidth={run.stable ? STABLE_WIDTH : UNSTABLE_WIDTH} strokeDasharray={run.stable ? undefined : UNSTABLE_DASH.join(' ')} strokeLinejoin="round" />;
          })))}
          {indices.map((i) => items[i].diagram.bifurcations.map((sp) => {
            const cx = xs(sp.p), cy = ys(project(sp.x, projection));
            if (cx < -8 || cx > plotW + 8) return null;
            return (
              <g key={`${i}-${sp.id}`} className={`dg-special-${sp.type}`} data-special-id={sp.id}>
                <path className="dg-glyph" d={markerPath(sp.type, cx, cy, 6)} fillRule={markerFillRule(sp.type)} />
                {overlay ? <text x={cx + 7} y={cy - 6} className="dg-overlay-num">{i + 1}</text> : null}
                <title>{`${items[i].label}: ${SPECIAL_LABEL[sp.type]} at ${formatValue(sp.p)}`}</title>
              </g>
            );
          }))}
        </g>
        <g className="dg-axis" transform={`translate(0,${plotH})`}>
          <line x2={plotW} />
          {xAxis.ticks.map((t) => <g key={t.value} transform={`translate(${t.pos},0)`}><line y2={5} /><text y={17} textAnchor="middle">{t.label}</text></g>)}
          <text className="dg-axis-title" x={plotW / 2} y={34} textAnchor="middle">parameter {items[0].diagram.parameter}</text>
        </g>
        <g className="dg-axis">
          <line y2={plotH} />
          {yAxis.ticks.map((t) => <g key={t.value} transform={`translate(0,${t.pos})`}><line x2={-5} /><text x={-8} dy="0.32em" textAnchor="end">{t.label}</text></g>)}
        </g>
        <text x={0} y={-10} className="dg-compare-title">{overlay ? 'Overlaid: ' + indices.map((i) => `${i + 1} = ${shortOf(items, i)}`).join(' · ') : `${indices[0] + 1} · ${items[indices[0]].label}`}</text>
      </g>
    </svg>
  );
}

const stateText = (x: readonly number[], names: readonly string[]) => x.map((v, i) => `${names[i] ?? `x${i + 1}`} ${formatValue(v, 4)}`).join(', ');

/** Hover text of a special-point row: where each diagram's point sits and how far it is from the first. */
function rowDetail(r: AlignedRow, shorts: readonly string[], names: readonly string[]): string | undefined {
  if (!r.states) return undefined;
  return r.states.map((x, i) => `${shorts[i]}: ${x ? `${stateText(x, names)}${i > 0 && r.distances?.[i] != null ? ` (scaled distance ${formatValue(r.distances[i]!, 2)})` : ''}` : 'no counterpart'}`).join('\n');
}

const APART_TITLE = 'How far apart the matched points sit: the largest scaled distance in parameter and state from the row\'s first point (0 = the same place; 1 = the whole range; points more than 0.35 apart are never matched)';

/** The row's largest scaled distance, two decimals; a dash for a point without counterparts. */
function apart(r: AlignedRow): string {
  const d = (r.distances ?? []).filter((v): v is number => v != null);
  return d.length < 2 ? '—' : Math.max(...d).toFixed(2);
}

function AlignedTable({ caption, rows, labels, shorts, names, testId }: { caption: string; rows: AlignedRow[]; labels: string[]; shorts: string[]; names: readonly string[]; testId: string }) {
  if (!rows.length) return null;
  const withApart = rows.some((r) => r.distances);
  return (
    <table data-testid={testId}>
      <caption>{caption}</caption>
      <thead><tr>
        <th scope="col">Matched</th>
        {labels.map((l, i) => <th key={i} scope="col" data-full-name={l}><abbr title={l}>{shorts[i]}</abbr></th>)}
        {labels.slice(1).map((l, i) => <th key={`d${i}`} scope="col"><abbr title={`${l} minus ${labels[0]}`}>Δ {shorts[i + 1]} − {shorts[0]}</abbr></th>)}
        {withApart ? <th scope="col"><abbr title={APART_TITLE}>Apart</abbr></th> : null}
      </tr></thead>
      <tbody>
        {rows.map((r, k) => (
          <tr key={k} className={r.values.some((v) => v == null) ? 'dg-row-missing' : ''} data-ids={r.ids?.map((id) => id ?? '').join(',')}>
            <th scope="row" title={rowDetail(r, shorts, names)}>{r.label}</th>
            {r.values.map((v, i) => <td key={i} className="num">{v == null ? <em>none</em> : formatValue(v, 8)}</td>)}
            {r.deltas.slice(1).map((d, i) => <td key={`d${i}`} className="num">{d == null ? '—' : d === 0 ? '0' : (d > 0 ? '+' : '') + formatValue(d, 4)}</td>)}
            {withApart ? <td className="num" data-apart="">{apart(r)}</td> : null}
          </tr>
        ))}
      </tbody>
    </table>
  );
}

export function CompareView({ items, initialMode = 'side' }: CompareViewProps) {
  const [wrapRef, width] = useWidth<HTMLDivElement>(960);
  const [mode, setMode] = useState(initialMode);
  const [transform, setTransform] = useState<ZoomTransform>(zoomIdentity);
  const options = useMemo(() => commonProjections(items), [items]);
  const [projKey, setProjKey] = useState(() => {
    const key = defaultProjectionKey(commonVariables(items));
    return options.some((o) => o.key === key) ? key : options[0].key;
  });
  const projection = options.find((o) => o.key === projKey)?.projection ?? options[0].projection;
  const pExtent = useMemo(() => {
    let lo = Infinity, hi = -Infinity;
    for (const it of items) { const e = diagramExtent(it.diagram, projection).p; lo = Math.min(lo, e[0]); hi = Math.max(hi, e[1]); }
    const s = (hi - lo) || 1;
    return [lo - 0.02 * s, hi + 0.02 * s] as [number, number];
  }, [items, projection]);
  const special = useMemo(() => alignSpecialPoints(items.map((i) => i.diagram)), [items]);
  const edges = useMemo(() => alignBandEdges(items.map((i) => i.regimes)), [items]);

  if (items.length < 2 || items.length > 4) return <p className="dg-error" role="alert">Compare needs two to four diagrams (got {items.length}).</p>;
  const params = new Set(items.map((i) => i.diagram.parameter));
  if (params.size > 1) return <p className="dg-error" role="alert">These diagrams sweep different parameters ({[...params].join(', ')}); they cannot share one axis.</p>;

  const labels = items.map((i) => i.label);
  const shorts = items.map((_, i) => shortOf(items, i));
  // One column: stacked panels share the parameter axis down the page, so one value lines up vertically.
  const cols = 1;
  const panelW = Math.floor(width);
  const panelH = panelHeight(mode, items.length);
  const zoomBy = (k: number) => setTransform((t) => {
    const cx = (Math.max(80, panelW - M.left - M.right)) / 2 + M.left;
    const nk = Math.min(5000, Math.max(1, t.k * k));
    return zoomIdentity.translate(cx - ((cx - t.x) / t.k) * nk, 0).scale(nk);
  });
  return (
    <section className="dg-diagram dg-compare" data-testid="compare-view" data-projection={projKey} data-mode={mode} aria-label="Comparison of diagrams">
      <div className="dg-toolbar" role="group" aria-label="Comparison controls">
        <h3 className="dg-title">Comparing {items.length} diagrams</h3>
        <label className="dg-field"><span>Vertical axis</span>
          <select value={projKey} data-testid="compare-projection" onChange={(e) => setProjKey(e.target.value)}>{options.map((o) => <option key={o.key} value={o.key}>{o.label}</option>)}</select>
        </label>
        <div className="dg-buttons" role="radiogroup" aria-label="Layout">
          <button type="button" role="radio" aria-checked={mode === 'side'} className={mode === 'side' ? 'is-on' : ''} onClick={() => setMode('side')}>One panel each</button>
          <button type="button" role="radio" aria-checked={mode === 'overlay'} className={mode === 'overlay' ? 'is-on' : ''} onClick={() => setMode('overlay')}>Overlaid</button>
        </div>
        <div className="dg-buttons">
          <button type="button" onClick={() => zoomBy(1.5)}>Zoom in</button>
          <button type="button" onClick={() => zoomBy(1 / 1.5)}>Zoom out</button>
          <button type="button" onClick={() => setTransform(zoomIdentity)}>Reset view</button>
        </div>
      </div>
      <ul className="cmp-who" aria-label="Compared runs">
        {items.map((it, i) => <li key={i}><span className="cmp-num" style={{ color: mode === 'overlay' ? OVERLAY[i] : undefined }}>{i + 1}</span><b>{shorts[i]}</b><span className="dg-muted">{it.label}</span></li>)}
      </ul>
      <p className="dg-muted" style={{ margin: 0 }}>One parameter axis for all: zooming or panning any panel moves every panel.</p>
      <div ref={wrapRef} className="dg-compare-grid" style={{ display: 'grid', gridTemplateColumns: `repeat(${cols}, minmax(0, 1fr))`, gap: 12 }}>
        {mode === 'overlay'
          ? <Panel items={items} indices={items.map((_, i) => i)} projection={projection} transform={transform} onZoom={setTransform} width={panelW} height={panelH} overlay pExtent={pExtent} />
          : items.map((_, i) => <Panel key={i} items={items} indices={[i]} projection={projection} transform={transform} onZoom={setTransform} width={panelW} height={panelH} overlay={false} pExtent={pExtent} />)}
      </div>
      {mode === 'overlay' ? (
        <div className="dg-legend" aria-label="Overlay legend">
          {items.map((it, i) => (
            <span key={i} className="dg-legend-item">
              <svg width={30} height={12} aria-hidden="true"><line x1={2} x2={28} y1={6} y2={6} stroke={OVERLAY[i]} strokeWidth={STABLE_WIDTH} /></svg>
              <b>{i + 1}</b> {it.label}
            </span>
          ))}
          <span className="dg-legend-item">solid: stable · dashed: unstable · numerals beside glyphs name the diagram</span>
        </div>
      ) : null}
      <div className="dg-tables">
        <AlignedTable caption="Special points matched by type, on corresponding branches, nearest in parameter and state (hover a row for the states)" rows={special} labels={labels} shorts={shorts} names={commonVariables(items)} testId="compare-special-table" />
        <AlignedTable caption="Band edges matched by the regimes they separate" rows={edges} labels={labels} shorts={shorts} names={commonVariables(items)} testId="compare-band-table" />
        {!edges.length ? <p className="dg-muted">No regime bands to compare.</p> : null}
        <p className="dg-muted">Bands: {items.map((it, i) => `${shorts[i]}: ${(it.regimes ?? []).map((b) => REGIME_LABEL[b.regime]).join(' → ') || 'none'}`).join('; ')}</p>
      </div>
      <p className="dg-note">{INDICATIVE_NOTE}</p>
    </section>
  );
}

export default CompareView;
