/**
 * One escape-study chart on screen: the Figure (the same one the export writes), focusable marks over
 * it, and a readout that follows hover and focus. Used by EscapeView, PathPicture and EscapeCompare.
 */
import { useId, useState } from 'react';
import type { ChartFigure, ChartMark } from '../../lib/plot/escape-chart';
import PrimNode from '../export/PrimNode';

/** One chart: the figure, focusable marks over it, a readout that follows hover and focus. */
export default function Chart({ name, fig, onPick, picked }: { name: string; fig: ChartFigure; onPick?: (m: ChartMark) => void; picked?: string | null }) {
  const [active, setActive] = useState<ChartMark | null>(null);
  const clipId = `es-clip-${useId().replace(/[^a-zA-Z0-9_-]/g, '')}`;
  const shown = active ?? fig.marks.find((m) => m.id === picked) ?? null;
  return (
    <div className="es-chart" data-testid={`escape-chart-${name}`}>
      <div className="es-plot" style={{ maxWidth: fig.width }}>
        <svg viewBox={`0 0 ${fig.width} ${fig.height}`} width="100%" role="group" aria-label={fig.title} style={{ display: 'block' }}>
          <defs><clipPath id={clipId}><rect x={fig.plot.x} y={fig.plot.y} width={fig.plot.w} height={fig.plot.h} /></clipPath></defs>
          <rect width={fig.width} height={fig.height} fill={fig.background} />
          {fig.items.map((p, i) => <PrimNode key={i} p={p} clipId={clipId} />)}
          {shown ? <circle className="es-ring" cx={shown.cx} cy={shown.cy} r={8.5} /> : null}
          {fig.marks.map((m) => (
            <circle
              key={m.id}
              className="es-hit"
              cx={m.cx}
              cy={m.cy}
              r={8}
              tabIndex={0}
              role="button"
              aria-label={m.readout.join('; ')}
              data-testid="escape-mark"
              data-kind={m.kind}
              data-series={m.label}
              onMouseEnter={() => setActive(m)}
              onMouseLeave={() => setActive((a) => (a?.id === m.id ? null : a))}
              onFocus={() => setActive(m)}
              onBlur={() => setActive((a) => (a?.id === m.id ? null : a))}
              onClick={() => onPick?.(m)}
              onKeyDown={(e) => { if (e.key === 'Enter' || e.key === ' ') { e.preventDefault(); onPick?.(m); } }}
            />
          ))}
        </svg>
        {shown ? (
          <div className="dg-tooltip es-tooltip" role="status" data-testid="escape-readout"
            style={{ left: `${(shown.cx / fig.width) * 100}%`, top: `${(shown.cy / fig.height) * 100}%`, transform: shown.cx > fig.width * 0.6 ? 'translate(calc(-100% - 12px), -50%)' : undefined }}>
            <div className="dg-tooltip-head">{shown.readout[0]}</div>
            {shown.readout.slice(1).map((line, i) => <div key={i}>{line}</div>)}
          </div>
        ) : null}
      </div>
    </div>
  );
}

