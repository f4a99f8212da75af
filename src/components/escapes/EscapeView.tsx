/**
 * The views of an escape study on its run page (docs/noise.md, "Views of an escape study"): exit
 * barriers out of the start state with the exit switches, the probability of each escape order
 * (Monte Carlo with 95 % intervals beside the weak-noise prediction), mean escape times on a log
 * axis, and at a clicked parameter value the share of paths still waiting for each escape. The
 * charts are the same Figures the export writes (lib/plot/escape-charts.ts), drawn as SVG in the
 * page's theme; every mark is focusable and its readout gives the exact stored numbers. While the
 * run goes on the island re-reads /api/runs/:id/escapes, so finished values appear as they come.
 */
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import type { EscapePoint } from '../../lib/server/escapes/rows';
import type { ChartMark } from '../../lib/plot/escape-chart';
import { escapeChart, type EscapeChartKind, type EscapeChartOptions, type EscapeProvenance, type EscapeStudyView } from '../../lib/plot/escape-charts';
import { formatValue } from '../../lib/plot/ticks';
import type { PlotPalette } from '../../lib/plot/palette';
import { isDarkTheme, readPalette, watchTheme } from '../diagram/theme';
import { useWidth } from '../diagram/use-width';
import ChartExport from './ChartExport';
import Chart from './Chart';
import PathPicture from './PathPicture';
import '../diagram/diagram.css';
import './escapes.css';

interface ValueProgress { p: number; paths: number; pathsDone: number; status: string }

interface Loaded {
  study: (EscapeStudyView['study'] & { engineVersion?: string; createdAt?: string }) | null;
  points: EscapePoint[];
  run: { status: string };
}

export interface EscapeViewProps {
  readonly runId: number;
  readonly parameter: string;
  readonly start: string;
  readonly provenance: EscapeProvenance;
}

const CHARTS: { kind: Exclude<EscapeChartKind, 'survival'>; title: string; what: string }[] = [
  { kind: 'barriers', title: 'Exit barriers', what: 'Exit barrier of every saddle out of the start state; dotted lines mark exit switches, where the lowest exit changes saddle. Lower barrier, likelier exit: rates go like exp(−barrier / level²).' },
  { kind: 'sequences', title: 'Escape orders', what: 'Probability of each order in which the elements tip: Monte Carlo estimates as points with 95 % intervals (Wilson), the weak-noise prediction as dashed lines.' },
  { kind: 'timing', title: 'Escape times', what: 'Mean time to the k-th escape (95 % interval of the mean) and mean time between consecutive escapes, on a log axis; dashed: the weak-noise prediction of the mean k-th escape time.' },
];

