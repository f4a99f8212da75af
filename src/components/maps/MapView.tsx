/**
 * The map view of a two-parameter map run (docs/maps.md, "Maps in the workspace"): the regime
 * regions shaded from the curves in the diagram's band palette, the saddle-node, pitchfork and Hopf
 * curves by line style, the codimension-two points with their own glyphs, the one-parameter diagram
 * of this model as a horizontal line at the document's value of the second parameter, and a
 * crosshair that reads out (p1, p2) under the pointer. Hover (or focus) a curve point or a
 * codimension-two point for its exact stored numbers; click to keep them. Clicking the map (or Enter
 * on the keyboard crosshair: focus the map, move it with the arrow keys) opens the one-parameter
 * diagram at that value of the second parameter in a panel below the map (SlicePanel): a trace run
 * of the same model version with the parameter overridden, computed on demand and cached by the
 * server (POST /api/runs/:id/slices), its line drawn on the map. The figure is the one the export
 * writes (lib/plot/map-figure.ts), drawn as SVG in the page's theme.
 */
import { useCallback, useEffect, useId, useMemo, useRef, useState } from 'react';
import { buildMapFigure, nearestMark, pixelToParameters, type MapFigureInput, type MapMark } from '../../lib/plot/map-figure';
import type { MapDocumentView } from '../../lib/plot/map-types';
import type { PlotPalette } from '../../lib/plot/palette';
import type { Provenance } from '../../lib/plot/provenance';
import { formatValue } from '../../lib/plot/ticks';
import { isDarkTheme, readPalette, watchTheme } from '../diagram/theme';
import { useWidth } from '../diagram/use-width';
import MapExport from './MapExport';
import PrimNode from '../export/PrimNode';
import { documentAtSecond, snapSecond } from '../../lib/plot/map-slice';
import SlicePanel, { type SliceState } from './SlicePanel';
import '../diagram/diagram.css';
import './maps.css';

type Loaded = MapDocumentView & { secondValue?: number };

export interface MapViewProps {
  readonly runId: number;
  readonly provenance: Provenance;
  /** State variable names (node ids or ode variables) for readouts. */
  readonly variables?: readonly string[];
  /** Editors only: the map's model version, for the secondary "save a new version at this value and trace it". */
  readonly start?: { readonly modelId: number; readonly versionNumber: number };
  /** Modelers and owners: a click computes the slice when none is stored; others open existing slices only. */
  readonly canSlice?: boolean;
}

interface SliceRow { readonly id: number; readonly value: number; readonly status: string; readonly progress: number; readonly phrase: string }

const postJson = (url: string, body: unknown) => fetch(url, { method: 'POST', credentials: 'same-origin', headers: { 'Content-Type': 'application/json', Accept: 'application/json' }, body: JSON.stringify(body) });

