import { REGIME_LABEL, STABLE_WIDTH, UNSTABLE_DASH, UNSTABLE_WIDTH } from '../../lib/plot/figure';
import { markerFillRule, markerPath, SPECIAL_DESCRIPTION, SPECIAL_LABEL, SPECIAL_TYPES } from '../../lib/plot/markers';
import type { SpecialPointType } from '../../lib/atlas/types';
import type { RegimeBand } from '../../lib/regimes/types';

/**
 * Legend in full words: line styles, then only what the diagram draws: the special-point glyphs of
 * the types present (as in the exported figure, lib/plot/figure.ts), the located-edge mark when there
 * is one, the band shades present and manual tags.
 */
export function Legend({ regimes, specialTypes, hasLocatedEdges, hasUnlabelled = false, showTags }: {
  regimes: readonly RegimeBand[];
  specialTypes: ReadonlySet<SpecialPointType>;
  hasLocatedEdges: boolean;
  hasUnlabelled?: boolean;
  showTags: boolean;
}) {
  const present = [...new Set(regimes.map((r) => r.regime))];
  return (
    <div className="dg-legend" aria-label="Legend">
      <span className="dg-legend-item">
        <svg width={30} height={12} aria-hidden="true"><line x1={2} x2={28} y1={6} y2={6} className="dg-line-stable" strokeWidth={STABLE_WIDTH} /></svg>
        stable branch (solid, heavy)
      </span>
      <span className="dg-legend-item">
        <svg width={30} height={12} aria-hidden="true"><line x1={2} x2={28} y1={6} y2={6} className="dg-line-unstable" strokeWidth={UNSTABLE_WIDTH} strokeDasharray={UNSTABLE_DASH.join(' ')} /></svg>
        unstable branch (dashed, light)
      </span>
      {SPECIAL_TYPES.filter((t) => specialTypes.has(t)).map((t) => (
        <span key={t} className="dg-legend-item" title={SPECIAL_DESCRIPTION[t]} data-legend-glyph={t}>
          <svg width={18} height={18} aria-hidden="true" className={`dg-special-${t}`}><path className="dg-glyph" d={markerPath(t, 9, 9, 7)} fillRule={markerFillRule(t)} /></svg>
          {SPECIAL_LABEL[t]}
        </span>
      ))}
      {hasLocatedEdges ? (
        <span className="dg-legend-item" title="a band edge located between special points: a saddle connection or an engagement crossover">
          <svg width={18} height={18} aria-hidden="true" className="dg-crossover"><path d="M 9 3 L 14 9 L 9 15 L 4 9 Z" /></svg>
          located band edge
        </span>
      ) : null}
      {present.map((r) => (
        <span key={r} className="dg-legend-item">
          <span className={`dg-swatch dg-band-${r}`} aria-hidden="true" />{REGIME_LABEL[r]}
        </span>
      ))}
      {hasUnlabelled ? <span className="dg-legend-item"><span className="dg-swatch dg-swatch-unlabelled" aria-hidden="true" />not labelled (hatched; hover for why)</span> : null}
      {showTags ? <span className="dg-legend-item"><span className="dg-swatch dg-swatch-tag" aria-hidden="true" />manual tag</span> : null}
    </div>
  );
}
