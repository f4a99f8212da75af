/**
 * Development-only harness: builds the invented analytic two-lake fixture in the browser (so 50,000
 * points need not travel as island props) and mounts the islands on it. Used by /dev/diagram-preview.
 */
import { useMemo } from 'react';
import { makeTwoLakeBands, makeTwoLakeDiagram, makeTwoLakeEscapeGraph, TWO_LAKE_PROVENANCE, TWO_LAKE_TAGS } from '../../../../tests/fixtures/two-lake';
import { CompareView } from '../../compare/CompareView';
import { DiagramView } from '../DiagramView';

export function PreviewHarness({ points = 400, coupling = 0.1, compare = false }: { points?: number; coupling?: number; compare?: boolean }) {
  const data = useMemo(() => {
    const diagram = makeTwoLakeDiagram({ coupling, pointsPerBranch: Math.max(10, Math.round(points / 3)) });
    const regimes = makeTwoLakeBands(diagram);
    const escapeGraphs = regimes.map((b) => makeTwoLakeEscapeGraph(diagram, (b.from + b.to) / 2));
    return { diagram, regimes, escapeGraphs };
  }, [points, coupling]);
  const variant = useMemo(() => {
    if (!compare) return null;
    const diagram = makeTwoLakeDiagram({ coupling: coupling * 1.6, pointsPerBranch: 400 });
    return { diagram, regimes: makeTwoLakeBands(diagram) };
  }, [compare, coupling]);
  const tipThresholds = [0, 0];
  return (
    <div style={{ display: 'grid', gap: '2rem' }}>
      <DiagramView diagram={data.diagram} regimes={data.regimes} escapeGraphs={data.escapeGraphs} tags={TWO_LAKE_TAGS}
        thresholds={tipThresholds} provenance={TWO_LAKE_PROVENANCE} canTag onAddTag={async () => {}} title="Two lakes (invented fixture)" />
      {variant ? (
        <CompareView items={[
          { label: `coupling ${coupling}`, diagram: data.diagram, regimes: data.regimes, provenance: TWO_LAKE_PROVENANCE },
          { label: `coupling ${coupling * 1.6}`, diagram: variant.diagram, regimes: variant.regimes, provenance: { ...TWO_LAKE_PROVENANCE, runId: 'fixture-run-b' } },
        ]} />
      ) : null}
    </div>
  );
}

export default PreviewHarness;