export default function MapView(props: MapViewProps) {
  const [map, setMap] = useState<Loaded | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [palette, setPalette] = useState<{ pal: PlotPalette; dark: boolean } | null>(null);
  const [hover, setHover] = useState<MapMark | null>(null);
  const [picked, setPicked] = useState<MapMark | null>(null);
  const [cursor, setCursor] = useState<{ x: number; y: number } | null>(null);
  const [wrapRef, width] = useWidth<HTMLDivElement>(720);
  const rootRef = useRef<HTMLDivElement>(null);
  const svgRef = useRef<SVGSVGElement>(null);
  const [tracing, setTracing] = useState<{ busy: boolean; error: string | null }>({ busy: false, error: null });
  const [slices, setSlices] = useState<SliceRow[]>([]);
  const [slice, setSlice] = useState<SliceState | null>(null);
  const clipId = `mp-clip-${useId().replace(/[^a-zA-Z0-9_-]/g, '')}`;

  const load = useCallback(async () => {
    try {
      const res = await fetch(`/api/runs/${props.runId}/map`, { headers: { Accept: 'application/json' } });
      if (!res.ok) throw new Error(`the server answered ${res.status}`);
      setMap((await res.json()) as Loaded);
      setError(null);
    } catch (e) {
      setError(`The map could not be loaded: ${e instanceof Error ? e.message : String(e)}`);
    }
  }, [props.runId]);
  useEffect(() => { void load(); }, [load]);

  const loadSlices = useCallback(async () => {
    const res = await fetch(`/api/runs/${props.runId}/slices`, { headers: { Accept: 'application/json' } }).catch(() => null);
    if (res?.ok) setSlices(((await res.json()) as { slices: SliceRow[] }).slices);
  }, [props.runId]);
  useEffect(() => { void loadSlices(); }, [loadSlices]);

  useEffect(() => {
    const read = () => setPalette({ pal: readPalette(rootRef.current), dark: isDarkTheme() });
    read();
    const stop = watchTheme(read);
    window.addEventListener('bm-theme-change', read);
    return () => { stop(); window.removeEventListener('bm-theme-change', read); };
  }, []);

  const sliceLines = useMemo(() => slices.map((x) => ({ value: x.value, active: slice?.value === x.value })), [slices, slice?.value]);
  const build = useCallback((o: Pick<MapFigureInput, 'width' | 'palette' | 'caption' | 'provenance'>) => (map ? buildMapFigure({ map, secondValue: map.secondValue, variables: props.variables, slices: sliceLines, ...o }) : null), [map, props.variables, sliceLines]);
  const screenWidth = Math.max(360, Math.min(width, 960));
  const fig = useMemo(() => (palette ? build({ width: screenWidth, palette: palette.pal }) : null), [build, palette, screenWidth]);

  const toFigure = (e: React.PointerEvent<SVGSVGElement>) => {
    const svg = svgRef.current;
    if (!svg || !fig) return null;
    const box = svg.getBoundingClientRect();
    return { x: ((e.clientX - box.left) / box.width) * fig.width, y: ((e.clientY - box.top) / box.height) * fig.height };
  };
  const inPlot = (q: { x: number; y: number } | null) => !!(q && fig && q.x >= fig.plot.x && q.x <= fig.plot.x + fig.plot.w && q.y >= fig.plot.y && q.y <= fig.plot.y + fig.plot.h);
  const onMove = (e: React.PointerEvent<SVGSVGElement>) => {
    const q = toFigure(e);
    if (!fig || !q || !inPlot(q)) { setCursor(null); setHover(null); return; }
    setCursor(q);
    setHover(nearestMark(fig.marks.filter((m) => m.kind === 'point'), q.x, q.y, 12) ?? nearestMark(fig.probes, q.x, q.y, 10));
  };
  const names = map ? [String(map.parameters[0]), String(map.parameters[1])] : ['', ''];

  // The one-parameter diagram at `value`: the stored or queued slice, else (editors) a new one.
  const openSlice = async (value: number) => {
    if (!map) return;
    const known = slices.find((x) => x.value === value);
    if (!props.canSlice) {
      setSlice(known ? { value, id: known.id, status: known.status, progress: known.progress, phrase: known.phrase, cached: true }
        : { value, status: 'missing', progress: 0, phrase: '', cached: false });
      return;
    }
    setSlice({ value, id: known?.id, status: known?.status ?? 'starting', progress: known?.progress ?? 0, phrase: known ? known.phrase : 'asking the server', cached: Boolean(known) });
    try {
      const res = await postJson(`/api/runs/${props.runId}/slices`, { value });
      const body = (await res.json().catch(() => null)) as { slice?: SliceRow; run?: { engineVersion: string; finishedAt: string | null }; cached?: boolean; error?: { message?: string } } | null;
      if (!res.ok || !body?.slice) throw new Error(body?.error?.message ?? `the server answered ${res.status}`);
      const s = body.slice;
      setSlice((old) => (old?.value === value ? { value, id: s.id, status: s.status, progress: s.progress, phrase: s.phrase, cached: Boolean(body.cached), engineVersion: body.run?.engineVersion, finishedAt: body.run?.finishedAt ?? null } : old));
      setSlices((old) => [s, ...old.filter((x) => x.value !== s.value)]);
    } catch (e) {
      setSlice((old) => (old?.value === value ? { ...old, status: 'error', error: e instanceof Error ? e.message : String(e) } : old));
    }
  };
  const onSliceUpdate = useCallback((u: { id: number; status: string; progress: number; phrase: string; error?: string; finishedAt?: string | null }) => {
    setSlice((old) => (old && old.id === u.id ? { ...old, ...u } : old));
    setSlices((old) => old.map((x) => (x.id === u.id ? { ...x, status: u.status, progress: u.progress, phrase: u.phrase } : x)));
  }, []);
  // The value of the second parameter at a figure point: a slice's own value within 4 px of its line (a click on
  // the line opens that slice again), else the crosshair's value rounded (snapSecond).
  const valueAt = (q: { x: number; y: number }) => {
    if (!fig || !map) return Number.NaN;
    let best: number | null = null, bestDistance = 4;
    for (const x of slices) {
      const d = Math.abs(fig.yAxis.map(x.value) - q.y);
      if (d <= bestDistance) { best = x.value; bestDistance = d; }
    }
    return best ?? snapSecond(pixelToParameters(fig, q.x, q.y)[1], map.ranges.second);
  };
  // Keyboard crosshair: the map itself is focusable; arrows move it (Shift: ten times as far), Enter opens the slice.
  const onKey = (e: React.KeyboardEvent<SVGSVGElement>) => {
    if (!fig || e.target !== e.currentTarget) return;
    const c = cursor ?? { x: fig.plot.x + fig.plot.w / 2, y: fig.plot.y + fig.plot.h / 2 };
    const step = (e.shiftKey ? 10 : 1) * Math.max(fig.plot.w, fig.plot.h) / 100;
    const move: Record<string, [number, number]> = { ArrowLeft: [-step, 0], ArrowRight: [step, 0], ArrowUp: [0, -step], ArrowDown: [0, step] };
    if (move[e.key]) {
      e.preventDefault();
      setCursor({ x: Math.min(fig.plot.x + fig.plot.w, Math.max(fig.plot.x, c.x + move[e.key][0])), y: Math.min(fig.plot.y + fig.plot.h, Math.max(fig.plot.y, c.y + move[e.key][1])) });
    } else if (e.key === 'Enter' || e.key === ' ') {
      e.preventDefault();
      setCursor(c);
      void openSlice(valueAt(c));
    }
  };

  // Secondary: saves a new version of the model with the second parameter at `value` and starts its trace run over the map's range.
  const traceAt = async (value: number) => {
    if (!props.start || !map) return;
    const { modelId, versionNumber } = props.start;
    setTracing({ busy: true, error: null });
    const post = postJson;
    try {
      const docRes = await fetch(`/api/models/${modelId}/versions/${versionNumber}/export`, { credentials: 'same-origin' });
      if (!docRes.ok) throw new Error(`reading version ${versionNumber}: the server answered ${docRes.status}`);
      const next = documentAtSecond(await docRes.json(), names[1], value);
      if (!next) throw new Error(`the document has no parameter ${names[1]}`);
      const v = await post(`/api/models/${modelId}/versions`, { document: next, changeNote: `${names[1]} = ${value}, picked on the map of run ${props.runId} (from version ${versionNumber})` });
      const vb = (await v.json().catch(() => null)) as { version?: { number: number }; error?: { message?: string } } | null;
      if (!v.ok || !vb?.version) throw new Error(vb?.error?.message ?? `saving the version: the server answered ${v.status}`);
      const [from, to] = map.ranges.first;
      const r = await post('/api/runs', { modelId, version: vb.version.number, kind: 'trace', settings: { from, to } });
      const rb = (await r.json().catch(() => null)) as { run?: { id: number }; error?: { message?: string } } | null;
      if (!r.ok || !rb?.run) throw new Error(rb?.error?.message ?? `starting the run: the server answered ${r.status}`);
      window.location.assign(`/runs/${rb.run.id}`);
    } catch (e) {
      setTracing({ busy: false, error: e instanceof Error ? e.message : String(e) });
    }
  };
  const coords = fig && cursor ? pixelToParameters(fig, cursor.x, cursor.y) : null;
  const shown = hover ?? picked;
  const counts = map ? { curves: map.curves.length, points: map.points.length } : null;
  const warnings = (map?.diagnostics ?? []).filter((d) => d.level !== 'info');

  return (
    <div className="dg-diagram mp-root" ref={rootRef} data-testid="map-view" data-curves={counts?.curves ?? ''} data-points={counts?.points ?? ''}>
      <div ref={wrapRef} className="mp-width" />
      {error ? <p role="alert" className="dg-error">{error} <button type="button" onClick={() => void load()}>Try again</button></p> : null}
      {!map && !error ? <p className="dg-muted">Loading the map…</p> : null}
      {map && fig ? (
        <>
          <div className="dg-toolbar">
            <h3 className="dg-title" style={{ flexBasis: 'auto' }}>{names[1]} against {names[0]}</h3>
            <MapExport build={build} provenance={props.provenance} csvUrl={`/api/runs/${props.runId}/map.csv`} jsonUrl={`/api/runs/${props.runId}/map`} />
          </div>
          <p className="dg-muted mp-what">
            {map.curves.length} curve{map.curves.length === 1 ? '' : 's'} and {map.points.length} codimension-two point{map.points.length === 1 ? '' : 's'}.
            Shaded: the coupling regime, named from a coarse sample grid, bounded by the curves themselves; unshaded where the neighbouring grid rows do not settle it. Move over the map for the parameter values under the pointer;
            hover or focus (Tab) a point for its exact numbers. Click anywhere on the map (or focus it and press Enter; the arrow keys move the crosshair) for the one-parameter diagram at that value of {names[1]}, below the map.
          </p>
          <div className="mp-plot" style={{ maxWidth: fig.width }}>
            <svg ref={svgRef} viewBox={`0 0 ${fig.width} ${fig.height}`} width="100%" role="group" data-testid="map-svg" tabIndex={0} className="mp-svg"
              aria-label={`${fig.title}. Arrow keys move the crosshair; Enter opens the one-parameter diagram at its value of ${names[1]}.`}
              onPointerMove={onMove} onPointerLeave={() => { setCursor(null); setHover(null); }} onKeyDown={onKey}
              onClick={(e) => {
                const q = toFigure(e as unknown as React.PointerEvent<SVGSVGElement>);
                if (hover) setPicked(hover);
                if (q && inPlot(q)) void openSlice(valueAt(q));
              }}>
              <defs><clipPath id={clipId}><rect x={fig.plot.x} y={fig.plot.y} width={fig.plot.w} height={fig.plot.h} /></clipPath></defs>
              <rect width={fig.width} height={fig.height} fill={fig.background} />
              {fig.items.map((p, i) => <PrimNode key={i} p={p} clipId={clipId} />)}
              {cursor ? (
                <g data-testid="map-crosshair">
                  <line className="mp-cross" x1={cursor.x} x2={cursor.x} y1={fig.plot.y} y2={fig.plot.y + fig.plot.h} />
                  <line className="mp-cross" x1={fig.plot.x} x2={fig.plot.x + fig.plot.w} y1={cursor.y} y2={cursor.y} />
                </g>
              ) : null}
              {shown ? <circle className="mp-ring" cx={shown.cx} cy={shown.cy} r={9} /> : null}
              {fig.marks.map((m) => (
                <circle key={m.id} className="mp-hit" cx={m.cx} cy={m.cy} r={m.kind === 'point' ? 10 : 6} tabIndex={0} role="button"
                  aria-label={m.readout.join('; ')} data-testid="map-mark" data-kind={m.kind} data-type={m.type} data-id={m.id}
                  onFocus={() => setHover(m)} onBlur={() => setHover((h) => (h?.id === m.id ? null : h))}
                  onClick={(e) => { e.stopPropagation(); setPicked(m); void openSlice(m.p[1]); }}
                  onKeyDown={(e) => { if (e.key === 'Enter' || e.key === ' ') { e.preventDefault(); setPicked(m); void openSlice(m.p[1]); } }} />
              ))}
            </svg>
            {coords ? <div className="mp-coords" data-testid="map-coords" aria-hidden="true">{names[0]} = {formatValue(coords[0], 4)}, {names[1]} = {formatValue(coords[1], 4)}</div> : null}
            {shown ? (
              <div className="dg-tooltip mp-tooltip" role="status" data-testid="map-readout"
                style={{ left: `${(shown.cx / fig.width) * 100}%`, top: `${(shown.cy / fig.height) * 100}%`, transform: shown.cx > fig.width * 0.6 ? 'translate(calc(-100% - 12px), -50%)' : undefined }}>
                <div className="dg-tooltip-head">{shown.readout[0]}</div>
                {shown.readout.slice(1).map((line, i) => <div key={i}>{line}</div>)}
              </div>
            ) : null}
          </div>
          {picked ? (
            <div className="mp-picked" data-testid="map-picked" aria-live="polite">
              <p><strong>{picked.readout[0]}</strong> <button type="button" onClick={() => setPicked(null)}>Close</button></p>
              {picked.readout.slice(1).map((line, i) => <p key={i} className="num">{line}</p>)}
              {props.start ? (
                <p className="dg-muted">
                  Or keep it in the model&rsquo;s history:{' '}
                  <button type="button" className="mp-secondary" onClick={() => void traceAt(picked.p[1])} disabled={tracing.busy} data-testid="map-trace-at">
                    {tracing.busy ? 'Saving…' : `Save a new model version with ${names[1]} = ${formatValue(picked.p[1])} and trace it`}
                  </button>{' '}
                  (a copy of version {props.start.versionNumber} with {names[1]} = {String(picked.p[1])}, traced over {names[0]} from {String(map.ranges.first[0])} to {String(map.ranges.first[1])}; opens that run).
                </p>
              ) : null}
              {tracing.error ? <p role="alert" className="dg-error">The trace was not started: {tracing.error}</p> : null}
            </div>
          ) : null}
          {slice ? (
            <SlicePanel slice={slice} mapRunId={props.runId} names={names} firstRange={map.ranges.first} provenance={props.provenance}
              onUpdate={onSliceUpdate}
              onClose={() => setSlice(null)} />
          ) : null}
          {warnings.length ? (
            <details className="mp-what"><summary>{warnings.length} note{warnings.length === 1 ? '' : 's'} from the computation</summary>
              <ul>{warnings.map((d, i) => <li key={i}><code>{d.code}</code>: {d.message}</li>)}</ul>
            </details>
          ) : null}
        </>
      ) : null}
      <p className="dg-muted mp-what">Model results are indicative; defer to domain experts and local regulation.</p>
    </div>
  );
}
