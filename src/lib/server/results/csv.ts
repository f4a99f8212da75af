import Papa from 'papaparse';
import type { Diagram } from '../../atlas/types.ts';

/**
 * One row per stored point: branch id, the swept parameter, every state variable, and the number
 * of eigenvalues with positive real part. Column names are the parameter and variable names, so
 * the file reads on its own. Numbers are written with full double precision (shortest round-trip).
 */
export function diagramToCsv(diagram: Diagram): string {
  const fields = ['branch', diagram.parameter, ...diagram.variables, 'unstable'];
  const data: (string | number)[][] = [];
  for (const b of diagram.branches) {
    for (const pt of b.points) data.push([b.id, pt.p, ...pt.x, pt.unstable]);
  }
  return Papa.unparse({ fields, data }, { newline: '\n' }) + '\n';
}
