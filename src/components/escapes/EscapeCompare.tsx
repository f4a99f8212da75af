/**
 * Two to four escape studies side by side on the compare page: escape orders, mean first escape
 * time and the lowest exit barrier, each study a marker shape (lib/plot/escape-compare.ts), with the
 * same readouts and exports as a single study's charts.
 */
import { useEffect, useMemo, useState } from 'react';
import type { EscapePoint } from '../../lib/server/escapes/rows';
import { compareChart, type ComparedStudy, type EscapeCompareKind } from '../../lib/plot/escape-compare';
import type { EscapeChartOptions } from '../../lib/plot/escape-charts';
import type { PlotPalette } from '../../lib/plot/palette';
import { isDarkTheme, readPalette, watchTheme } from '../diagram/theme';
import { useWidth } from '../diagram/use-width';
import ChartExport from './ChartExport';
import Chart from './Chart';
import '../diagram/diagram.css';
import './escapes.css';

interface Api {
  provenance: { model: string; versionHash: string; runId: number; engineVersion: string; settings: { paths?: number; seed?: number; noise?: number; start?: string } };
  run: { modelName: string; versionNumber: number; finishedAt: string | null };
  study: { parameter: string; start: string; noise: number; createdAt: string } | null;
  points: EscapePoint[];
}

const CHARTS: { kind: EscapeCompareKind; title: string }[] = [
  { kind: 'sequences', title: 'Escape orders' },
  { kind: 'first-escape', title: 'Time to the first escape' },
  { kind: 'lowest-barrier', title: 'Lowest exit barrier' },
];

export default function EscapeCompare({ runIds }: { runIds: number[] }) {
  const [studies, setStudies] = useState<ComparedStudy[] | null>(null);
  const [error, setError] = useState<string | null>(null);
  const [palette, setPalette] = useState<{ pal: PlotPalette; dark: boolean } | null>(null);
  const [wrapRef, width] = useWidth<HTMLDivElement>(720);

  useEffect(() => {
    let live = true;
    Promise.all(runIds.map(async (id) => {
      const res = await fetch(`/api/runs/${id}/escapes`, { headers: { Accept: 'application/json' } });
      if (!res.ok) throw new Error(`run ${id}: the server answered ${res.status}`);
      const a = (await res.json()) as Api;
      const st = a.provenance.settings;
      return {
        label: `run ${id}`, parameter: a.study?.parameter ?? 'parameter', start: a.study?.start ?? st.start ?? 'all-base', noise: a.study?.noise ?? st.noise ?? null, points: a.points,
        provenance: { modelName: a.provenance.model, versionHash: a.provenance.versionHash, runId: String(id), engineVersion: a.provenance.engineVersion, date: a.study?.createdAt ?? a.run.finishedAt ?? '',
          noise: a.study?.noise ?? st.noise ?? null, paths: st.paths ?? null, seed: st.seed ?? null, start: a.study?.start ?? st.start ?? null },
      } satisfies ComparedStudy;
    })).then((s) => { if (live) setStudies(s); }, (e: unknown) => { if (live) setError(`The escape studies could not be loaded: ${e instanceof Error ? e.message : String(e)}`); });
    return () => { live = false; };
  }, [runIds.join(',')]);

  useEffect(() => {
    const read = () => setPalette({ pal: readPalette(document.querySelector('.es-root')), dark: isDarkTheme() });
    read();
    const stop = watchTheme(read);
    window.addEventListener('bm-theme-change', read);
    return () => { stop(); window.removeEventListener('bm-theme-change', read); };
  }, []);

  const parameters = useMemo(() => new Set(studies?.map((s) => s.parameter)), [studies]);
  const build = (kind: EscapeCompareKind) => (o: EscapeChartOptions) => (studies ? compareChart(kind, studies, o) : null);
  const first = studies?.[0]?.provenance;

  return (
    <div className="dg-diagram es-root bm-card" data-testid="escape-compare">
      <div ref={wrapRef} className="es-width" />
      {error ? <p role="alert" className="dg-error">{error}</p> : null}
      {!studies && !error ? <p className="dg-muted">Loading the escape studies…</p> : null}
      {studies && parameters.size > 1 ? <p role="alert" className="dg-error">These studies sweep different parameters ({[...parameters].join(', ')}); their axes are not comparable.</p> : null}
      {studies && palette && parameters.size === 1 ? CHARTS.map((c) => {
        const fig = compareChart(c.kind, studies, { width: Math.max(360, Math.min(width, 900)), palette: palette.pal, dark: palette.dark });
        return (
          <section key={c.kind} className="es-section" aria-labelledby={`esc-${c.kind}-h`}>
            <div className="dg-toolbar">
              <h3 id={`esc-${c.kind}-h`} className="dg-title" style={{ flexBasis: 'auto' }}>{c.title}</h3>
              {first ? <ChartExport name={`compare-${c.kind}`} label={`${c.title.toLowerCase()} chart`} build={build(c.kind)}
                provenance={{ ...first, runId: runIds.join('-') }} csvUrl={`/api/runs/${runIds[0]}/escapes.csv`} jsonUrl={`/api/runs/${runIds[0]}/escapes`} /> : null}
            </div>
            {fig.marks.length ? <Chart name={`compare-${c.kind}`} fig={fig} /> : <p className="dg-muted">Nothing to draw.</p>}
          </section>
        );
      }) : null}
      {studies ? <p className="dg-muted es-what">Data of each study: {studies.map((s, i) => <span key={i}>{i ? ' · ' : ''}{s.label} <a href={`/api/runs/${runIds[i]}/escapes.csv`} download>CSV</a></span>)}. Model results are indicative; defer to domain experts and local regulation.</p> : null}
    </div>
  );
}
