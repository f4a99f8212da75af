import { parseNumber, formatNumber, type LinkRow } from './editor-state';

/**
 * Links ↔ adjacency matrix. Convention (shared with the CSV import): row = source node ("from"),
 * column = target node ("to"), cell = weight of the influence of the row's node on the column's node.
 * Several links between one ordered pair add up, as their coupling terms do in the rate equation.
 * A `twoWay` link fills both (i, j) and (j, i).
 */
export function linksToMatrix(nodeIds: readonly string[], links: readonly LinkRow[]): number[][] {
  const index = new Map(nodeIds.map((id, i) => [id, i]));
  const m = nodeIds.map(() => nodeIds.map(() => 0));
  for (const l of links) {
    const i = index.get(l.from);
    const j = index.get(l.to);
    if (i === undefined || j === undefined) continue;
    const w = parseNumber(l.weight);
    const v = w === null ? Number.NaN : w;
    m[i][j] += v;
    if (l.twoWay && i !== j) m[j][i] += v;
  }
  return m;
}

/**
 * Sets the total weight from `from` to `to`, returning new link rows (input untouched). Rows that
 * contributed to the cell are replaced by one row with the new weight (removed when it is 0); a
 * two-way row touching the cell is split so that its reverse direction keeps its weight.
 */
export function setMatrixCell(links: readonly LinkRow[], from: string, to: string, weight: number): LinkRow[] {
  const out: LinkRow[] = [];
  let placed = false;
  const place = () => {
    if (!placed && weight !== 0) out.push({ from, to, weight: formatNumber(weight), twoWay: false });
    placed = true;
  };
  for (const l of links) {
    const forward = l.from === from && l.to === to;
    const reverseTwoWay = l.twoWay && l.from === to && l.to === from;
    if (!forward && !reverseTwoWay) {
      out.push(l);
      continue;
    }
    if (l.twoWay && from !== to) {
      // Keep the other direction of the pair as a one-way row.
      out.push({ from: to, to: from, weight: l.weight, twoWay: false });
    }
    place();
  }
  place();
  return out;
}

/**
 * Matrix → link rows: a symmetric non-zero pair becomes one two-way link, everything else one-way links,
 * in row-major order.
 */
export function matrixToLinks(nodeIds: readonly string[], matrix: readonly (readonly number[])[]): LinkRow[] {
  const links: LinkRow[] = [];
  const n = nodeIds.length;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const w = matrix[i]?.[j] ?? 0;
      if (w === 0 || Number.isNaN(w)) continue;
      if (i === j) {
        links.push({ from: nodeIds[i], to: nodeIds[j], weight: formatNumber(w), twoWay: false });
      } else if (w === (matrix[j]?.[i] ?? 0)) {
        if (i < j) links.push({ from: nodeIds[i], to: nodeIds[j], weight: formatNumber(w), twoWay: true });
      } else {
        links.push({ from: nodeIds[i], to: nodeIds[j], weight: formatNumber(w), twoWay: false });
      }
    }
  }
  return links;
}
