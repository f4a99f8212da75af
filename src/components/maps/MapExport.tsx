/**
 * Export of the map figure (FigureExport): SVG, PNG and PDF with the provenance footer and an
 * optional caption, light or dark; and the map's data as CSV (curve points) and JSON (the whole map,
 * the CLI's shape).
 */
import type { MapFigure, MapFigureInput } from '../../lib/plot/map-figure';
import { safeFileName } from '../../lib/plot/data-export';
import { provenanceLine, type Provenance } from '../../lib/plot/provenance';
import FigureExport from '../export/FigureExport';

export interface MapExportProps {
  readonly build: (o: Pick<MapFigureInput, 'width' | 'palette' | 'caption' | 'provenance'>) => MapFigure | null;
  readonly provenance: Provenance;
  readonly csvUrl: string;
  readonly jsonUrl: string;
}

const TEST_IDS = { toggle: 'map-export-toggle', svg: 'map-export-svg', png: 'map-export-png', pdf: 'map-export-pdf' } as const;

export default function MapExport(props: MapExportProps) {
  const stem = `${props.provenance.modelName}-${props.provenance.runId}-map`;
  return (
    <FigureExport
      build={props.build}
      provenance={props.provenance}
      description={`${provenanceLine(props.provenance)} · Model results are indicative; defer to domain experts and local regulation.`}
      stem={stem}
      label="the map"
      emptyMessage="the map is not loaded yet"
      testId={(what) => TEST_IDS[what]}
      dataHeading="Data behind it"
      data={[
        { label: 'CSV (curve points)', href: props.csvUrl, download: true },
        { label: 'JSON (whole map)', href: props.jsonUrl, download: safeFileName(stem, 'json') },
      ]}
      linkClass="mp-link-button"
    />
  );
}
