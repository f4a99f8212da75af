import Papa from 'papaparse';

/**
 * Adjacency-matrix CSV import. Layout: the first row lists node ids (its first cell is a free label,
 * usually empty), the first column lists the same ids in the same order, and the cell in row i,
 * column j is the weight of the link FROM the row's node TO the column's node. An empty cell or 0
 * means no link. Rows and columns are numbered as a spreadsheet shows them (row 1 = header row,
 * column 1 = the id column), so an error message points at the cell a person sees.
 */
export interface CsvLink { readonly from: string; readonly to: string; readonly weight: number }

export interface CsvProblem { readonly row?: number; readonly column?: number; readonly message: string }

export type AdjacencyParse =
  | { readonly ok: true; readonly nodeIds: string[]; readonly links: CsvLink[] }
  | { readonly ok: false; readonly problems: CsvProblem[] };

const MAX_PROBLEMS = 20;

function where(p: CsvProblem): string {
  const parts: string[] = [];
  if (p.row !== undefined) parts.push(`row ${p.row}`);
  if (p.column !== undefined) parts.push(`column ${p.column}`);
  return parts.length ? `${parts.join(', ')}: ${p.message}` : p.message;
}

/** One line summary of the problems, for the JSON error message. */
export function describeProblems(problems: readonly CsvProblem[]): string {
  return problems.map(where).join('; ');
}

/**
 * Parses an adjacency matrix. `knownNodeIds` are the node ids of the model version whose links the
 * matrix replaces; the header row and column must list exactly these ids (any order, same order in both).
 */
export function parseAdjacencyCsv(text: string, knownNodeIds: readonly string[]): AdjacencyParse {
  const problems: CsvProblem[] = [];
  const body = text.replace(/^\uFEFF/, '');
  if (body.trim() === '') return { ok: false, problems: [{ message: 'the file is empty' }] };
  const parsed = Papa.parse<string[]>(body, { skipEmptyLines: 'greedy', delimiter: '' });
  for (const e of parsed.errors) {
    // papaparse rows are 0-based data rows; +1 gives the spreadsheet row number.
    problems.push({ row: e.row !== undefined ? e.row + 1 : undefined, message: `malformed CSV (${e.message})` });
    if (problems.length >= MAX_PROBLEMS) break;
  }
  if (problems.length) return { ok: false, problems };
  const rows = parsed.data.map((r) => r.map((c) => c.trim()));
  if (rows.length < 2) return { ok: false, problems: [{ message: 'need a header row and at least one node row' }] };

  const header = rows[0];
  const ids = header.slice(1);
  const known = new Set(knownNodeIds);
  const seen = new Map<string, number>();
  ids.forEach((id, k) => {
    const column = k + 2;
    if (id === '') problems.push({ row: 1, column, message: 'empty node id in the header row' });
    else if (!known.has(id)) problems.push({ row: 1, column, message: `unknown node id "${id}" (the model has ${knownNodeIds.map((n) => `"${n}"`).join(', ')})` });
    else if (seen.has(id)) problems.push({ row: 1, column, message: `node id "${id}" appears twice in the header row (also column ${seen.get(id)})` });
    seen.set(id, column);
  });
  if (ids.length === 0) problems.push({ row: 1, message: 'the header row lists no node ids' });
  const missing = knownNodeIds.filter((id) => !seen.has(id));
  if (ids.length > 0 && missing.length) {
    problems.push({ row: 1, message: `the header row must list every node of the model; missing ${missing.map((m) => `"${m}"`).join(', ')}` });
  }
  if (rows.length - 1 !== ids.length) {
    problems.push({ message: `the header row lists ${ids.length} node ids but there are ${rows.length - 1} node rows; the matrix must be square` });
  }

  const links: CsvLink[] = [];
  for (let r = 1; r < rows.length; r++) {
    const rowNumber = r + 1;
    const cells = rows[r];
    if (cells.length !== header.length) {
      // More cells than the header in a comma file is what decimal commas do ("0,5" → two cells).
      const hint = parsed.meta.delimiter === ',' && cells.length > header.length
        ? '; if the numbers use decimal commas (0,5), those split the cells: save the file with semicolons between cells, or with decimal points (0.5)'
        : '';
      problems.push({ row: rowNumber, message: `has ${cells.length} cells, the header row has ${header.length}${hint}` });
      continue;
    }
    const from = cells[0];
    const expected = ids[r - 1];
    if (from !== expected) {
      if (!known.has(from)) problems.push({ row: rowNumber, column: 1, message: `unknown node id "${from}"` });
      else problems.push({ row: rowNumber, column: 1, message: `node id "${from}" here must match column ${r + 1} of the header row ("${expected ?? ''}")` });
      continue;
    }
    for (let c = 1; c < cells.length; c++) {
      const raw = cells[c];
      if (raw === '') continue;
      // Number('') is 0 and Number('0x1') is 1; accept plain decimal and exponent notation only.
      if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(raw)) {
        const hint = /^[+-]?\d*,\d+$/.test(raw) ? `; write it with a decimal point: ${raw.replace(',', '.')}` : '';
        problems.push({ row: rowNumber, column: c + 1, message: `weight "${raw}" is not a number${hint}` });
        continue;
      }
      const weight = Number(raw);
      if (!Number.isFinite(weight)) {
        problems.push({ row: rowNumber, column: c + 1, message: `weight "${raw}" is not a finite number` });
        continue;
      }
      if (weight === 0) continue;
      const to = ids[c - 1];
      if (to === from) {
        problems.push({ row: rowNumber, column: c + 1, message: `self-link on "${from}": the diagonal must be empty or 0` });
        continue;
      }
      links.push({ from, to, weight });
    }
    if (problems.length >= MAX_PROBLEMS) break;
  }
  if (problems.length) return { ok: false, problems: problems.slice(0, MAX_PROBLEMS) };
  return { ok: true, nodeIds: ids, links };
}
