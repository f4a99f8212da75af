/**
 * Export of one escape-study chart (FigureExport): SVG, PNG and PDF with the provenance footer
 * (model, version hash, run, engine, noise, paths, seed, date) and an optional caption, light or
 * dark; and the study's data as CSV and JSON.
 */
import type { ChartFigure } from '../../lib/plot/escape-chart';
import type { EscapeChartOptions } from '../../lib/plot/escape-charts';
import { safeFileName } from '../../lib/plot/data-export';
import { escapeFooter, type EscapeProvenance } from '../../lib/plot/escape-charts';
import FigureExport from '../export/FigureExport';

export interface ChartExportProps {
  /** Short name for files and the button's label ("sequences"). */
  readonly name: string;
  readonly label: string;
  readonly build: (o: EscapeChartOptions) => ChartFigure | null;
  readonly provenance: EscapeProvenance;
  readonly csvUrl: string;
  readonly jsonUrl: string;
}

export default function ChartExport(props: ChartExportProps) {
  const { modelName, runId } = props.provenance;
  return (
    <FigureExport
      build={props.build}
      provenance={props.provenance}
      description={escapeFooter(props.provenance).join(' · ')}
      stem={`${modelName}-${runId}-escape-${props.name}`}
      label={`the ${props.label}`}
      emptyMessage="there is nothing to draw yet"
      testId={(what) => `export-${what}-${props.name}`}
      dataHeading="Data behind it (the whole study)"
      data={[
        { label: 'CSV', href: props.csvUrl, download: true },
        { label: 'JSON', href: props.jsonUrl, download: safeFileName(`${modelName}-${runId}-escapes`, 'json') },
      ]}
      linkClass="es-link-button"
    />
  );
}
