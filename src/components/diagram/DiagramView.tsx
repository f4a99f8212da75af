/**
 * The interactive diagram: branches against the swept parameter, drawn on a canvas (thinned to the
 * visible pixels on every frame, so 50,000 points stay smooth), with SVG layers behind (regime bands,
 * manual tags) and in front (axes, special-point glyphs, focus rings, hover) for crisp, focusable marks.
 */
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import { scaleLinear, select, zoom, zoomIdentity, type ZoomBehavior, type ZoomTransform } from 'd3';
import type { SpecialPoint } from '../../lib/atlas/types';
import { diagramExtent, REGIME_LABEL, STABLE_WIDTH, UNSTABLE_DASH, UNSTABLE_WIDTH } from '../../lib/plot/figure';
import { markerFillRule, markerPath, SPECIAL_LABEL } from '../../lib/plot/markers';
import type { PlotPalette } from '../../lib/plot/palette';
import { availableProjections, project, projectionFromKey, projectionKey, projectionLabel, type Projection } from '../../lib/plot/projection';
import { INDICATIVE_NOTE } from '../../lib/plot/provenance';
import { splitRuns, type BranchRun } from '../../lib/plot/runs';
import { labelWidth } from '../../lib/plot/stack-rows';
import { decimateByPixel } from '../../lib/plot/thin';
import { clusterGlyphs, fanOut } from '../../lib/plot/glyph-clusters';
import { placeLabels } from '../../lib/plot/label-place';
import { formatValue, integerTicks, linearAxis } from '../../lib/plot/ticks';
import type { BandTag, EscapeGraph, RegimeBand } from '../../lib/regimes/types';
import { locatedBandEdges, unlabelledInRun } from '../../lib/regimes/band-edge';
import { ExportMenu } from '../export/ExportMenu';
import { DiagramTable } from './DiagramTable';
import { Legend } from './Legend';
import { SidePanel } from './SidePanel';
import { readPalette, watchTheme } from './theme';
import type { DiagramViewProps, Selection } from './types';
import { useWidth } from './use-width';
import './diagram.css';

const M = { left: 66, right: 14, top: 30, bottom: 42 };
const MARKER_R = 7;
const HIT_PX = 9;

const NO_BANDS: RegimeBand[] = [];
const NO_GRAPHS: EscapeGraph[] = [];

interface Projected { readonly ps: Float64Array; readonly ys: Float64Array; readonly runs: BranchRun[] }
interface Drawn { sx: Float32Array; sy: Float32Array; branch: Int32Array; index: Int32Array; n: number }

