/**
 * The path picture of an escape study (docs/noise.md, "Views of an escape study"): at one of the
 * study's values, the plane of two state variables with the stable states, the saddles, the
 * minimum-action path of every edge out of the start state and the study's first sample paths
 * (GET /api/runs/:id/escapes/paths, drawn by lib/plot/escape-paths.ts). For three variables an axis
 * selector picks the projection. Marks are focusable (Chart); the readouts give exact numbers.
 */
import { useEffect, useMemo, useState } from 'react';
import type { PathPicture as Picture } from '../../lib/noise/path-picture';
import type { EscapeProvenance } from '../../lib/plot/escape-charts';
import { pathFigure } from '../../lib/plot/escape-paths';
import type { PlotPalette } from '../../lib/plot/palette';
import { formatValue } from '../../lib/plot/ticks';
import Chart from './Chart';
import ChartExport from './ChartExport';

export interface PathPictureProps {
  readonly runId: number;
  readonly parameter: string;
  /** The study's finished values. */
  readonly values: readonly number[];
  readonly width: number;
  readonly palette: { pal: PlotPalette; dark: boolean } | null;
  readonly provenance: EscapeProvenance;
}

export default function PathPicture(props: PathPictureProps) {
  const [p, setP] = useState<number>(props.values[0]);
  const [paths, setPaths] = useState(3);
  const [axes, setAxes] = useState<[number, number]>([0, 1]);
  const [state, setState] = useState<{ key: string; picture?: Picture; error?: string } | null>(null);
  const key = `${p}:${paths}`;

  useEffect(() => {
    let stopped = false;
    setState({ key });
    (async () => {
      try {
        const res = await fetch(`/api/runs/${props.runId}/escapes/paths?p=${encodeURIComponent(String(p))}&paths=${paths}`, { headers: { Accept: 'application/json' } });
        const body = await res.json().catch(() => null);
        if (!res.ok) throw new Error(body?.error?.message ?? `the server answered ${res.status}`);
        if (!stopped) setState({ key, picture: body.picture as Picture });
      } catch (e) {
        if (!stopped) setState({ key, error: e instanceof Error ? e.message : String(e) });
      }
    })();
    return () => { stopped = true; };
  }, [props.runId, p, paths, key]);

  const picture = state?.key === key ? state.picture ?? null : null;
  const names = picture?.names ?? [];
  const fig = useMemo(() => (picture && props.palette ? pathFigure(picture, { axes, width: Math.min(props.width, 760), palette: props.palette.pal, dark: props.palette.dark }) : null), [picture, axes, props.width, props.palette]);
  const axisSelect = (which: 0 | 1) => (
    <label>
      {which === 0 ? 'Horizontal axis ' : 'Vertical axis '}
      <select data-testid={`path-axis-${which}`} value={axes[which]} onChange={(e) => {
        const v = Number(e.target.value);
        const other = axes[1 - which];
        const next: [number, number] = which === 0 ? [v, v === other ? axes[0] : other] : [v === other ? axes[1] : other, v];
        setAxes(next);
      }}>
        {names.map((nm, i) => <option key={nm} value={i}>{nm}</option>)}
      </select>
    </label>
  );

  return (
    <section className="es-section" aria-labelledby="es-paths-h" data-testid="escape-path-picture" data-p={p}>
      <div className="dg-toolbar">
        <h3 id="es-paths-h" className="dg-title" style={{ flexBasis: 'auto' }}>Path picture</h3>
        <label>
          {props.parameter} ={' '}
          <select data-testid="path-value" value={String(p)} onChange={(e) => setP(Number(e.target.value))}>
            {props.values.map((v) => <option key={v} value={String(v)}>{formatValue(v)}</option>)}
          </select>
        </label>
        <label>
          Sample paths{' '}
          <select data-testid="path-count" value={paths} onChange={(e) => setPaths(Number(e.target.value))}>
            {[0, 1, 3, 5, 10].map((k) => <option key={k} value={k}>{k}</option>)}
          </select>
        </label>
        {names.length === 3 ? <>{axisSelect(0)}{axisSelect(1)}</> : null}
        <ChartExport name={`paths-${formatValue(p)}`} label="path picture" provenance={props.provenance}
          build={(o) => (picture ? pathFigure(picture, { ...o, axes }) : null)}
          csvUrl={`/api/runs/${props.runId}/escapes.csv`} jsonUrl={`/api/runs/${props.runId}/escapes/paths?p=${encodeURIComponent(String(p))}&paths=${paths}`} />
      </div>
      <p className="dg-muted es-what">
        The plane of two state variables at one value: stable states (discs, the start ringed), saddles (open diamonds), the minimum-action
        path over every saddle out of the start state (lines, one colour and dash each) and the study's first sample paths (thin lines, the
        same random numbers as the study). The likeliest escapes run close to the minimum-action paths as the noise gets weaker. Focus or hover a mark for its numbers.
      </p>
      {state?.error ? <p role="alert" className="dg-error" data-testid="path-error">The path picture could not be computed: {state.error}</p> : null}
      {!picture && !state?.error ? <p className="dg-muted">Computing the path picture…</p> : null}
      {fig ? <Chart name="paths" fig={fig} /> : null}
    </section>
  );
}
