import { REGIME_LABEL, STABLE_WIDTH, UNSTABLE_DASH, UNSTABLE_WIDTH } from '../../lib/plot/figure';
import { markerFillRule, markerPath, SPECIAL_DESCRIPTION, SPECIAL_LABEL, SPECIAL_TYPES } from '../../lib/plot/markers';
import type { RegimeBand } from '../../lib/regimes/types';

/** Legend in full words: line styles, every glyph, the band shades present. */
export function Legend({ regimes, showTags }: { regimes: readonly RegimeBand[]; showTags: boolean }) {
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
      {SPECIAL_TYPES.map((t) => (
        <span key={t} className="dg-legend-item" title={SPECIAL_DESCRIPTION[t]}>
          <svg width={18} height={18} aria-hidden="true" className={`dg-special-${t}`}><path className="dg-glyph" d={markerPath(t, 9, 9, 7)} fillRule={markerFillRule(t)} /></svg>
          {SPECIAL_LABEL[t]}
        </span>
      ))}
      {present.map((r) => (
        <span key={r} className="dg-legend-item">
          <span className={`dg-swatch dg-band-${r}`} aria-hidden="true" />{REGIME_LABEL[r]}
        </span>
      ))}
      {showTags ? <span className="dg-legend-item"><span className="dg-swatch dg-swatch-tag" aria-hidden="true" />manual tag</span> : null}
    </div>
  );
}