export function DiagramView(props: DiagramViewProps) {
  const { diagram, regimes = NO_BANDS, escapeGraphs = NO_GRAPHS, thresholds, provenance } = props;
  const height = props.height ?? 420;
  const [wrapRef, width] = useWidth<HTMLDivElement>();
  const rootRef = useRef<HTMLDivElement>(null);
  const canvasRef = useRef<HTMLCanvasElement>(null);
  const overlayRef = useRef<SVGSVGElement>(null);
  const zoomRef = useRef<ZoomBehavior<SVGSVGElement, unknown> | null>(null);
  // Last pointer position over the plot (plot coordinates), so the hover readout can follow a zoom or
  // pan that moves the data under a pointer that does not move.
  const pointerRef = useRef<readonly [number, number] | null>(null);
  const drawnRef = useRef<Drawn>({ sx: new Float32Array(0), sy: new Float32Array(0), branch: new Int32Array(0), index: new Int32Array(0), n: 0 });

  const options = useMemo(() => availableProjections(diagram, thresholds), [diagram, thresholds]);
  // Default: one node's state for one or two nodes (the classic fold picture), the mean state for larger networks.
  const [projKey, setProjKey] = useState(() => props.initialProjection && options.some((o) => o.key === props.initialProjection)
    ? props.initialProjection : diagram.variables.length > 2 ? 'mean' : options[0]?.key ?? 'node:0');
  // A new diagram (live preview after a node was removed) may no longer offer the chosen projection.
  const activeKey = options.some((o) => o.key === projKey) ? projKey : diagram.variables.length > 2 ? 'mean' : options[0]?.key ?? 'node:0';
  const projection: Projection = useMemo(() => projectionFromKey(activeKey, thresholds), [activeKey, thresholds]);
  const [transform, setTransform] = useState<ZoomTransform>(zoomIdentity);
  const [zoomY, setZoomY] = useState(false);
  const [showTags, setShowTags] = useState(true);
  const [tags, setTags] = useState<BandTag[]>(props.tags ?? []);
  const [selection, setSelection] = useState<Selection>(null);
  const [hover, setHover] = useState<{ branch: number; index: number; sx: number; sy: number } | null>(null);
  const [focusId, setFocusId] = useState<string | null>(null);
  const [palette, setPalette] = useState<PlotPalette | null>(null);
  const [drawnCount, setDrawnCount] = useState(0);
  // Bumped after every canvas draw, so that what is placed against the drawn lines (tag names) follows.
  const [drawVersion, setDrawVersion] = useState(0);

  useEffect(() => setTags(props.tags ?? []), [props.tags]);

  const plotW = Math.max(120, width - M.left - M.right);
  const plotH = Math.max(120, height - M.top - M.bottom);

  const projected: Projected[] = useMemo(() => diagram.branches.map((b) => {
    const ps = new Float64Array(b.points.length), ys = new Float64Array(b.points.length);
    b.points.forEach((pt, i) => { ps[i] = pt.p; ys[i] = project(pt.x, projection); });
    return { ps, ys, runs: splitRuns(b) };
  }), [diagram, projection]);
  const crossings = useMemo(() => locatedBandEdges(regimes), [regimes]);
  const specialTypes = useMemo(() => new Set(diagram.bifurcations.map((b) => b.type)), [diagram]);
  const totalPoints = useMemo(() => diagram.branches.reduce((s, b) => s + b.points.length, 0), [diagram]);

  const ext = useMemo(() => diagramExtent(diagram, projection), [diagram, projection]);
  // Stretches of the sweep without a label, drawn hatched with their reason.
  const gaps = useMemo(() => unlabelledInRun(regimes, diagram.settings), [regimes, diagram]);
  const baseX = useMemo(() => {
    const s = (ext.p[1] - ext.p[0]) || 1;
    return scaleLinear().domain([ext.p[0] - 0.02 * s, ext.p[1] + 0.02 * s]).range([0, plotW]);
  }, [ext, plotW]);
  const baseY = useMemo(() => {
    const s = (ext.y[1] - ext.y[0]) || 1;
    const y0 = projection.kind === 'tipped' ? -0.3 : ext.y[0] - 0.06 * s, y1 = projection.kind === 'tipped' ? ext.y[1] + 0.3 : ext.y[1] + 0.06 * s;
    return scaleLinear().domain([y0, y1]).range([plotH, 0]);
  }, [ext, plotH, projection.kind]);
  const xs = useMemo(() => transform.rescaleX(baseX), [transform, baseX]);
  const ys = useMemo(() => (zoomY ? transform.rescaleY(baseY) : baseY), [transform, baseY, zoomY]);
  const xDomain = xs.domain() as [number, number];
  const yDomain = ys.domain() as [number, number];
  const xAxis = linearAxis(xDomain, [0, plotW], Math.max(3, Math.round(plotW / 90)));
  const yAxisFull = linearAxis(yDomain, [plotH, 0], Math.max(3, Math.round(plotH / 60)));
  const yTicks = projection.kind === 'tipped' ? integerTicks(yAxisFull) : yAxisFull.ticks;

  // Theme: read the CSS variables now and whenever <html> changes theme.
  useEffect(() => {
    const read = () => setPalette(readPalette(rootRef.current));
    read();
    return watchTheme(() => requestAnimationFrame(read));
  }, []);

  // d3-zoom on the overlay; the transform lives in React state, the axes follow it.
  useEffect(() => {
    const svg = overlayRef.current;
    if (!svg) return;
    const z = zoom<SVGSVGElement, unknown>()
      .scaleExtent([1, 5000])
      .extent([[M.left, M.top], [M.left + plotW, M.top + plotH]])
      .translateExtent([[M.left - plotW * 0.02, -Infinity], [M.left + plotW * 1.02, Infinity]])
      .filter((ev: MouseEvent) => (!ev.ctrlKey || ev.type === 'wheel') && !ev.button && (ev.type === 'wheel' || !(ev.target instanceof Element && ev.target.closest('.dg-focusable'))))
      .on('zoom', (ev) => setTransform(ev.transform));
    zoomRef.current = z;
    select(svg).call(z).on('dblclick.zoom', null);
    return () => { select(svg).on('.zoom', null); };
  }, [plotW, plotH]);

  const zoomBy = useCallback((k: number) => {
    const svg = overlayRef.current;
    if (svg && zoomRef.current) select(svg).call(zoomRef.current.scaleBy, k, [M.left + plotW / 2, M.top + plotH / 2]);
  }, [plotW, plotH]);
  const panBy = useCallback((dx: number, dy: number) => {
    const svg = overlayRef.current;
    if (svg && zoomRef.current) select(svg).call(zoomRef.current.translateBy, dx / transform.k, dy / transform.k);
  }, [transform.k]);
  const resetView = useCallback(() => {
    const svg = overlayRef.current;
    if (svg && zoomRef.current) select(svg).call(zoomRef.current.transform, zoomIdentity);
  }, []);
  useEffect(() => { resetView(); }, [activeKey, zoomY, resetView]);

  // Canvas: branches, thinned to the pixels in view.
  useEffect(() => {
    const canvas = canvasRef.current;
    if (!canvas || !palette) return;
    const dpr = window.devicePixelRatio || 1;
    canvas.width = Math.round(plotW * dpr);
    canvas.height = Math.round(plotH * dpr);
    const ctx = canvas.getContext('2d');
    if (!ctx) return;
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    ctx.clearRect(0, 0, plotW, plotH);
    ctx.lineJoin = 'round';
    ctx.lineCap = 'round';
    const [d0, d1] = xs.domain() as [number, number];
    const ax = plotW / (d1 - d0), bx = -d0 * ax;
    const [e0, e1] = ys.domain() as [number, number];
    const ay = -plotH / (e1 - e0), by = plotH - e0 * ay;
    const margin = plotW * 0.05;
    let cap = 4096;
    let out: Drawn = { sx: new Float32Array(cap), sy: new Float32Array(cap), branch: new Int32Array(cap), index: new Int32Array(cap), n: 0 };
    const push = (x: number, y: number, b: number, i: number) => {
      // Consecutive runs share their boundary point; count it once.
      if (out.n > 0 && out.branch[out.n - 1] === b && out.index[out.n - 1] === i) return;
      if (out.n === cap) {
        cap *= 2;
        const grow = <A extends Float32Array | Int32Array>(a: A, C: new (n: number) => A) => { const c = new C(cap); c.set(a); return c; };
        out = { sx: grow(out.sx, Float32Array), sy: grow(out.sy, Float32Array), branch: grow(out.branch, Int32Array), index: grow(out.index, Int32Array), n: out.n };
      }
      out.sx[out.n] = x; out.sy[out.n] = y; out.branch[out.n] = b; out.index[out.n] = i; out.n++;
    };
    projected.forEach((pr, b) => {
      for (const run of pr.runs) {
        // Visible stretches of the run: points in view plus one neighbour on each side.
        let segX: number[] = [], segY: number[] = [], segI: number[] = [];
        const flush = () => {
          if (segX.length >= 1) {
            const keep = decimateByPixel(segX, segY, 0.8);
            ctx.beginPath();
            keep.forEach((k, j) => { if (j === 0) ctx.moveTo(segX[k], segY[k]); else ctx.lineTo(segX[k], segY[k]); push(segX[k], segY[k], b, segI[k]); });
            ctx.strokeStyle = run.stable ? palette.stable : palette.unstable;
            ctx.lineWidth = run.stable ? STABLE_WIDTH : UNSTABLE_WIDTH;
            ctx.setLineDash(run.stable ? [] : UNSTABLE_DASH);
            ctx.stroke();
          }
          segX = []; segY = []; segI = [];
        };
        for (let i = run.start; i <= run.end; i++) {
          const x = ax * pr.ps[i] + bx;
          const inView = (v: number) => v >= -margin && v <= plotW + margin;
          const near = inView(x) || (i > run.start && inView(ax * pr.ps[i - 1] + bx)) || (i < run.end && inView(ax * pr.ps[i + 1] + bx));
          if (near) { segX.push(x); segY.push(ay * pr.ys[i] + by); segI.push(i); } else if (segX.length) flush();
        }
        flush();
      }
    });
    drawnRef.current = out;
    setDrawnCount(out.n);
    setDrawVersion((v) => v + 1);
    const at = pointerRef.current;
    if (at) setHover(nearest(at[0], at[1]));
  }, [projected, xs, ys, plotW, plotH, palette]);

  const nearest = useCallback((mx: number, my: number) => {
    const d = drawnRef.current;
    let best = -1, bestD = HIT_PX * HIT_PX;
    for (let k = 0; k < d.n; k++) {
      const dx = d.sx[k] - mx, dy = d.sy[k] - my, q = dx * dx + dy * dy;
      if (q < bestD) { bestD = q; best = k; }
    }
    return best < 0 ? null : { branch: d.branch[best], index: d.index[best], sx: d.sx[best], sy: d.sy[best] };
  }, []);

  const local = (ev: React.MouseEvent) => {
    const r = overlayRef.current!.getBoundingClientRect();
    return [ev.clientX - r.left - M.left, ev.clientY - r.top - M.top] as const;
  };
  const onMove = (ev: React.MouseEvent<SVGSVGElement>) => {
    const [mx, my] = local(ev);
    const inside = mx >= 0 && my >= 0 && mx <= plotW && my <= plotH;
    // Over a glyph or band ribbon its own title speaks; a branch tooltip there would cover the glyph.
    const overGlyph = Boolean((ev.target as Element).closest('.dg-focusable'));
    pointerRef.current = inside && !overGlyph ? [mx, my] : null;
    if (ev.buttons) return;
    setHover(pointerRef.current ? nearest(mx, my) : null);
  };
  const onClick = (ev: React.MouseEvent<SVGSVGElement>) => {
    if ((ev.target as Element).closest('.dg-focusable')) return;
    const [mx, my] = local(ev);
    if (mx < 0 || my < 0 || mx > plotW || my > plotH) return;
    const hit = nearest(mx, my);
    if (hit) { setSelection({ kind: 'point', branch: hit.branch, index: hit.index }); return; }
    const p = xs.invert(mx);
    const bi = regimes.findIndex((b) => p >= b.from && p <= b.to);
    if (bi >= 0) { setSelection({ kind: 'band', index: bi }); return; }
    const gi = gaps.findIndex((g) => p >= g.from && p <= g.to);
    if (gi >= 0) setSelection({ kind: 'gap', index: gi });
  };

  const onKey = (ev: React.KeyboardEvent) => {
    const t = ev.target as Element;
    if (t.closest('input, select, textarea, button, .dg-side')) return;
    const step = plotW * 0.08;
    switch (ev.key) {
      case '+': case '=': zoomBy(1.5); break;
      case '-': case '_': zoomBy(1 / 1.5); break;
      case 'ArrowLeft': if (t === overlayRef.current) panBy(step, 0); else return; break;
      case 'ArrowRight': if (t === overlayRef.current) panBy(-step, 0); else return; break;
      case '0': resetView(); break;
      case 'Escape': setSelection(null); setExpandedGroup(null); break;
      default: return;
    }
    ev.preventDefault();
  };

  // Glyphs closer than 1.6 marker radii would be drawn over each other: one mark with a count instead,
  // fanned out on click (glyph-clusters.ts); a zoom or pan folds an open group again. Recomputed when
  // the view changes, not on every hover re-render (the grouping is quadratic).
  const glyphGroups = useMemo(() => {
    const inView = diagram.bifurcations
      .map((sp) => ({ sp, cx: xs(sp.p), cy: ys(project(sp.x, projection)) }))
      .filter(({ cx, cy }) => cx >= -MARKER_R && cx <= plotW + MARKER_R && cy >= -MARKER_R && cy <= plotH + MARKER_R);
    const byId = new Map(inView.map((g) => [g.sp.id, g]));
    return clusterGlyphs(inView.map((g) => ({ id: g.sp.id, cx: g.cx, cy: g.cy })), 1.6 * MARKER_R)
      .map((c) => ({ cx: c.cx, cy: c.cy, members: c.ids.map((id) => byId.get(id)!) }));
  }, [diagram, xs, ys, projection, plotW, plotH]);

  const [expandedGroup, setExpandedGroup] = useState<string | null>(null);
  useEffect(() => setExpandedGroup(null), [transform, projection]);
  const renderGlyph = (sp: SpecialPoint, cx: number, cy: number) => {
    const selected = selection?.kind === 'special' && selection.id === sp.id;
    return (
      <g key={sp.id} className={`dg-focusable dg-special dg-special-${sp.type}${selected ? ' is-selected' : ''}`} transform={`translate(${cx},${cy})`}
        role="button" tabIndex={0} data-special-id={sp.id} data-type={sp.type}
        aria-label={`${SPECIAL_LABEL[sp.type]} at ${diagram.parameter} = ${formatValue(sp.p)}, ${yLabel} ${formatValue(project(sp.x, projection))}. Open details.`}
        onFocus={() => setFocusId(sp.id)} onBlur={() => setFocusId((f) => (f === sp.id ? null : f))}
        onClick={(e) => { e.stopPropagation(); openSpecial(sp); }} onKeyDown={(e) => keyOpen(e, () => openSpecial(sp))}>
        <title>{`${SPECIAL_LABEL[sp.type]} at ${formatValue(sp.p)}`}</title>
        <circle className="dg-hit" r={MARKER_R + 4} />
        {/* A dashed rounded square, so the focus mark cannot be read as the Hopf ring. */}
        {focusId === sp.id || selected ? <rect className="dg-focus-ring" x={-MARKER_R - 5} y={-MARKER_R - 5} width={2 * MARKER_R + 10} height={2 * MARKER_R + 10} rx={3} /> : null}
        <path d={markerPath(sp.type, 0, 0, MARKER_R)} fillRule={markerFillRule(sp.type)} className="dg-glyph" />
      </g>
    );
  };
  const openSpecial = (sp: SpecialPoint) => setSelection({ kind: 'special', id: sp.id });
  const openSpecialById = useCallback((id: string) => setSelection({ kind: 'special', id }), []);
  const keyOpen = (ev: React.KeyboardEvent, open: () => void) => {
    if (ev.key === 'Enter' || ev.key === ' ') { ev.preventDefault(); ev.stopPropagation(); open(); }
  };

  const addTag = async (tag: BandTag) => {
    if (props.onAddTag) await props.onAddTag(tag);
    else if (props.tagEndpoint) {
      const res = await fetch(props.tagEndpoint, { method: 'POST', headers: { 'content-type': 'application/json' }, body: JSON.stringify(tag) });
      if (!res.ok) {
        let msg = `The server refused the tag (HTTP ${res.status}).`;
        try { const j = await res.json(); if (j?.error?.message ?? j?.message) msg = j.error?.message ?? j.message; } catch { /* body was not JSON */ }
        throw new Error(msg);
      }
    }
    setTags((t) => [...t, tag]);
  };

  const hovered = hover ? diagram.branches[hover.branch]?.points[hover.index] : null;
  const hoverY = hovered ? project(hovered.x, projection) : 0;
  const yLabel = projectionLabel(projection, diagram.variables);
  // Tag names: the lowest line above the bars that no drawn branch and no other name crosses
  // (label-place.ts, against the lines of the last drawn frame; drawVersion re-renders after each draw).
  const tagBox = useCallback((i: number, row: number) => {
    const t = tags[i];
    const x0 = Math.max(-2, xs(t.from)), x1 = Math.min(plotW + 2, xs(t.to));
    if (x1 <= x0) return { x0: -1e9, x1: -1e9, y0: -1e9, y1: -1e9 };
    const y = plotH - 10 - row * 13;
    // labelWidth estimates upright text; the italic names run a little wider: 8 % more. A name that
    // would run past the plot's right edge ends at it instead (a tag near the sweep end).
    const w = 4 + 1.08 * labelWidth(t.name, 10.5);
    const left = Math.max(0, Math.min(x0 + 2, plotW - w - 2));
    return { x0: left, x1: left + w, y0: y - 10, y1: y + 3 };
  }, [tags, xs, plotW, plotH]);
  // Placed once per drawn frame, not on every hover re-render (it tests every drawn segment).
  const tagRows = useMemo(() => (showTags ? placeLabels(tags.length, tagBox, drawnRef.current, Math.max(1, Math.floor((plotH - 20) / 13)), STABLE_WIDTH / 2 + 1.5) : []),
    // drawVersion: drawnRef.current changed.
    [showTags, tags.length, tagBox, plotH, drawVersion]);
  const clipId = useMemo(() => `dg-clip-${Math.random().toString(36).slice(2, 9)}`, []);

  return (
    <div ref={rootRef} className="dg-diagram" data-testid="diagram-view" data-total-points={totalPoints} data-drawn-points={drawnCount}
      data-p-domain={`${xDomain[0]},${xDomain[1]}`} onKeyDown={onKey}>
      <div className="dg-toolbar" role="group" aria-label="Diagram controls">
        {props.title ? <h3 className="dg-title">{props.title}</h3> : null}
        <label className="dg-field">
          <span>Vertical axis</span>
          <select value={activeKey} onChange={(e) => setProjKey(e.target.value)} data-testid="projection-select">
            {options.map((o) => <option key={o.key} value={o.key}>{o.label}</option>)}
          </select>
        </label>
        <div className="dg-buttons">
          <button type="button" onClick={() => zoomBy(1.5)} aria-label="Zoom in">Zoom in</button>
          <button type="button" onClick={() => zoomBy(1 / 1.5)} aria-label="Zoom out">Zoom out</button>
          <button type="button" onClick={resetView} data-testid="reset-view">Reset view</button>
        </div>
        <label className="dg-check"><input type="checkbox" checked={zoomY} onChange={(e) => setZoomY(e.target.checked)} /> Zoom vertical axis too</label>
        <label className="dg-check"><input type="checkbox" checked={showTags} onChange={(e) => setShowTags(e.target.checked)} data-testid="toggle-tags" /> Show manual tags</label>
        {props.canTag && (props.onAddTag || props.tagEndpoint) ? (
          <button type="button" onClick={() => setSelection({ kind: 'range', from: Number(xDomain[0].toPrecision(6)), to: Number(xDomain[1].toPrecision(6)) })} data-testid="tag-range">Tag the range in view…</button>
        ) : null}
        <ExportMenu diagram={diagram} projection={projection} regimes={regimes} escapeGraphs={escapeGraphs} tags={tags} showTags={showTags}
          pDomain={xDomain} yDomain={yDomain} provenance={provenance} documentUrl={props.documentUrl} />
      </div>

      <div className="dg-main" style={{ ['--dg-plot-h' as string]: `${height + 2}px` }}>
        <div ref={wrapRef} className="dg-plot-wrap" style={{ height }}>
          {/* Back layer: bands and manual tags. */}
          <svg className="dg-layer" width={width} height={height} aria-hidden="true">
            <defs>
              <clipPath id={clipId}><rect x={0} y={0} width={plotW} height={plotH} /></clipPath>
              <pattern id={`${clipId}-hatch`} width={8} height={8} patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
                <line x1={0} y1={0} x2={0} y2={8} className="dg-hatch-line" />
              </pattern>
            </defs>
            <g transform={`translate(${M.left},${M.top})`}>
              <rect className="dg-plot-bg" width={plotW} height={plotH} />
              <g clipPath={`url(#${clipId})`}>
                {regimes.map((b, i) => {
                  const x0 = Math.max(-2, xs(b.from)), x1 = Math.min(plotW + 2, xs(b.to));
                  return x1 > x0 ? <rect key={i} className={`dg-band dg-band-${b.regime}`} x={x0} width={x1 - x0} y={0} height={plotH} /> : null;
                })}
                {gaps.map((g, i) => {
                  const x0 = Math.max(-2, xs(g.from)), x1 = Math.min(plotW + 2, xs(g.to));
                  if (x1 <= x0) return null;
                  return (
                    <g key={`gap${i}`} className="dg-unlabelled" data-testid="unlabelled-stretch">
                      <rect x={x0} width={x1 - x0} y={0} height={plotH} fill={`url(#${clipId}-hatch)`} />
                      {x1 - x0 > 140 ? <text x={(x0 + x1) / 2} y={16} textAnchor="middle">not labelled: {g.reason}</text> : null}
                      <title>{`not labelled from ${formatValue(g.from, 4)} to ${formatValue(g.to, 4)}: ${g.reason}`}</title>
                    </g>
                  );
                })}
                {/* Located band edges (saddle connections, engagement crossovers): a dashed line and a diamond, unlike any special-point glyph. */}
                {crossings.map((c) => {
                  const x = xs(c.p);
                  if (x < -2 || x > plotW + 2) return null;
                  return (
                    <g key={`${c.p}|${c.text}`} className={`dg-crossover dg-crossover-${c.kind.replace(' ', '-')}`} data-testid="crossover-mark">
                      <line x1={x} x2={x} y1={0} y2={plotH} strokeDasharray="1 3" />
                      <path d={`M ${x} 2 L ${x + 4} 7 L ${x} 12 L ${x - 4} 7 Z`} />
                      <title>{c.text}</title>
                    </g>
                  );
                })}
                {xAxis.ticks.map((t) => <line key={`gx${t.value}`} className="dg-grid" x1={t.pos} x2={t.pos} y1={0} y2={plotH} />)}
                {yTicks.map((t) => <line key={`gy${t.value}`} className="dg-grid" x1={0} x2={plotW} y1={t.pos} y2={t.pos} />)}
                {showTags && tags.map((t, i) => {
                  const x0 = Math.max(-2, xs(t.from)), x1 = Math.min(plotW + 2, xs(t.to));
                  if (x1 <= x0) return null;
                  return (
                    <g key={i} className="dg-tag" data-testid="tag-layer-item">
                      <rect x={x0} width={x1 - x0} y={0} height={plotH} fill={t.colour} fillOpacity={0.08} />
                      <rect x={x0} width={x1 - x0} y={plotH - 6} height={6} fill={t.colour} />
                      <line x1={x0} x2={x0} y1={0} y2={plotH} stroke={t.colour} strokeDasharray="2 3" />
                      <line x1={x1} x2={x1} y1={0} y2={plotH} stroke={t.colour} strokeDasharray="2 3" />
                    </g>
                  );
                })}
              </g>
            </g>
          </svg>
          <canvas ref={canvasRef} className="dg-layer dg-canvas" data-testid="diagram-canvas"
            style={{ left: M.left, top: M.top, width: plotW, height: plotH }} aria-hidden="true" />
          {/* Front layer: axes, glyphs, hover; receives zoom and pan. */}
          <svg ref={overlayRef} className="dg-layer dg-overlay" width={width} height={height} tabIndex={0}
            role="application" aria-label={`Diagram of ${yLabel} against ${diagram.parameter}. Plus and minus zoom, arrow keys pan, 0 resets. Tab reaches the special points and bands.`}
            onMouseMove={onMove} onMouseLeave={() => { pointerRef.current = null; setHover(null); }} onClick={onClick}>
            <g transform={`translate(${M.left},${M.top})`}>
              <rect width={plotW} height={plotH} fill="transparent" />
              {/* Tag names above the branches (with a halo in case no free line was left), not clickable. */}
              {showTags ? (
                <g className="dg-tag-names" pointerEvents="none" clipPath={`url(#${clipId}-t)`}>
                  {tags.map((t, i) => {
                    const b = tagBox(i, tagRows[i] ?? 0);
                    if (b.x0 < -1e8) return null;
                    return <text key={i} x={b.x0 + 2} y={b.y1 - 3} className="dg-tag-label" data-testid="tag-label">{t.name}</text>;
                  })}
                </g>
              ) : null}
              <defs><clipPath id={`${clipId}-t`}><rect x={0} y={0} width={plotW} height={plotH} /></clipPath></defs>
              {/* Band ribbon above the plot: the regime labels, focusable. */}
              {regimes.map((b, i) => {
                const x0 = Math.max(0, xs(b.from)), x1 = Math.min(plotW, xs(b.to));
                if (x1 - x0 < 3) return null;
                const fits = (t: string) => t.length * 7.4 + 12 < x1 - x0; // 10.5 px capitals with tracking ≈ 7.4 px a glyph (measured on the screenshots)
                const label = fits(REGIME_LABEL[b.regime]) ? REGIME_LABEL[b.regime] : fits(b.regime) ? b.regime : '';
                const selected = selection?.kind === 'band' && selection.index === i;
                return (
                  <g key={i} className={`dg-focusable dg-ribbon dg-ribbon-${b.regime}${selected ? ' is-selected' : ''}`} role="button" tabIndex={0}
                    data-testid="band-ribbon" aria-label={`${REGIME_LABEL[b.regime]} band from ${formatValue(b.from)} to ${formatValue(b.to)}. Open its reason and escape graph.`}
                    onClick={(e) => { e.stopPropagation(); setSelection({ kind: 'band', index: i }); }} onKeyDown={(e) => keyOpen(e, () => setSelection({ kind: 'band', index: i }))}>
                    <rect x={x0 + 0.5} y={-24} width={x1 - x0 - 1} height={18} rx={2} />
                    {label ? <text x={(x0 + x1) / 2} y={-11} textAnchor="middle">{label}</text> : null}
                  </g>
                );
              })}
              {/* Unlabelled stretches get a hatched ribbon of their own: click or Enter opens why. */}
              {gaps.map((g, i) => {
                const x0 = Math.max(-2, xs(g.from)), x1 = Math.min(plotW + 2, xs(g.to));
                if (x1 - x0 < 1) return null;
                const selected = selection?.kind === 'gap' && selection.index === i;
                return (
                  <g key={`gapr${i}`} className={`dg-focusable dg-ribbon dg-ribbon-unlabelled${selected ? ' is-selected' : ''}`} role="button" tabIndex={0}
                    data-testid="unlabelled-ribbon" aria-label={`Not labelled from ${formatValue(g.from)} to ${formatValue(g.to)}. Open why.`}
                    onClick={(e) => { e.stopPropagation(); setSelection({ kind: 'gap', index: i }); }} onKeyDown={(e) => keyOpen(e, () => setSelection({ kind: 'gap', index: i }))}>
                    <rect x={x0 + 0.5} y={-24} width={x1 - x0 - 1} height={18} rx={2} fill={`url(#${clipId}-hatch)`} />
                    {x1 - x0 > 90 ? <text x={(x0 + x1) / 2} y={-11} textAnchor="middle">not labelled</text> : null}
                  </g>
                );
              })}
              {/* Axes. */}
              <g className="dg-axis" transform={`translate(0,${plotH})`}>
                <line x1={0} x2={plotW} />
                {xAxis.ticks.map((t) => (
                  <g key={t.value} transform={`translate(${t.pos},0)`}><line y2={5} /><text y={18} textAnchor="middle">{t.label}</text></g>
                ))}
                <text className="dg-axis-title" x={plotW / 2} y={36} textAnchor="middle">parameter {diagram.parameter}</text>
              </g>
              <g className="dg-axis">
                <line y1={0} y2={plotH} />
                {yTicks.map((t) => (
                  <g key={t.value} transform={`translate(0,${t.pos})`}><line x2={-5} /><text x={-8} dy="0.32em" textAnchor="end">{t.label}</text></g>
                ))}
                <text className="dg-axis-title" transform={`translate(${-M.left + 14},${plotH / 2}) rotate(-90)`} textAnchor="middle">{yLabel}</text>
              </g>
              {/* Hover crosshair. */}
              {hover && hovered ? (
                <g className="dg-hover" pointerEvents="none">
                  <line x1={hover.sx} x2={hover.sx} y1={0} y2={plotH} />
                  <circle cx={hover.sx} cy={hover.sy} r={4.5} />
                </g>
              ) : null}
              {selection?.kind === 'point' ? (() => {
                const pt = diagram.branches[selection.branch]?.points[selection.index];
                if (!pt) return null;
                return <circle className="dg-selected-point" cx={xs(pt.p)} cy={ys(project(pt.x, projection))} r={6} pointerEvents="none" />;
              })() : null}
              {/* Special points. */}
              <g clipPath={`url(#${clipId}-o)`}>
                {glyphGroups.map((group) => {
                  if (group.members.length === 1) return renderGlyph(group.members[0].sp, group.members[0].cx, group.members[0].cy);
                  const key = group.members[0].sp.id;
                  const open = expandedGroup === key;
                  const types = [...new Set(group.members.map((m) => SPECIAL_LABEL[m.sp.type].toLowerCase()))].join(', ');
                  const ps = group.members.map((m) => m.sp.p);
                  const at = Math.min(...ps) === Math.max(...ps) ? formatValue(ps[0]) : `${formatValue(Math.min(...ps))} to ${formatValue(Math.max(...ps))}`;
                  if (!open) {
                    return (
                      <g key={`group-${key}`} className="dg-focusable dg-glyph-group" transform={`translate(${group.cx},${group.cy})`} role="button" tabIndex={0}
                        data-testid="glyph-group" data-group-ids={group.members.map((m) => m.sp.id).join(' ')}
                        aria-label={`${group.members.length} special points (${types}) at ${diagram.parameter} = ${at}, drawn as one mark. Spread them out.`}
                        onClick={(e) => { e.stopPropagation(); setExpandedGroup(key); }} onKeyDown={(e) => keyOpen(e, () => setExpandedGroup(key))}>
                        <title>{`${group.members.length} special points at ${at}: ${types}. Click to spread them out.`}</title>
                        <circle className="dg-hit" r={MARKER_R + 6} />
                        <circle className="dg-group-disc" r={MARKER_R + 3} />
                        <text className="dg-group-count" dy="0.35em" textAnchor="middle">{group.members.length}</text>
                      </g>
                    );
                  }
                  const spots = fanOut(group.cx, group.cy, group.members.length, 2 * MARKER_R + 8, 2 * MARKER_R + 6);
                  return (
                    <g key={`group-${key}`} data-testid="glyph-group-open" data-group-ids={group.members.map((m) => m.sp.id).join(' ')}>
                      <circle className="dg-group-centre" cx={group.cx} cy={group.cy} r={3}
                        onClick={(e) => { e.stopPropagation(); setExpandedGroup(null); }} />
                      {spots.map((q, k) => <line key={k} className="dg-group-leader" x1={group.cx} y1={group.cy} x2={q.x} y2={q.y} />)}
                      {group.members.map((m, k) => renderGlyph(m.sp, spots[k].x, spots[k].y))}
                    </g>
                  );
                })}
              </g>
              <defs><clipPath id={`${clipId}-o`}><rect x={-MARKER_R - 2} y={-MARKER_R - 2} width={plotW + 2 * MARKER_R + 4} height={plotH + 2 * MARKER_R + 4} /></clipPath></defs>
            </g>
          </svg>
          {hover && hovered ? (
            <div className="dg-tooltip" role="status" style={{ left: Math.min(M.left + hover.sx + 14, width - 220), top: Math.max(4, M.top + hover.sy - 70) }}>
              <div className="dg-tooltip-head">Branch {diagram.branches[hover.branch].id} · point {hover.index}</div>
              <div><span>{diagram.parameter}</span> <b>{formatValue(hovered.p)}</b></div>
              <div><span>{yLabel}</span> <b>{formatValue(hoverY)}</b></div>
              <div>{hovered.unstable === 0 ? 'stable' : `unstable (${hovered.unstable} eigenvalue${hovered.unstable > 1 ? 's' : ''} with positive real part)`}</div>
            </div>
          ) : null}
        </div>
        <SidePanel diagram={diagram} projection={projection} selection={selection} regimes={regimes} unlabelled={gaps} escapeGraphs={escapeGraphs} escapeStudies={props.escapeStudies}
          canTag={Boolean(props.canTag && (props.onAddTag || props.tagEndpoint))} onAddTag={addTag} onClose={() => { setSelection(null); overlayRef.current?.focus(); }} />
      </div>

      <div className="dg-status" aria-live="polite">
        Showing {diagram.parameter} from <b>{formatValue(xDomain[0], 4)}</b> to <b>{formatValue(xDomain[1], 4)}</b> · {drawnCount.toLocaleString('en')} of {totalPoints.toLocaleString('en')} points drawn
      </div>
      <Legend regimes={regimes} specialTypes={specialTypes} hasLocatedEdges={crossings.length > 0} hasUnlabelled={gaps.length > 0} showTags={showTags && tags.length > 0} />
      <p className="dg-note">{INDICATIVE_NOTE}</p>
      <DiagramTable diagram={diagram} projection={projection} regimes={regimes} unlabelled={gaps} tags={tags} onOpenSpecial={openSpecialById} />
    </div>
  );
}

export default DiagramView;
export { projectionKey };
