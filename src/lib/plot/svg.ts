/** Serialization of a Figure to standalone SVG 1.1 text with vector text. */
import type { Figure, Prim } from './figure';

/** Escapes the five XML special characters. */
export function xmlEscape(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&apos;');
}

export interface SvgOptions {
  /**
   * CSS @font-face rules to embed (for example Inter as a data: URL), so the text keeps the shipped font
   * wherever the SVG goes. Without it the text names font-family Inter and falls back to the reader's sans.
   */
  readonly fontFaceCss?: string;
  readonly description?: string;
  /** Physical size for the width and height attributes (e.g. '85mm'); the viewBox stays in layout units. */
  readonly physical?: { readonly width: string; readonly height: string };
}

export const SANS = "Inter, 'Helvetica Neue', Arial, sans-serif";
export const MONO = "'IBM Plex Mono', ui-monospace, monospace";

function dataAttrs(data?: Record<string, string>): string {
  if (!data) return '';
  return Object.entries(data).map(([k, v]) => ` data-${k}="${xmlEscape(v)}"`).join('');
}

function prim(p: Prim): string {
  const clip = p.clip ? ' clip-path="url(#bm-plot)"' : '';
  switch (p.t) {
    case 'rect':
      return `<rect x="${p.x}" y="${p.y}" width="${p.w}" height="${p.h}" fill="${p.fill}"${p.opacity != null ? ` fill-opacity="${p.opacity}"` : ''}${p.stroke ? ` stroke="${p.stroke}" stroke-width="${p.strokeWidth ?? 1}"` : ''}${clip}${dataAttrs(p.data)}/>`;
    case 'path':
      return `<path d="${p.d}" fill="${p.fill ?? 'none'}"${p.fillRule === 'evenodd' ? ' fill-rule="evenodd"' : ''}${p.stroke ? ` stroke="${p.stroke}" stroke-width="${p.strokeWidth ?? 1}"` : ''}${p.dash ? ` stroke-dasharray="${p.dash.join(' ')}"` : ''}${p.linecap ? ` stroke-linecap="${p.linecap}" stroke-linejoin="round"` : ''}${p.opacity != null ? ` opacity="${p.opacity}"` : ''}${clip}${dataAttrs(p.data)}/>`;
    case 'text': {
      const tr = p.rotate ? ` transform="rotate(${p.rotate} ${p.x} ${p.y})"` : '';
      return `<text x="${p.x}" y="${p.y}" font-size="${p.size}"${p.weight === 600 ? ' font-weight="600"' : ''}${p.italic ? ' font-style="italic"' : ''} text-anchor="${p.anchor}" fill="${p.fill}"${p.mono ? ` font-family="${MONO}"` : ''}${tr}${clip}${dataAttrs(p.data)}>${xmlEscape(p.text)}</text>`;
    }
  }
}

/** Standalone SVG document text of a figure. */
export function figureToSvg(fig: Figure, options: SvgOptions = {}): string {
  const { x, y, w, h } = fig.plot;
  const style = options.fontFaceCss ? `<style><![CDATA[${options.fontFaceCss.replace(/]]>/g, '')}]]></style>` : '';
  return [
    `<?xml version="1.0" encoding="UTF-8"?>`,
    `<svg xmlns="http://www.w3.org/2000/svg" version="1.1" width="${options.physical?.width ?? fig.width}" height="${options.physical?.height ?? fig.height}" viewBox="0 0 ${fig.width} ${fig.height}" font-family="${SANS}">`,
    `<title>${xmlEscape(fig.title)}</title>`,
    options.description ? `<desc>${xmlEscape(options.description)}</desc>` : '',
    `<defs>${style}<clipPath id="bm-plot"><rect x="${x}" y="${y}" width="${w}" height="${h}"/></clipPath></defs>`,
    `<rect width="100%" height="100%" fill="${fig.background}"/>`,
    ...fig.items.map(prim),
    `</svg>`,
  ].filter(Boolean).join('\n');
}
