/**
 * Export of the current view: SVG (vector text in the shipped Inter, embedded), PNG (the same SVG
 * rasterized by the browser, its resolution recorded in a pHYs chunk), PDF (pdfkit, see pdf.ts), and
 * the data behind the figure as CSV and JSON. The figure is screen-sized or set for a paper: width
 * and height in mm or inches (one- and two-column starting sizes), tick labels at a chosen size in
 * points, editable axis titles (any Unicode: β, units), light or dark (lib/plot/paper.ts). Caption and
 * provenance footer are optional and go into every figure format.
 */
import { useEffect, useId, useRef, useState } from 'react';
import type { Diagram } from '../../lib/atlas/types';
import { diagramToCsv, diagramToJson, safeFileName } from '../../lib/plot/data-export';
import { buildFigure } from '../../lib/plot/figure';
import { projectionKey, projectionLabel, type Projection } from '../../lib/plot/projection';
import { provenanceLine, type Provenance } from '../../lib/plot/provenance';
import { figureToSvg } from '../../lib/plot/svg';
import { NIGHT_PALETTE, PAPER_PALETTE } from '../../lib/plot/palette';
import { paperFigure, paperSizeProblem, SIZE_PRESETS, toPoints, withResolution, type LengthUnit, type PaperSize } from '../../lib/plot/paper';
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
  /** URL of the model document of exactly this version, put into the figure bundle. */
  readonly documentUrl?: string;
}

