/**
 * Export of the map figure with the diagram's export machinery (src/components/export): SVG (the
 * shipped Inter embedded), PNG (that SVG rasterized, resolution in a pHYs chunk), PDF (pdfkit, loaded
 * on demand), each with the provenance footer and an optional caption, light or dark; and the map's
 * data as CSV (curve points) and JSON (the whole map, the CLI's shape).
 */
import { useEffect, useId, useRef, useState } from 'react';
import type { MapFigure, MapFigureInput } from '../../lib/plot/map-figure';
import { safeFileName } from '../../lib/plot/data-export';
import { NIGHT_PALETTE, PAPER_PALETTE } from '../../lib/plot/palette';
import { withResolution } from '../../lib/plot/paper';
import { provenanceLine, type Provenance } from '../../lib/plot/provenance';
import { figureToSvg } from '../../lib/plot/svg';
import { download, svgToPng } from '../export/download';
import { fontFaceCss } from '../export/fonts';

export interface MapExportProps {
  readonly build: (o: Pick<MapFigureInput, 'width' | 'palette' | 'caption' | 'provenance'>) => MapFigure | null;
  readonly provenance: Provenance;
  readonly csvUrl: string;
  readonly jsonUrl: string;
}

export default function MapExport(props: MapExportProps) {
  const [open, setOpen] = useState(false);
  const [caption, setCaption] = useState('');
  const [withFooter, setWithFooter] = useState(true);
  const [dark, setDark] = useState(false);
  const [busy, setBusy] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const panelId = useId();
  const rootRef = useRef<HTMLDivElement>(null);
  const stem = `${props.provenance.modelName}-${props.provenance.runId}-map`;

  useEffect(() => {
    if (!open) return;
    const away = (e: MouseEvent) => { if (rootRef.current && !rootRef.current.contains(e.target as Node)) setOpen(false); };
    document.addEventListener('mousedown', away);
    return () => document.removeEventListener('mousedown', away);
  }, [open]);

  const description = `${provenanceLine(props.provenance)} · Model results are indicative; defer to domain experts and local regulation.`;
  const figure = (): MapFigure => {
    const provenance = { ...props.provenance, date: props.provenance.date || new Date().toISOString() };
    const fig = props.build({ width: 720, palette: dark ? NIGHT_PALETTE : PAPER_PALETTE, caption: caption.trim() || undefined, provenance: withFooter ? provenance : undefined });
    if (!fig) throw new Error('the map is not loaded yet');
    return fig;
  };
  const svgText = async () => { const fig = figure(); return { fig, svg: figureToSvg(fig, { fontFaceCss: await fontFaceCss(), description }) }; };
  const run = (label: string, task: () => Promise<void>) => async () => {
    setBusy(label); setError(null);
    try { await task(); } catch (e) { setError(`${label} failed: ${e instanceof Error ? e.message : String(e)}`); } finally { setBusy(null); }
  };
  const exportSvg = run('SVG', async () => { const { svg } = await svgText(); download(new Blob([svg], { type: 'image/svg+xml' }), safeFileName(stem, 'svg')); });
  const exportPng = (factor: number) => run(`PNG ${factor}×`, async () => {
    const { fig, svg } = await svgText();
    const png = new Uint8Array(await (await svgToPng(svg, fig.width, fig.height, factor)).arrayBuffer());
    download(new Blob([withResolution(png, 96 * factor) as Uint8Array<ArrayBuffer>], { type: 'image/png' }), safeFileName(`${stem}@${factor}x`, 'png'));
  });
  const exportPdf = run('PDF', async () => {
    const { figureToPdf } = await import('../export/pdf');
    const fig = figure();
    download(await figureToPdf(fig, { title: fig.title, subject: description }), safeFileName(stem, 'pdf'));
  });

  return (
    <div className="dg-export" ref={rootRef} onKeyDown={(e) => { if (e.key === 'Escape' && open) { e.stopPropagation(); setOpen(false); } }}>
      <button type="button" aria-expanded={open} aria-controls={panelId} onClick={() => setOpen((o) => !o)} data-testid="map-export-toggle">Export…</button>
      {open ? (
        <div className="dg-export-panel" id={panelId} role="group" aria-label="Export the map">
          <label>Caption (optional)
            <textarea rows={2} value={caption} onChange={(e) => setCaption(e.target.value)} />
          </label>
          <label className="dg-check"><input type="checkbox" checked={withFooter} onChange={(e) => setWithFooter(e.target.checked)} /> Provenance footer</label>
          <p className="dg-muted" style={{ margin: 0, fontSize: '0.75rem' }}>{description}</p>
          <label>Colours
            <select value={dark ? 'dark' : 'light'} onChange={(e) => setDark(e.target.value === 'dark')}><option value="light">Light</option><option value="dark">Dark</option></select>
          </label>
          <h4>Figure (720 px wide)</h4>
          <div className="dg-export-actions">
            <button type="button" onClick={exportSvg} disabled={!!busy} data-testid="map-export-svg">SVG</button>
            <button type="button" onClick={exportPng(2)} disabled={!!busy} data-testid="map-export-png">PNG 2×</button>
            <button type="button" onClick={exportPng(4)} disabled={!!busy}>PNG 4×</button>
            <button type="button" onClick={exportPdf} disabled={!!busy} data-testid="map-export-pdf">PDF</button>
          </div>
          <h4>Data behind it</h4>
          <div className="dg-export-actions">
            <a className="mp-link-button" href={props.csvUrl} download>CSV (curve points)</a>
            <a className="mp-link-button" href={props.jsonUrl} download={safeFileName(stem, 'json')}>JSON (whole map)</a>
          </div>
          {busy ? <p role="status" className="dg-muted" style={{ margin: 0 }}>Preparing {busy}…</p> : null}
          {error ? <p role="alert" className="dg-error" style={{ margin: 0 }}>{error}</p> : null}
        </div>
      ) : null}
    </div>
  );
}
