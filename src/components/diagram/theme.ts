/** Reads the diagram's colour roles from CSS variables, so canvas drawing follows the page theme. */
import type { SpecialPointType } from '../../lib/atlas/types';
import { NIGHT_PALETTE, PAPER_PALETTE, type PlotPalette } from '../../lib/plot/palette';

export function isDarkTheme(): boolean {
  if (typeof document === 'undefined') return false;
  const html = document.documentElement;
  const attr = html.getAttribute('data-theme');
  if (attr) return attr === 'dark';
  if (html.classList.contains('dark')) return true;
  if (html.classList.contains('light')) return false;
  return window.matchMedia?.('(prefers-color-scheme: dark)').matches ?? false;
}

export function readPalette(el: Element | null): PlotPalette {
  const base = isDarkTheme() ? NIGHT_PALETTE : PAPER_PALETTE;
  if (!el || typeof getComputedStyle === 'undefined') return base;
  const cs = getComputedStyle(el);
  const v = (name: string, fallback: string) => cs.getPropertyValue(name).trim() || fallback;
  const marker = {} as Record<SpecialPointType, string>;
  for (const t of Object.keys(base.marker) as SpecialPointType[]) marker[t] = v(`--dg-mark-${t}`, base.marker[t]);
  return {
    paper: v('--dg-paper', base.paper), ink: v('--dg-ink', base.ink), muted: v('--dg-muted', base.muted), grid: v('--dg-grid', base.grid),
    stable: v('--dg-stable', base.stable), unstable: v('--dg-unstable', base.unstable), marker,
    band: { weak: v('--dg-band-weak', base.band.weak), intermediate: v('--dg-band-intermediate', base.band.intermediate), strong: v('--dg-band-strong', base.band.strong) },
    bandInk: { weak: v('--dg-band-ink-weak', base.bandInk.weak), intermediate: v('--dg-band-ink-intermediate', base.bandInk.intermediate), strong: v('--dg-band-ink-strong', base.bandInk.strong) },
  };
}

/** Calls back when the page theme changes (class or data-theme on <html>, or the system preference). */
export function watchTheme(cb: () => void): () => void {
  const mo = new MutationObserver(cb);
  mo.observe(document.documentElement, { attributes: true, attributeFilter: ['class', 'data-theme', 'style'] });
  const mq = window.matchMedia?.('(prefers-color-scheme: dark)');
  mq?.addEventListener('change', cb);
  return () => { mo.disconnect(); mq?.removeEventListener('change', cb); };
}
