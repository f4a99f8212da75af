/** The diagram's content as tables, for screen readers and for reading values off exactly. */
import { memo } from 'react';
import type { Diagram } from '../../lib/atlas/types';
import { REGIME_LABEL } from '../../lib/plot/figure';
import { SPECIAL_LABEL } from '../../lib/plot/markers';
import { project, type Projection } from '../../lib/plot/projection';
import { splitRuns } from '../../lib/plot/runs';
import { formatValue } from '../../lib/plot/ticks';
import type { BandTag, RegimeBand } from '../../lib/regimes/types';
import { bandTableRows, locatedBandEdges, type UnlabelledStretch } from '../../lib/regimes/band-edge';

const END_WORDS: Record<string, string> = {
  'sweep-bound': 'edge of the sweep', 'closed-loop': 'closed on itself', merged: 'met another branch', 'point-cap': 'point cap reached',
  'step-collapse': 'step size collapsed', 'newton-failure': 'corrector failed', 'state-bound': 'left the state box',
};

export const DiagramTable = memo(function DiagramTable({ diagram, projection, regimes, unlabelled = [], tags, onOpenSpecial }: {
  diagram: Diagram; projection: Projection; regimes: readonly RegimeBand[]; unlabelled?: readonly UnlabelledStretch[]; tags: readonly BandTag[]; onOpenSpecial: (id: string) => void;
}) {
  const crossings = locatedBandEdges(regimes);
  return (
    <details className="dg-tables">
      <summary>Diagram as tables (branches, special points, bands)</summary>
      <table data-testid="branch-table">
        <caption>Branches</caption>
        <thead><tr><th scope="col">Branch</th><th scope="col">Found</th><th scope="col">Points</th><th scope="col">{diagram.parameter} from</th><th scope="col">{diagram.parameter} to</th><th scope="col">Stable stretches</th><th scope="col">Unstable stretches</th><th scope="col">Ends</th></tr></thead>
        <tbody>
          {diagram.branches.map((b) => {
            const runs = splitRuns(b);
            let lo = Infinity, hi = -Infinity;
            for (const p of b.points) { if (p.p < lo) lo = p.p; if (p.p > hi) hi = p.p; }
            return (
              <tr key={b.id}>
                <th scope="row">{b.id}</th>
                <td>{b.origin.kind === 'start' ? 'from a starting equilibrium' : `switched at ${b.origin.from ?? 'a branch point'}`}</td>
                <td className="num">{b.points.length}</td>
                <td className="num">{formatValue(lo)}</td><td className="num">{formatValue(hi)}</td>
                <td className="num">{runs.filter((r) => r.stable).length}</td><td className="num">{runs.filter((r) => !r.stable).length}</td>
                <td>{b.ends.map((e) => END_WORDS[e] ?? e).join('; ')}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <table data-testid="special-table">
        <caption>Special points</caption>
        <thead><tr><th scope="col">Type</th><th scope="col">{diagram.parameter}</th>{diagram.variables.map((v) => <th key={v} scope="col">{v}</th>)}<th scope="col">Projected</th><th scope="col">Reason</th></tr></thead>
        <tbody>
          {diagram.bifurcations.map((sp) => (
            <tr key={sp.id} data-special-row={sp.id}>
              <th scope="row"><button type="button" className="dg-link" onClick={() => onOpenSpecial(sp.id)}>{SPECIAL_LABEL[sp.type]}</button></th>
              <td className="num">{formatValue(sp.p, 8)}</td>
              {sp.x.map((v, i) => <td key={i} className="num">{formatValue(v, 8)}</td>)}
              <td className="num">{formatValue(project(sp.x, projection), 8)}</td>
              <td>{sp.evidence.reason}{sp.note ? ` (${sp.note})` : ''}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {crossings.length ? (
        <table data-testid="crossover-table">
          <caption>Located band edges (saddle connections and engagement crossovers, bisected to 1e-9; mark ◇ in the diagram)</caption>
          <thead><tr><th scope="col">Kind</th><th scope="col">{diagram.parameter}</th><th scope="col">What changes</th></tr></thead>
          <tbody>
            {crossings.map((c) => (
              <tr key={`${c.p}|${c.text}`}><th scope="row"><span className="dg-crossover-mark" aria-hidden="true">◇</span> {c.kind}</th><td className="num">{formatValue(c.p, 10)}</td><td>{c.text.slice(c.text.indexOf(':') + 2)}</td></tr>
            ))}
          </tbody>
        </table>
      ) : null}
      {regimes.length ? (
        <table data-testid="band-table">
          <caption>Coupling regime bands</caption>
          <thead><tr><th scope="col">Regime</th><th scope="col">From</th><th scope="col">To</th><th scope="col">Bounded by</th><th scope="col">Reason</th></tr></thead>
          <tbody>
            {bandTableRows(regimes, unlabelled).map((row, i) => (
              <tr key={i} data-testid={row.regime ? undefined : 'unlabelled-row'}><th scope="row">{row.regime ? REGIME_LABEL[row.regime] : 'not labelled'}</th><td className="num">{formatValue(row.from, 8)}</td><td className="num">{formatValue(row.to, 8)}</td><td>{row.bounds.length ? row.bounds.join(', ') : '—'}</td><td>{row.reason}</td></tr>
            ))}
          </tbody>
        </table>
      ) : null}
      {tags.length ? (
        <table data-testid="tag-table">
          <caption>Manual tags</caption>
          <thead><tr><th scope="col">Name</th><th scope="col">From</th><th scope="col">To</th><th scope="col">Note</th></tr></thead>
          <tbody>{tags.map((t, i) => <tr key={i}><th scope="row"><span className="dg-swatch" style={{ background: t.colour }} aria-hidden="true" />{t.name}</th><td className="num">{formatValue(t.from)}</td><td className="num">{formatValue(t.to)}</td><td>{t.note}</td></tr>)}</tbody>
        </table>
      ) : null}
    </details>
  );
});
