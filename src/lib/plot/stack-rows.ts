/**
 * Rows for labels that would overlap on one line (manual tags whose ranges or names overlap): each
 * span, in the given order, takes the lowest row where it touches no span already placed there.
 * Greedy first fit, so earlier spans keep row 0 (common practice, no source).
 */
export interface Span { readonly start: number; readonly end: number }

/** Row index (0 = first line) per span; spans that only touch at an end point share a row. */
export function stackRows(spans: readonly Span[]): number[] {
  const rows: Span[][] = [];
  return spans.map((s) => {
    let r = rows.findIndex((row) => row.every((o) => s.end <= o.start || s.start >= o.end));
    if (r < 0) { r = rows.length; rows.push([]); }
    rows[r].push(s);
    return r;
  });
}

/** Rough width of a label in px: 0.58 em a character, a generous mean for Inter (measured on screenshots). */
export function labelWidth(text: string, fontPx: number): number {
  return text.length * fontPx * 0.58;
}