export default function EscapeView(props: EscapeViewProps) {
  const [data, setData] = useState<Loaded | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [palette, setPalette] = useState<{ pal: PlotPalette; dark: boolean } | null>(null);
  const [at, setAt] = useState<number | null>(null);
  const [picked, setPicked] = useState<string | null>(null);
  /** Paths done per value while the run goes on (the worker's progress_detail, /api/runs/:id/progress). */
  const [values, setValues] = useState<ValueProgress[] | null>(null);
  const [wrapRef, width] = useWidth<HTMLDivElement>(720);
  const rootRef = useRef<HTMLDivElement>(null);

  const load = useCallback(async () => {
    try {
      const res = await fetch(`/api/runs/${props.runId}/escapes`, { headers: { Accept: 'application/json' } });
      if (!res.ok) throw new Error(`the server answered ${res.status}`);
      const body = (await res.json()) as Loaded;
      setData(body); setError(null);
      return body.run.status;
    } catch (e) {
      setError(`The escape study could not be loaded: ${e instanceof Error ? e.message : String(e)}`);
      return 'failed';
    }
  }, [props.runId]);

  useEffect(() => {
    let stopped = false;
    let timer: number | undefined;
    const tick = async () => {
      const status = await load();
      if (status === 'queued' || status === 'running') {
        try {
          const res = await fetch(`/api/runs/${props.runId}/progress`, { headers: { Accept: 'application/json' } });
          const body = res.ok ? ((await res.json()) as { progress?: { detail?: { values?: ValueProgress[] } | null } }) : null;
          if (!stopped && Array.isArray(body?.progress?.detail?.values)) setValues(body!.progress!.detail!.values!);
        } catch { /* the progress bar above says what the run does */ }
      } else if (!stopped) setValues(null);
      if (!stopped && (status === 'queued' || status === 'running')) timer = window.setTimeout(tick, 3000);
    };
    void tick();
    return () => { stopped = true; if (timer !== undefined) window.clearTimeout(timer); };
  }, [load]);

  useEffect(() => {
    const read = () => setPalette({ pal: readPalette(rootRef.current), dark: isDarkTheme() });
    read();
    const stop = watchTheme(read);
    window.addEventListener('bm-theme-change', read);
    return () => { stop(); window.removeEventListener('bm-theme-change', read); };
  }, []);

  const view: EscapeStudyView | null = useMemo(() => data && ({
    points: data.points, study: data.study, parameter: data.study?.parameter ?? props.parameter, start: data.study?.start ?? props.start,
  }), [data, props.parameter, props.start]);
  const screenWidth = Math.max(360, Math.min(width, 900));
  const build = useCallback((kind: EscapeChartKind, o: EscapeChartOptions) => (view ? escapeChart(kind, view, o) : null), [view]);
  const screen = (kind: EscapeChartKind) => (palette ? build(kind, { width: screenWidth, palette: palette.pal, dark: palette.dark, at: at ?? undefined }) : null);
  const provenance: EscapeProvenance = { ...props.provenance, engineVersion: data?.study?.engineVersion ?? props.provenance.engineVersion, date: data?.study?.createdAt ?? props.provenance.date };
  const done = data?.points.filter((p) => p.status === 'done') ?? [];
  const survival = at !== null ? screen('survival') : null;
  const pick = (chart: string, m: ChartMark) => {
    if (m.kind !== 'point') return;
    setPicked(`${chart}:${m.id}`);
    setAt(m.x);
  };

  return (
    <div className="dg-diagram es-root" ref={rootRef} data-testid="escape-view" data-values={done.length}>
      <div ref={wrapRef} className="es-width" />
      {error ? <p role="alert" className="dg-error">{error} <button type="button" onClick={() => void load()}>Try again</button></p> : null}
      {!data && !error ? <p className="dg-muted">Loading the escape study…</p> : null}
      {values && values.length ? (
        <section className="es-section" aria-labelledby="es-values-h" data-testid="escape-progress-values">
          <h3 id="es-values-h" className="dg-title" style={{ flexBasis: 'auto' }}>Paths done per value</h3>
          <ul className="es-values">
            {values.map((v, i) => {
              const pct = Math.round((100 * Math.min(v.paths, v.pathsDone)) / Math.max(1, v.paths));
              return (
                <li key={i} data-status={v.status}>
                  <span className="num">{view?.parameter ?? props.parameter} = {formatValue(v.p)}</span>
                  <span className="es-value-bar" role="progressbar" aria-valuemin={0} aria-valuemax={100} aria-valuenow={pct} aria-label={`${view?.parameter ?? props.parameter} = ${formatValue(v.p)}`}><span style={{ width: `${pct}%` }} /></span>
                  <span className="dg-muted">{v.status === 'skipped' ? 'no study possible here' : `${v.pathsDone} of ${v.paths} paths${v.status === 'done' ? ', done' : v.status === 'running' ? ', running' : ''}`}</span>
                </li>
              );
            })}
          </ul>
        </section>
      ) : null}
      {data && done.length === 0 ? <p className="dg-muted" data-testid="escape-empty">No parameter value is finished yet; the charts fill in as values finish.</p> : null}
      {data && done.length > 0 ? CHARTS.map((c) => {
        const fig = screen(c.kind);
        return (
          <section key={c.kind} className="es-section" aria-labelledby={`es-${c.kind}-h`}>
            <div className="dg-toolbar">
              <h3 id={`es-${c.kind}-h`} className="dg-title" style={{ flexBasis: 'auto' }}>{c.title}</h3>
              <ChartExport name={c.kind} label={`${c.title.toLowerCase()} chart`} build={(o) => build(c.kind, o)} provenance={provenance}
                csvUrl={`/api/runs/${props.runId}/escapes.csv`} jsonUrl={`/api/runs/${props.runId}/escapes`} />
            </div>
            <p className="dg-muted es-what">{c.what}{c.kind !== 'barriers' ? ' Click a point to see the waiting times at that value.' : ''}</p>
            {fig && fig.marks.length ? <Chart name={c.kind} fig={fig} onPick={(m) => pick(c.kind, m)} picked={picked?.startsWith(`${c.kind}:`) ? picked.slice(c.kind.length + 1) : null} /> : <p className="dg-muted">Nothing to draw: {c.kind === 'barriers' ? 'no finite barrier out of the start state at the finished values' : 'no finished path statistics'}.</p>}
          </section>
        );
      }) : null}
      {survival && at !== null ? (
        <section className="es-section" aria-labelledby="es-survival-h" data-testid="escape-survival" data-at={at}>
          <div className="dg-toolbar">
            <h3 id="es-survival-h" className="dg-title" style={{ flexBasis: 'auto' }}>Waiting times at {view?.parameter} = {formatValue(at)}</h3>
            <ChartExport name="survival" label="waiting-time chart" build={(o) => build('survival', { ...o, at })} provenance={provenance}
              csvUrl={`/api/runs/${props.runId}/escapes.csv`} jsonUrl={`/api/runs/${props.runId}/escapes`} />
            <button type="button" onClick={() => { setAt(null); setPicked(null); }}>Close</button>
          </div>
          <p className="dg-muted es-what">Share of paths that have not yet had their k-th escape by time t, from the stored 20-bin histograms (exact at the bin edges); paths capped at the time limit count as still waiting.</p>
          <Chart name="survival" fig={survival} />
        </section>
      ) : null}
      {data?.run.status === 'done' && data.study && done.length > 0 && (done[0].escapeTimes.length === 2 || done[0].escapeTimes.length === 3) ? (
        // Path picture: only for 2- and 3-variable models (one escape-time row per node).
        <PathPicture runId={props.runId} parameter={view?.parameter ?? props.parameter} values={done.map((q) => q.p)} width={screenWidth} palette={palette} provenance={provenance} />
      ) : null}
      <p className="dg-muted es-what">Model results are indicative; defer to domain experts and local regulation.</p>
    </div>
  );
}
