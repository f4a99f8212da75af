import type { Diagram, SpecialPoint } from '../../lib/atlas/types';

/**
 * Minimal live-preview drawing: every branch as the mean state against the swept parameter,
 * stable stretches solid and unstable stretches dashed (distinguishable without colour), special
 * points as labelled markers. The full interactive diagram is the diagram island's job.
 */
const TYPE_WORDS: Record<SpecialPoint['type'], string> = {
  'saddle-node': 'saddle-node',
  pitchfork: 'pitchfork',
  transcritical: 'transcritical',
  hopf: 'Hopf',
  degenerate: 'degenerate point',
};

const mean = (x: readonly number[]) => (x.length === 0 ? 0 : x.reduce((a, b) => a + b, 0) / x.length);

export function PreviewPlot({ diagram }: { diagram: Diagram }) {
  const W = 560;
  const H = 260;
  const m = { l: 52, r: 12, t: 12, b: 36 };
  let pMin = Infinity, pMax = -Infinity, yMin = Infinity, yMax = -Infinity;
  for (const b of diagram.branches) for (const pt of b.points) {
    const y = mean(pt.x);
    if (!Number.isFinite(y) || !Number.isFinite(pt.p)) continue;
    pMin = Math.min(pMin, pt.p); pMax = Math.max(pMax, pt.p); yMin = Math.min(yMin, y); yMax = Math.max(yMax, y);
  }
  const empty = !Number.isFinite(pMin);
  if (empty) { pMin = 0; pMax = 1; yMin = 0; yMax = 1; }
  if (pMax - pMin < 1e-12) { pMin -= 0.5; pMax += 0.5; }
  if (yMax - yMin < 1e-12) { yMin -= 0.5; yMax += 0.5; }
  const padY = (yMax - yMin) * 0.06;
  yMin -= padY; yMax += padY;
  const sx = (p: number) => m.l + ((p - pMin) / (pMax - pMin)) * (W - m.l - m.r);
  const sy = (y: number) => H - m.b - ((y - yMin) / (yMax - yMin)) * (H - m.t - m.b);
  const ticks = (lo: number, hi: number) => [0, 0.25, 0.5, 0.75, 1].map((f) => lo + f * (hi - lo));
  const fmt = (v: number) => (Math.abs(v) >= 1000 || (Math.abs(v) < 0.01 && v !== 0) ? v.toExponential(1) : Number(v.toPrecision(3)).toString());

  const segments: { d: string; unstable: boolean; branch: string }[] = [];
  for (const b of diagram.branches) {
    let cur: string[] = [];
    let state: boolean | null = null;
    const flush = () => {
      if (cur.length > 1 && state !== null) segments.push({ d: `M${cur.join('L')}`, unstable: state, branch: b.id });
    };
    for (const pt of b.points) {
      const y = mean(pt.x);
      if (!Number.isFinite(y)) continue;
      const xy = `${sx(pt.p).toFixed(1)},${sy(y).toFixed(1)}`;
      const u = pt.unstable > 0;
      if (state !== null && u !== state) {
        cur.push(xy);
        flush();
        cur = [xy];
      } else cur.push(xy);
      state = u;
    }
    flush();
  }
  const types = [...new Set(diagram.bifurcations.map((s) => s.type))];

  return (
    <figure className="ed-preview-figure">
      <svg viewBox={`0 0 ${W} ${H}`} className="ed-preview-svg" role="img" aria-label={`Preview: ${diagram.branches.length} branches and ${diagram.bifurcations.length} special points against ${diagram.parameter}`} data-testid="preview-plot">
        <rect x={m.l} y={m.t} width={W - m.l - m.r} height={H - m.t - m.b} className="ed-plot-frame" />
        {ticks(pMin, pMax).map((p, k) => (
          <g key={`x${k}`}>
            <line x1={sx(p)} x2={sx(p)} y1={H - m.b} y2={H - m.b + 4} className="ed-axis" />
            <text x={sx(p)} y={H - m.b + 16} textAnchor="middle" className="ed-tick">{fmt(p)}</text>
          </g>
        ))}
        {ticks(yMin, yMax).map((y, k) => (
          <g key={`y${k}`}>
            <line x1={m.l - 4} x2={m.l} y1={sy(y)} y2={sy(y)} className="ed-axis" />
            <text x={m.l - 7} y={sy(y) + 4} textAnchor="end" className="ed-tick">{fmt(y)}</text>
          </g>
        ))}
        <text x={(W + m.l) / 2} y={H - 4} textAnchor="middle" className="ed-axis-label">{diagram.parameter}</text>
        <text x={12} y={(H - m.b) / 2} textAnchor="middle" transform={`rotate(-90 12 ${(H - m.b) / 2})`} className="ed-axis-label">mean state</text>
        {segments.map((s, k) => (
          <path key={k} d={s.d} className={s.unstable ? 'ed-branch ed-branch-unstable' : 'ed-branch'} data-branch={s.branch} fill="none" />
        ))}
        {diagram.bifurcations.map((s) => {
          const cx = sx(s.p), cy = sy(mean(s.x));
          return (
            <g key={s.id} data-special={s.type}>
              <title>{`${TYPE_WORDS[s.type]} at ${diagram.parameter} = ${s.p.toPrecision(6)}`}</title>
              {s.type === 'saddle-node' ? <rect x={cx - 4} y={cy - 4} width={8} height={8} className="ed-special" /> :
               s.type === 'hopf' ? <path d={`M${cx},${cy - 5}L${cx + 5},${cy}L${cx},${cy + 5}L${cx - 5},${cy}Z`} className="ed-special" /> :
               <circle cx={cx} cy={cy} r={4.5} className="ed-special" />}
            </g>
          );
        })}
        {empty ? <text x={W / 2} y={H / 2} textAnchor="middle" className="ed-tick">No equilibria found in this range</text> : null}
      </svg>
      <figcaption className="ed-legend">
        <span><svg width="28" height="8" aria-hidden="true"><line x1="0" y1="4" x2="28" y2="4" className="ed-branch" /></svg> stable</span>
        <span><svg width="28" height="8" aria-hidden="true"><line x1="0" y1="4" x2="28" y2="4" className="ed-branch ed-branch-unstable" /></svg> unstable</span>
        {types.map((t) => <span key={t}>{t === 'saddle-node' ? '■' : t === 'hopf' ? '◆' : '●'} {TYPE_WORDS[t]}</span>)}
      </figcaption>
    </figure>
  );
}
