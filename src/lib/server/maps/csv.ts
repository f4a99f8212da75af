/**
 * A map's curve points as one CSV table after a provenance block: one row per curve point with the
 * curve's id and type, both parameter values, the Hopf frequency (empty elsewhere) and the state.
 * Pure (no database), shared by the API route and the tests.
 */
import type { MapDocumentView } from '../../plot/map-types.ts';

const cell = (v: unknown): string => {
  if (v === null || v === undefined) return '';
  const s = String(v);
  return /[",\n#]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
};

/** `variables` names the state columns (x_<name>); without it, x1..xn. */
export function mapToCsv(map: Pick<MapDocumentView, 'parameters' | 'curves'>, provenance: Record<string, string | number>, variables?: readonly string[]): string {
  const lines: string[] = ['# Brinkmap two-parameter map: curve points'];
  for (const [k, v] of Object.entries(provenance)) lines.push(`# ${k}: ${String(v).replace(/\n/g, ' ')}`);
  lines.push('# Model results are indicative; defer to domain experts and local regulation.');
  const n = map.curves.reduce((m, c) => Math.max(m, ...c.points.map((p) => p.x.length)), 0);
  const names = Array.from({ length: n }, (_, i) => (variables && variables.length === n ? `x_${variables[i]}` : `x${i + 1}`));
  lines.push(['curve', 'type', 'point', map.parameters[0], map.parameters[1], 'frequency', ...names].map(cell).join(','));
  for (const c of map.curves) {
    c.points.forEach((pt, i) => {
      lines.push([c.id, c.type, i, pt.p[0], pt.p[1], pt.frequency ?? '', ...pt.x].map(cell).join(','));
    });
  }
  return `${lines.join('\n')}\n`;
}

/** State variable names of a model document (network: node ids; ode: variable names). */
export function documentVariables(document: unknown): string[] | undefined {
  const d = document as { nodes?: { id: string }[]; variables?: ({ name: string } | string)[] } | null;
  if (d?.nodes) return d.nodes.map((x) => x.id);
  if (d?.variables) return d.variables.map((v) => (typeof v === 'string' ? v : v.name));
  return undefined;
}
