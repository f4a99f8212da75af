import Papa from 'papaparse';
import { parseNumber } from './editor-state';

/** A problem in an uploaded file; row and column count from 1 as a spreadsheet shows them. */
export interface CsvIssue { row: number; column?: number; message: string }

export type CsvParse =
  | { ok: true; nodeIds: string[]; matrix: number[][] }
  | { ok: false; issues: CsvIssue[] };

/** The engine's cap on state variables (issue 3), one per node. */
export const MAX_CSV_NODES = 64;
/** Size cap for an uploaded matrix: 64 x 64 cells of long numbers fit comfortably. */
export const MAX_CSV_BYTES = 256 * 1024;

const columnLetter = (c: number): string => {
  let s = '';
  for (let k = c; k > 0; k = Math.floor((k - 1) / 26)) s = String.fromCharCode(65 + ((k - 1) % 26)) + s;
  return s;
};

/**
 * More cells than the header in a comma-separated file is what decimal commas do ("0,5" becomes two
 * cells). The file alone cannot tell "0,5" from the cells 0 and 5, so the hint says "if".
 */
const DECIMAL_COMMA_HINT =
  '; if the numbers use decimal commas (0,5), those split the cells: save the file with semicolons between cells, or with decimal points (0.5)';

/** "row 3, column C (node "middle")" — how a modeler finds the cell in a spreadsheet. */
export function describeCsvIssue(issue: CsvIssue): string {
  const where = issue.column === undefined ? `row ${issue.row}` : `row ${issue.row}, column ${columnLetter(issue.column)}`;
  return `${where}: ${issue.message}`;
}

/**
 * Parses an adjacency matrix: the header row holds a corner cell then the node ids, every further row
 * starts with a node id then one weight per header id (row = source, column = target; blank = 0).
 * Rows may come in any order but must name exactly the header's ids. Delimiter is detected (comma,
 * semicolon or tab). Collects every problem rather than stopping at the first.
 */
export function parseAdjacencyCsv(text: string): CsvParse {
  if (text.length > MAX_CSV_BYTES) {
    return { ok: false, issues: [{ row: 1, message: `the file is larger than ${MAX_CSV_BYTES / 1024} KiB` }] };
  }
  const parsed = Papa.parse<string[]>(text.replace(/^\uFEFF/, ''), { skipEmptyLines: 'greedy' });
  const rows = parsed.data.map((r) => r.map((c) => c.trim()));
  const issues: CsvIssue[] = [];
  for (const e of parsed.errors) {
    if (e.code === 'UndetectableDelimiter') continue; // a one-column file is caught below
    issues.push({ row: (e.row ?? 0) + 1, message: e.message });
  }
  if (rows.length === 0) return { ok: false, issues: [{ row: 1, message: 'the file is empty' }] };

  const header = rows[0];
  const ids = header.slice(1);
  if (ids.length === 0) {
    return { ok: false, issues: [{ row: 1, message: 'the header row needs a corner cell followed by the node ids' }] };
  }
  if (ids.length > MAX_CSV_NODES) {
    return { ok: false, issues: [{ row: 1, message: `${ids.length} nodes is more than the limit of ${MAX_CSV_NODES}` }] };
  }
  const column = new Map<string, number>();
  ids.forEach((id, k) => {
    if (id === '') issues.push({ row: 1, column: k + 2, message: 'the node id is blank' });
    else if (column.has(id)) issues.push({ row: 1, column: k + 2, message: `node "${id}" appears twice in the header` });
    else column.set(id, k);
  });

  const matrix = ids.map(() => ids.map(() => 0));
  const seen = new Set<string>();
  for (let r = 1; r < rows.length; r++) {
    const row = rows[r];
    const rowNo = r + 1;
    const id = row[0] ?? '';
    if (row.length !== header.length) {
      const comma = parsed.meta.delimiter === ',' && row.length > header.length;
      issues.push({ row: rowNo, message: `has ${row.length} cells but the header has ${header.length}${comma ? DECIMAL_COMMA_HINT : ''}` });
      // The row exists; only its cells are wrong. Without this its node was also reported as rowless.
      if (column.has(id)) seen.add(id);
      continue;
    }
    const i = column.get(id);
    if (i === undefined) {
      issues.push({ row: rowNo, column: 1, message: id === '' ? 'the node id is blank' : `node "${id}" is not in the header row` });
      continue;
    }
    if (seen.has(id)) {
      issues.push({ row: rowNo, column: 1, message: `node "${id}" has a second row` });
      continue;
    }
    seen.add(id);
    for (let c = 1; c < row.length; c++) {
      const cell = row[c];
      if (cell === '') continue;
      const w = parseNumber(cell);
      if (w === null) {
        const comma = /^[+-]?\d*,\d+$/.test(cell) ? `; write it with a decimal point: ${cell.replace(',', '.')}` : '';
        issues.push({ row: rowNo, column: c + 1, message: `"${cell}" is not a number (link ${id} → ${ids[c - 1]})${comma}` });
      } else {
        matrix[i][c - 1] = w;
      }
    }
  }
  // A node without a row is pointed at in the header, where its id is: the last row of the file is
  // some other node's. When exactly one row names an id the header lacks and exactly one header id
  // has no row, that row is most likely the missing one misspelt, and the message says so.
  const rowless = [...column.keys()].filter((id) => !seen.has(id));
  const strays = issues.filter((i) => i.column === 1 && i.message.endsWith('is not in the header row'));
  if (rowless.length === 1 && strays.length === 1) {
    strays[0].message += ` (is it "${rowless[0]}", which has no row?)`;
  }
  for (const id of rowless) {
    issues.push({ row: 1, column: column.get(id)! + 2, message: `node "${id}" is in the header but has no row` });
  }
  // In the order a modeler reads the file: by row, then by column.
  issues.sort((a, b) => a.row - b.row || (a.column ?? 0) - (b.column ?? 0));
  return issues.length > 0 ? { ok: false, issues } : { ok: true, nodeIds: ids, matrix };
}
