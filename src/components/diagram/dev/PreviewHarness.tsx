/**
 * Development-only harness: builds the invented analytic two-lake fixture in the browser (so 50,000
 * points need not travel as island props) and mounts the islands on it. Used by /dev/diagram-preview.
 */
import { useEffect, useMemo, useState } from 'react';
import type { Diagram } from '../../../lib/atlas/types';
import type { EscapeGraph, RegimeBand } from '../../../lib/regimes/types';
import { makeTwoLakeBands, makeTwoLakeDiagram, makeTwoLakeEscapeGraph, TWO_LAKE_PROVENANCE, TWO_LAKE_TAGS } from '../../../../tests/fixtures/two-lake';
import { CompareView } from '../../compare/CompareView';
import { DiagramView } from '../DiagramView';

interface EngineFixture { diagram: Diagram; regimes: RegimeBand[]; escapeGraphs: EscapeGraph[] }

/** The engine's own output on an invented three-lake chain (scripts/make-fixtures.ts). */
function EnginePreview() {
  const [data, setData] = useState<EngineFixture | null>(null);
  useEffect(() => { void import('../../../../tests/fixtures/engine-three-lakes.json').then((m) => setData((m.default ?? m) as unknown as EngineFixture)); }, []);
  if (!data) return <p>Loading the engine fixture…</p>;
  return <DiagramView diagram={data.diagram} regimes={data.regimes} escapeGraphs={data.escapeGraphs} provenance={{ ...TWO_LAKE_PROVENANCE, modelName: 'Three invented lakes (engine fixture)', engineVersion: data.diagram.engineVersion }} title="Three lakes (engine fixture, invented model)" />;
}

export function PreviewHarness({ points = 400, coupling = 0.1, compare = false, source = 'analytic', unlabelled = false }: { points?: number; coupling?: number; compare?: boolean; source?: string; unlabelled?: boolean }) {
  if (source === 'engine') return <EnginePreview />;
  return <AnalyticPreview points={points} coupling={coupling} compare={compare} unlabelled={unlabelled} />;
}

/** ?unlabelled=1: the middle (strong) band left out, its neighbours' bounds saying why, as labelRegimes words it (invented). */
const UNLABELLED_WHY = 'no way out of all-base found (invented for the preview)';
function withoutMiddleBand(bands: RegimeBand[]): RegimeBand[] {
  return bands.flatMap((b, i) => {
    if (i === 2) return [];
    if (i === 1) return [{ ...b, bounds: [b.bounds[0], `label undefined: no label above: ${UNLABELLED_WHY}`] }];
    if (i === 3) return [{ ...b, bounds: [`label undefined: no label below: ${UNLABELLED_WHY}`, b.bounds[1]] }];
    return [b];
  });
}

function AnalyticPreview({ points, coupling, compare, unlabelled }: { points: number; coupling: number; compare: boolean; unlabelled: boolean }) {
  const data = useMemo(() => {
    const diagram = makeTwoLakeDiagram({ coupling, pointsPerBranch: Math.max(10, Math.round(points / 3)) });
    const all = makeTwoLakeBands(diagram);
    const regimes = unlabelled ? withoutMiddleBand(all) : all;
    const escapeGraphs = regimes.map((b) => makeTwoLakeEscapeGraph(diagram, (b.from + b.to) / 2));
    return { diagram, regimes, escapeGraphs };
  }, [points, coupling, unlabelled]);
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
          { label: `coupling ${Number((coupling * 1.6).toPrecision(6))}`, diagram: variant.diagram, regimes: variant.regimes, provenance: { ...TWO_LAKE_PROVENANCE, runId: 'fixture-run-b' } },
        ]} />
      ) : null}
    </div>
  );
}

export default PreviewHarness;
