/**
 * Export of the current view: SVG (vector text in the shipped Inter, embedded), PNG at 1×/2×/4×
 * (the same SVG rasterized by the browser), PDF (pdfkit, see pdf.ts), and the data behind the figure as
 * CSV and JSON. Caption and provenance footer are optional and go into every figure format.
 */
import { useEffect, useId, useRef, useState } from 'react';
import type { Diagram } from '../../lib/atlas/types';
import { diagramToCsv, diagramToJson, safeFileName } from '../../lib/plot/data-export';
import { buildFigure } from '../../lib/plot/figure';
import { projectionKey, projectionLabel, type Projection } from '../../lib/plot/projection';
import { provenanceLine, type Provenance } from '../../lib/plot/provenance';
import { figureToSvg } from '../../lib/plot/svg';
import type { BandTag, EscapeGraph, RegimeBand } from '../../lib/regimes/types';
import { download, svgToPng } from './download';
import { fontFaceCss } from './fonts';

export interface ExportMenuProps {
  readonly diagram: Diagram;
  readonly projection: Projection;
  readonly regimes?: readonly RegimeBand[];
  readonly escapeGraphs?: readonly EscapeGraph[];
  readonly tags?: readonly BandTag[];
  readonly showTags?: boolean;
  readonly pDomain?: readonly [number, number];
  readonly yDomain?: readonly [number, number];
  readonly provenance: Provenance;
  /** Width of exported figures in CSS px (default 720). */
  readonly figureWidth?: number;
}

export function ExportMenu(props: ExportMenuProps) {
  const [open, setOpen] = useState(false);
  const [caption, setCaption] = useState('');
  const [withFooter, setWithFooter] = useState(true);
  const [busy, setBusy] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const panelId = useId();
  const rootRef = useRef<HTMLDivElement>(null);
  const stem = `${props.provenance.modelName}-${props.provenance.runId}-${projectionKey(props.projection).replace(':', '')}`;

  useEffect(() => {
    if (!open) return;
    const away = (e: MouseEvent) => { if (rootRef.current && !rootRef.current.contains(e.target as Node)) setOpen(false); };
    document.addEventListener('mousedown', away);
    return () => document.removeEventListener('mousedown', away);
  }, [open]);

  const figure = () => {
    const provenance = { ...props.provenance, date: props.provenance.date || new Date().toISOString() };
    return buildFigure({
      diagram: props.diagram, projection: props.projection, regimes: props.regimes, tags: props.tags, showTags: props.showTags,
      pDomain: props.pDomain, yDomain: props.yDomain, width: props.figureWidth ?? 720,
      caption: caption.trim() || undefined, provenance: withFooter ? provenance : undefined,
    });
  };
  const svgText = async () => {
    const fig = figure();
    return { fig, svg: figureToSvg(fig, { fontFaceCss: await fontFaceCss(), description: provenanceLine(props.provenance) }) };
  };
  const run = (label: string, task: () => Promise<void>) => async () => {
    setBusy(label); setError(null);
    try { await task(); } catch (e) { setError(`${label} failed: ${e instanceof Error ? e.message : String(e)}`); } finally { setBusy(null); }
  };

  const exportSvg = run('SVG', async () => { const { svg } = await svgText(); download(new Blob([svg], { type: 'image/svg+xml' }), safeFileName(stem, 'svg')); });
  const exportPng = (scale: number) => run(`PNG ${scale}×`, async () => {
    const { fig, svg } = await svgText();
    download(await svgToPng(svg, fig.width, fig.height, scale), safeFileName(`${stem}@${scale}x`, 'png'));
  });
  const exportPdf = run('PDF', async () => {
    const { figureToPdf } = await import('./pdf');
    const fig = figure();
    download(await figureToPdf(fig, { title: fig.title, subject: provenanceLine(props.provenance) }), safeFileName(stem, 'pdf'));
  });
  const exportCsv = run('CSV', async () => { download(new Blob([diagramToCsv(props.diagram, props.projection)], { type: 'text/csv' }), safeFileName(stem, 'csv')); });
  const exportJson = run('JSON', async () => {
    const text = diagramToJson({
      provenance: props.provenance,
      projection: { key: projectionKey(props.projection), label: projectionLabel(props.projection, props.diagram.variables) },
      view: props.pDomain && props.yDomain ? { p: props.pDomain, y: props.yDomain } : undefined,
      diagram: props.diagram, regimes: props.regimes ?? [], escapeGraphs: props.escapeGraphs ?? [], tags: props.tags ?? [],
    });
    download(new Blob([text], { type: 'application/json' }), safeFileName(stem, 'json'));
  });

  return (
    <div className="dg-export" ref={rootRef} onKeyDown={(e) => { if (e.key === 'Escape' && open) { e.stopPropagation(); setOpen(false); } }}>
      <button type="button" aria-expanded={open} aria-controls={panelId} onClick={() => setOpen((o) => !o)} data-testid="export-toggle">Export…</button>
      {open ? (
        <div className="dg-export-panel" id={panelId} role="group" aria-label="Export the current view">
          <label>Caption (optional)
            <textarea rows={2} value={caption} onChange={(e) => setCaption(e.target.value)} data-testid="export-caption" />
          </label>
          <label className="dg-check"><input type="checkbox" checked={withFooter} onChange={(e) => setWithFooter(e.target.checked)} /> Provenance footer</label>
          <p className="dg-muted" style={{ margin: 0, fontSize: '0.75rem' }}>{provenanceLine(props.provenance)}</p>
          <h4>Figure of the current view</h4>
          <div className="dg-export-actions">
            <button type="button" onClick={exportSvg} disabled={!!busy} data-testid="export-svg">SVG</button>
            <button type="button" onClick={exportPng(1)} disabled={!!busy}>PNG 1×</button>
            <button type="button" onClick={exportPng(2)} disabled={!!busy} data-testid="export-png-2">PNG 2×</button>
            <button type="button" onClick={exportPng(4)} disabled={!!busy}>PNG 4×</button>
            <button type="button" onClick={exportPdf} disabled={!!busy} data-testid="export-pdf">PDF</button>
          </div>
          <h4>Data behind it</h4>
          <div className="dg-export-actions">
            <button type="button" onClick={exportCsv} disabled={!!busy} data-testid="export-csv">CSV (one row per point)</button>
            <button type="button" onClick={exportJson} disabled={!!busy} data-testid="export-json">JSON</button>
          </div>
          {busy ? <p role="status" className="dg-muted" style={{ margin: 0 }}>Preparing {busy}…</p> : null}
          {error ? <p role="alert" className="dg-error" style={{ margin: 0 }}>{error}</p> : null}
        </div>
      ) : null}
    </div>
  );
}

export default ExportMenu;
