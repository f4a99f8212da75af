/**
 * The shipped fonts (@fontsource/inter, @fontsource/ibm-plex-mono) as bytes for exports: embedded as
 * @font-face data URLs in SVG (so the file keeps its typeface anywhere, and PNG rasterizing sees it),
 * and as embedded subsets in PDF. Inter comes as per-script files; the latin and the Greek ones are
 * shipped, so axis labels such as "coupling β (1/yr)" keep every character (SVG picks the file by
 * unicode-range, the PDF draws Greek runs in the Greek file; pdf-draw.ts). Loaded only when an
 * export is asked for.
 */
import interRegularWoff from '@fontsource/inter/files/inter-latin-400-normal.woff?url';
import interSemiboldWoff from '@fontsource/inter/files/inter-latin-600-normal.woff?url';
import interItalicWoff from '@fontsource/inter/files/inter-latin-400-italic.woff?url';
import greekRegularWoff from '@fontsource/inter/files/inter-greek-400-normal.woff?url';
import greekSemiboldWoff from '@fontsource/inter/files/inter-greek-600-normal.woff?url';
import greekItalicWoff from '@fontsource/inter/files/inter-greek-400-italic.woff?url';
import plexMonoWoff from '@fontsource/ibm-plex-mono/files/ibm-plex-mono-latin-400-normal.woff?url';

export interface FontBytes {
  regular: Uint8Array; semibold: Uint8Array; italic: Uint8Array; mono: Uint8Array;
  greek: { regular: Uint8Array; semibold: Uint8Array; italic: Uint8Array };
}

let cache: Promise<FontBytes> | null = null;

async function bytes(url: string): Promise<Uint8Array> {
  const res = await fetch(url);
  if (!res.ok) throw new Error(`font ${url}: HTTP ${res.status}`);
  return new Uint8Array(await res.arrayBuffer());
}

export function loadFonts(): Promise<FontBytes> {
  cache ??= Promise.all([interRegularWoff, interSemiboldWoff, interItalicWoff, plexMonoWoff, greekRegularWoff, greekSemiboldWoff, greekItalicWoff].map(bytes))
    .then(([regular, semibold, italic, mono, gr, gs, gi]) => ({ regular, semibold, italic, mono, greek: { regular: gr, semibold: gs, italic: gi } }))
    .catch((e) => { cache = null; throw e; });
  return cache;
}

function base64(b: Uint8Array): string {
  let s = '';
  for (let i = 0; i < b.length; i += 0x8000) s += String.fromCharCode(...b.subarray(i, i + 0x8000));
  return btoa(s);
}

/** Code points of @fontsource/inter's Greek subset (its own CSS gives the same range). */
const GREEK_RANGE = 'U+0370-0377,U+037A-037F,U+0384-038A,U+038C,U+038E-03A1,U+03A3-03FF';

/** @font-face rules with the fonts inlined as data URLs. */
export async function fontFaceCss(): Promise<string> {
  const f = await loadFonts();
  const face = (family: string, b: Uint8Array, weight: number, style: string, range?: string) =>
    `@font-face{font-family:'${family}';font-weight:${weight};font-style:${style};src:url(data:font/woff;base64,${base64(b)}) format('woff')${range ? `;unicode-range:${range}` : ''}}`;
  return [
    face('Inter', f.regular, 400, 'normal'), face('Inter', f.semibold, 600, 'normal'), face('Inter', f.italic, 400, 'italic'),
    face('Inter', f.greek.regular, 400, 'normal', GREEK_RANGE), face('Inter', f.greek.semibold, 600, 'normal', GREEK_RANGE), face('Inter', f.greek.italic, 400, 'italic', GREEK_RANGE),
    face('IBM Plex Mono', f.mono, 400, 'normal'),
  ].join('\n');
}