export function ExportMenu(props: ExportMenuProps) {
  const [open, setOpen] = useState(false);
  const [caption, setCaption] = useState('');
  const [sizeMode, setSizeMode] = useState<'screen' | keyof typeof SIZE_PRESETS | 'custom'>('screen');
  const [width, setWidth] = useState('85');
  const [height, setHeight] = useState('70');
  const [unit, setUnit] = useState<LengthUnit>('mm');
  const [fontSize, setFontSize] = useState('7');
  const [xLabel, setXLabel] = useState(`parameter ${props.diagram.parameter}`);
  const [yLabel, setYLabel] = useState(projectionLabel(props.projection, props.diagram.variables));
  const [dark, setDark] = useState(false);
  const [dpi, setDpi] = useState(600);
  useEffect(() => { setYLabel(projectionLabel(props.projection, props.diagram.variables)); }, [props.projection, props.diagram.variables]);
  const paperSize: PaperSize | null = sizeMode === 'screen' ? null : { width: Number(width), height: Number(height), unit, fontSize: Number(fontSize) };
  const sizeProblem = paperSize ? paperSizeProblem(paperSize) : null;
  const choosePreset = (mode: typeof sizeMode) => {
    setSizeMode(mode);
    if (mode !== 'screen' && mode !== 'custom') {
      const p = SIZE_PRESETS[mode];
      setWidth(String(p.width)); setHeight(String(p.height)); setUnit(p.unit); setFontSize(String(p.fontSize));
    }
  };
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

  /** The figure in layout units, points per layout unit, and the physical size for SVG attributes (null on screen). */
  const figure = () => {
    const provenance = { ...props.provenance, date: props.provenance.date || new Date().toISOString() };
    const input = {
      diagram: props.diagram, projection: props.projection, regimes: props.regimes, tags: props.tags, showTags: props.showTags,
      pDomain: props.pDomain, yDomain: props.yDomain, width: props.figureWidth ?? 720,
      caption: caption.trim() || undefined, provenance: withFooter ? provenance : undefined,
      xLabel, yLabel, palette: dark ? NIGHT_PALETTE : PAPER_PALETTE,
    };
    if (!paperSize) return { fig: buildFigure(input), scale: 1, physical: null, widthIn: null as number | null };
    if (sizeProblem) throw new Error(sizeProblem);
    const paper = paperFigure(input, paperSize);
    const inUnit = (pt: number) => (unit === 'mm' ? (pt / 72) * 25.4 : pt / 72);
    return {
      fig: paper.figure, scale: paper.scale, widthIn: paper.widthPt / 72,
      physical: { width: `${Number(inUnit(paper.widthPt).toFixed(3))}${unit}`, height: `${Number(inUnit(paper.heightPt).toFixed(3))}${unit}` },
    };
  };
  const svgText = async () => {
    const f = figure();
    return { ...f, svg: figureToSvg(f.fig, { fontFaceCss: await fontFaceCss(), description: provenanceLine(props.provenance), physical: f.physical ?? undefined }) };
  };
  const run = (label: string, task: () => Promise<void>) => async () => {
    setBusy(label); setError(null);
    try { await task(); } catch (e) { setError(`${label} failed: ${e instanceof Error ? e.message : String(e)}`); } finally { setBusy(null); }
  };

  const exportSvg = run('SVG', async () => { const { svg } = await svgText(); download(new Blob([svg], { type: 'image/svg+xml' }), safeFileName(stem, 'svg')); });
  /** Screen figures at 1×/2×/4× (96 dpi per ×, the CSS pixel), paper figures at `dpi` of their physical width. */
  const exportPng = (factor: number | null) => run(factor ? `PNG ${factor}×` : `PNG ${dpi} dpi`, async () => {
    const { fig, svg, widthIn } = await svgText();
    const pixelScale = factor ?? (widthIn! * dpi) / fig.width;
    const res = factor ? 96 * factor : dpi;
    const png = new Uint8Array(await (await svgToPng(svg, fig.width, fig.height, pixelScale)).arrayBuffer());
    download(new Blob([withResolution(png, res) as Uint8Array<ArrayBuffer>], { type: 'image/png' }), safeFileName(factor ? `${stem}@${factor}x` : `${stem}-${dpi}dpi`, 'png'));
  });
  const exportPdf = run('PDF', async () => {
    const { figureToPdf } = await import('./pdf');
    const { fig, scale } = figure();
    download(await figureToPdf(fig, { title: fig.title, subject: provenanceLine(props.provenance) }, scale), safeFileName(stem, 'pdf'));
  });
  /**
   * One zip (fflate) with the figure as SVG, PDF and PNG at the dialog's settings, the data as CSV
   * (the one layout, provenance block included), the model document of this exact version (checked
   * against the version hash the server sends with it) and a README of what is inside.
   */
  const exportBundle = run('Figure bundle', async () => {
    const [{ zipSync, strToU8 }, { figureToPdf }] = await Promise.all([import('fflate'), import('./pdf')]);
    const f = await svgText();
    const pixelScale = f.widthIn ? (f.widthIn * dpi) / f.fig.width : 2;
    const res = f.widthIn ? dpi : 192;
    const png = withResolution(new Uint8Array(await (await svgToPng(f.svg, f.fig.width, f.fig.height, pixelScale)).arrayBuffer()), res);
    const pdf = new Uint8Array(await (await figureToPdf(f.fig, { title: f.fig.title, subject: provenanceLine(props.provenance) }, f.scale)).arrayBuffer());
    const files: Record<string, Uint8Array> = {
      'figure.svg': strToU8(f.svg),
      'figure.pdf': pdf,
      'figure.png': png,
      'data.csv': strToU8(diagramToCsv(props.diagram, props.provenance)),
    };
    let model = 'not included: this view has no stored model version';
    if (props.documentUrl) {
      const res2 = await fetch(props.documentUrl, { credentials: 'same-origin' });
      if (!res2.ok) throw new Error(`the model document could not be fetched (HTTP ${res2.status})`);
      const hash = res2.headers.get('X-Document-Hash');
      if (hash && hash !== props.provenance.versionHash) throw new Error('the model document does not match this run’s version');
      files['model.json'] = new Uint8Array(await res2.arrayBuffer());
      model = `model.json — the model document of exactly this version (hash ${props.provenance.versionHash})`;
    }
    files['README.txt'] = strToU8(bundleReadme({
      provenance: props.provenance, model,
      size: f.physical ? `${f.physical.width} × ${f.physical.height}, tick labels ${fontSize} pt, PNG ${res} dpi` : `screen size ${f.fig.width} × ${f.fig.height} px, PNG 2× (${res} dpi)`,
      diagram: props.diagram,
    }));
    const when = new Date(props.provenance.date);
    const zip = zipSync(files, { level: 6, mtime: Number.isNaN(when.getTime()) || when.getFullYear() < 1980 ? new Date() : when });
    download(new Blob([zip as Uint8Array<ArrayBuffer>], { type: 'application/zip' }), safeFileName(`${stem}-figure`, 'zip'));
  });
  const exportCsv = run('CSV', async () => { download(new Blob([diagramToCsv(props.diagram, props.provenance)], { type: 'text/csv' }), safeFileName(stem, 'csv')); });
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
          <div className="dg-export-grid">
            <label className="dg-export-wide">Size
              <select value={sizeMode} onChange={(e) => choosePreset(e.target.value as typeof sizeMode)} data-testid="export-size">
                <option value="screen">Screen (720 px wide)</option>
                {Object.entries(SIZE_PRESETS).map(([k, p]) => <option key={k} value={k}>{p.label}</option>)}
                <option value="custom">Custom</option>
              </select>
            </label>
            {paperSize ? (
              <>
                <label>Width<input type="number" inputMode="decimal" step="any" value={width} onChange={(e) => { setWidth(e.target.value); setSizeMode('custom'); }} data-testid="export-width" /></label>
                <label>Height<input type="number" inputMode="decimal" step="any" value={height} onChange={(e) => { setHeight(e.target.value); setSizeMode('custom'); }} data-testid="export-height" /></label>
                <label>Unit
                  <select value={unit} onChange={(e) => {
                    const next = e.target.value as LengthUnit;
                    // Keep the physical size: convert the numbers with the unit.
                    const f = (v: string) => String(Number((toPoints(Number(v), unit) / toPoints(1, next)).toFixed(next === 'mm' ? 1 : 2)));
                    setWidth(f(width)); setHeight(f(height)); setUnit(next);
                  }} data-testid="export-unit"><option value="mm">mm</option><option value="in">in</option></select>
                </label>
                <label>Font size (pt)<input type="number" inputMode="decimal" step="0.5" value={fontSize} onChange={(e) => setFontSize(e.target.value)} data-testid="export-font-size" /></label>
              </>
            ) : null}
            <label className="dg-export-wide">Horizontal axis title<input type="text" value={xLabel} onChange={(e) => setXLabel(e.target.value)} data-testid="export-x-label" /></label>
            <label className="dg-export-wide">Vertical axis title<input type="text" value={yLabel} onChange={(e) => setYLabel(e.target.value)} data-testid="export-y-label" /></label>
            <label>Colours
              <select value={dark ? 'dark' : 'light'} onChange={(e) => setDark(e.target.value === 'dark')} data-testid="export-theme"><option value="light">Light</option><option value="dark">Dark</option></select>
            </label>
            {paperSize ? (
              <label>PNG resolution
                <select value={dpi} onChange={(e) => setDpi(Number(e.target.value))} data-testid="export-dpi"><option value={300}>300 dpi</option><option value={600}>600 dpi</option><option value={1200}>1200 dpi</option></select>
              </label>
            ) : null}
          </div>
          <p className="dg-muted dg-export-hint">Type Greek letters and units straight into the titles (β, σ, “coupling β (1/yr)”); every format keeps them.</p>
          {sizeProblem ? <p role="alert" className="dg-error" style={{ margin: 0 }} data-testid="export-size-problem">{sizeProblem}</p> : null}
          <div className="dg-export-actions">
            <button type="button" onClick={exportSvg} disabled={!!busy || !!sizeProblem} data-testid="export-svg">SVG</button>
            {paperSize ? (
              <button type="button" onClick={exportPng(null)} disabled={!!busy || !!sizeProblem} data-testid="export-png-paper">PNG {dpi} dpi</button>
            ) : (
              <>
                <button type="button" onClick={exportPng(1)} disabled={!!busy}>PNG 1×</button>
                <button type="button" onClick={exportPng(2)} disabled={!!busy} data-testid="export-png-2">PNG 2×</button>
                <button type="button" onClick={exportPng(4)} disabled={!!busy}>PNG 4×</button>
              </>
            )}
            <button type="button" onClick={exportPdf} disabled={!!busy || !!sizeProblem} data-testid="export-pdf">PDF</button>
          </div>
          <div className="dg-export-actions">
            <button type="button" onClick={exportBundle} disabled={!!busy || !!sizeProblem} data-testid="export-bundle">Figure bundle (.zip): figure, data, model, README</button>
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

/** The README of a figure bundle: what each file is, where it came from, how to read the CSV. */
export function bundleReadme(input: { provenance: Provenance; model: string; size: string; diagram: Diagram }): string {
  const p = input.provenance;
  return [
    'Brinkmap figure bundle',
    '',
    provenanceLine(p),
    '',
    'figure.svg  the figure as vector graphics (fonts embedded)',
    'figure.pdf  the same figure as PDF (fonts embedded, text selectable)',
    'figure.png  the same figure as a raster image (resolution recorded in the file)',
    `            ${input.size}`,
    `data.csv    every computed point: branch, point, ${input.diagram.parameter}, ${input.diagram.variables.join(', ')}, unstable, stability;`,
    '            the lines starting with # are the provenance (read with comment character #)',
    input.model,
    '',
    'Model results are indicative; defer to domain experts and local regulation.',
    '',
  ].join('\n');
}

export default ExportMenu;
