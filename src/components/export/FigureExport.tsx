/**
 * The export menu of one figure (an escape-study chart, a two-parameter map) with the diagram's
 * export machinery: SVG (the shipped Inter embedded), PNG (that SVG rasterized by the browser,
 * resolution in a pHYs chunk), PDF (pdfkit, loaded on demand), each with the provenance footer and an
 * optional caption, light or dark; and links to the data behind it.
 */
import { useEffect, useId, useRef, useState } from 'react';
import type { Figure } from '../../lib/plot/figure';
import { safeFileName } from '../../lib/plot/data-export';
import { NIGHT_PALETTE, PAPER_PALETTE, type PlotPalette } from '../../lib/plot/palette';
import { withResolution } from '../../lib/plot/paper';
import { figureToSvg } from '../../lib/plot/svg';
import { download, svgToPng } from './download';
import { fontFaceCss } from './fonts';

export interface FigureExportProps<P> {
  /** The figure at 720 px; null while there is nothing to draw (the menu then says `emptyMessage`). */
  readonly build: (o: { width: number; palette: PlotPalette; dark: boolean; caption?: string; provenance?: P }) => Figure | null;
  readonly provenance: P;
  /** The footer in one line (also the SVG's description and the PDF's subject). */
  readonly description: string;
  /** File names start with this. */
  readonly stem: string;
  /** "the escape orders", "the map": for the panel's accessible name. */
  readonly label: string;
  readonly emptyMessage: string;
  /** data-testid of the toggle and of the SVG, PNG 2× and PDF buttons. */
  readonly testId: (what: 'toggle' | 'svg' | 'png' | 'pdf') => string;
  readonly dataHeading: string;
  readonly data: readonly { readonly label: string; readonly href: string; readonly download: string | true }[];
  readonly linkClass: string;
}

export default function FigureExport<P extends { date?: string }>(props: FigureExportProps<P>) {
  const [open, setOpen] = useState(false);
  const [caption, setCaption] = useState('');
  const [withFooter, setWithFooter] = useState(true);
  const [dark, setDark] = useState(false);
  const [busy, setBusy] = useState<string | null>(null);
  const [error, setError] = useState<string | null>(null);
  const panelId = useId();
  const rootRef = useRef<HTMLDivElement>(null);

  useEffect(() => {
    if (!open) return;
    const away = (e: MouseEvent) => { if (rootRef.current && !rootRef.current.contains(e.target as Node)) setOpen(false); };
    document.addEventListener('mousedown', away);
    return () => document.removeEventListener('mousedown', away);
  }, [open]);

  const figure = (): Figure => {
    const provenance = { ...props.provenance, date: props.provenance.date || new Date().toISOString() };
    const fig = props.build({ width: 720, palette: dark ? NIGHT_PALETTE : PAPER_PALETTE, dark, caption: caption.trim() || undefined, provenance: withFooter ? provenance : undefined });
    if (!fig) throw new Error(props.emptyMessage);
    return fig;
  };
  const svgText = async () => { const fig = figure(); return { fig, svg: figureToSvg(fig, { fontFaceCss: await fontFaceCss(), description: props.description }) }; };
  const run = (label: string, task: () => Promise<void>) => async () => {
    setBusy(label); setError(null);
    try { await task(); } catch (e) { setError(`${label} failed: ${e instanceof Error ? e.message : String(e)}`); } finally { setBusy(null); }
  };
  const exportSvg = run('SVG', async () => { const { svg } = await svgText(); download(new Blob([svg], { type: 'image/svg+xml' }), safeFileName(props.stem, 'svg')); });
  const exportPng = (factor: number) => run(`PNG ${factor}×`, async () => {
    const { fig, svg } = await svgText();
    const png = new Uint8Array(await (await svgToPng(svg, fig.width, fig.height, factor)).arrayBuffer());
    download(new Blob([withResolution(png, 96 * factor) as Uint8Array<ArrayBuffer>], { type: 'image/png' }), safeFileName(`${props.stem}@${factor}x`, 'png'));
  });
  const exportPdf = run('PDF', async () => {
    const { figureToPdf } = await import('./pdf');
    const fig = figure();
    download(await figureToPdf(fig, { title: fig.title, subject: props.description }), safeFileName(props.stem, 'pdf'));
  });

  return (
    <div className="dg-export" ref={rootRef} onKeyDown={(e) => { if (e.key === 'Escape' && open) { e.stopPropagation(); setOpen(false); } }}>
      <button type="button" aria-expanded={open} aria-controls={panelId} onClick={() => setOpen((o) => !o)} data-testid={props.testId('toggle')}>Export…</button>
      {open ? (
        <div className="dg-export-panel" id={panelId} role="group" aria-label={`Export ${props.label}`}>
          <label>Caption (optional)
            <textarea rows={2} value={caption} onChange={(e) => setCaption(e.target.value)} />
          </label>
          <label className="dg-check"><input type="checkbox" checked={withFooter} onChange={(e) => setWithFooter(e.target.checked)} /> Provenance footer</label>
          <p className="dg-muted" style={{ margin: 0, fontSize: '0.75rem' }}>{props.description}</p>
          <label>Colours
            <select value={dark ? 'dark' : 'light'} onChange={(e) => setDark(e.target.value === 'dark')}><option value="light">Light</option><option value="dark">Dark</option></select>
          </label>
          <h4>Figure (720 px wide)</h4>
          <div className="dg-export-actions">
            <button type="button" onClick={exportSvg} disabled={!!busy} data-testid={props.testId('svg')}>SVG</button>
            <button type="button" onClick={exportPng(2)} disabled={!!busy} data-testid={props.testId('png')}>PNG 2×</button>
            <button type="button" onClick={exportPng(4)} disabled={!!busy}>PNG 4×</button>
            <button type="button" onClick={exportPdf} disabled={!!busy} data-testid={props.testId('pdf')}>PDF</button>
          </div>
          <h4>{props.dataHeading}</h4>
          <div className="dg-export-actions">
            {props.data.map((d) => <a key={d.href} className={props.linkClass} href={d.href} download={d.download}>{d.label}</a>)}
          </div>
          {busy ? <p role="status" className="dg-muted" style={{ margin: 0 }}>Preparing {busy}…</p> : null}
          {error ? <p role="alert" className="dg-error" style={{ margin: 0 }}>{error}</p> : null}
        </div>
      ) : null}
    </div>
  );
}
