/** Details of the selected branch point, special point or band. */
import { useEffect, useRef, useState } from 'react';
import type { Diagram, Eigenvalue } from '../../lib/atlas/types';
import { REGIME_LABEL } from '../../lib/plot/figure';
import { markerFillRule, markerPath, SPECIAL_DESCRIPTION, SPECIAL_LABEL } from '../../lib/plot/markers';
import { project, projectionLabel, type Projection } from '../../lib/plot/projection';
import { formatValue } from '../../lib/plot/ticks';
import type { BandTag, EscapeGraph, RegimeBand } from '../../lib/regimes/types';
import { bandEdgeKind, type UnlabelledStretch } from '../../lib/regimes/band-edge';
import { bandExitRows, bandExitSummary } from '../../lib/regimes/band-exits';

/**
 * Why the band has its label: a one-line summary and a table with one row per exit of the start
 * state (the saddle, the nodes engaged there, the further nodes that follow, where it leads, its
 * kind), taken where the band's reason was taken; the full sentence stays below for the record.
 * Results stored without exits show the sentence alone.
 */
function BandReason({ band, names, parameter }: { band: RegimeBand; names: readonly string[]; parameter: string }) {
  const summary = bandExitSummary(band);
  const rows = bandExitRows(band, names);
  if (!summary) {
    return (
      <>
        <h4>Reason</h4>
        <p className="dg-reason" data-testid="band-reason">{band.reason}</p>
      </>
    );
  }
  return (
    <>
      <h4>Ways out</h4>
      <p className="dg-reason" data-testid="band-summary">{summary}</p>
      <table className="dg-exits" data-testid="band-exits">
        <caption className="dg-muted">at {parameter} = {formatValue(band.exitsAt ?? Number.NaN, 6)}</caption>
        <thead><tr><th scope="col">Exit</th><th scope="col">Then</th><th scope="col">Leads to</th><th scope="col">Kind</th></tr></thead>
        <tbody>
          {rows.map((r, k) => (
            <tr key={k} className={`dg-exit-${r.kind}`}>
              <th scope="row">{r.exit}</th>
              <td>{r.then}</td>
              <td>{r.leadsTo}</td>
              <td>{r.kindWords}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <details className="dg-reason-full">
        <summary>In one sentence</summary>
        <p className="dg-reason" data-testid="band-reason">{band.reason}</p>
      </details>
    </>
  );
}

/** The words after the edge kind: the special point's types, or what changed at a located crossover. */
function edgeDetail(bound: string | undefined): string {
  if (!bound || bound === 'sweep-bound') return '';
  const kind = bandEdgeKind(bound);
  if (kind === 'special point') return `: ${bound}`;
  return bound.slice(bound.indexOf(':'));
}
import { EscapeGraphDialog, EscapeGraphDrawing } from './EscapeGraphDrawing';
import { bandStudyLinks, type VersionStudy } from './band-studies';
import type { Selection } from './types';

interface Props {
  diagram: Diagram; projection: Projection; selection: Selection; regimes: readonly RegimeBand[]; escapeGraphs: readonly EscapeGraph[];
  /** Unlabelled stretches of the swept range (unlabelledInRun), for the 'gap' selection. */
  unlabelled?: readonly UnlabelledStretch[];
  /** Finished escape studies of the same model version, newest first (band links). */
  escapeStudies?: readonly VersionStudy[];
  canTag: boolean; onAddTag: (tag: BandTag) => Promise<void>; onClose: () => void;
}

function StateTable({ names, x, projection }: { names: readonly string[]; x: readonly number[]; projection: Projection }) {
  return (
    <table className="dg-kv">
      <caption>State</caption>
      <tbody>
        {names.map((n, i) => <tr key={n}><th scope="row">{n}</th><td className="num">{formatValue(x[i], 10)}</td></tr>)}
        <tr className="dg-kv-sep"><th scope="row">{projectionLabel(projection, names)}</th><td className="num">{formatValue(project(x, projection), 10)}</td></tr>
      </tbody>
    </table>
  );
}

function EigenTable({ values, testId }: { values?: readonly Eigenvalue[]; testId?: string }) {
  if (!values?.length) return <p className="dg-muted">Eigenvalues were not stored for this point.</p>;
  const sorted = [...values].sort((a, b) => b.re - a.re);
  return (
    <table className="dg-kv" data-testid={testId}>
      <caption>Eigenvalues of the Jacobian (largest real part first)</caption>
      <thead><tr><th scope="col">Real part</th><th scope="col">Imaginary part</th></tr></thead>
      <tbody>{sorted.map((e, i) => <tr key={i} className={e.re > 0 ? 'is-positive' : ''}><td className="num">{formatValue(e.re, 8)}</td><td className="num">{formatValue(e.im, 8)}</td></tr>)}</tbody>
    </table>
  );
}

/**
 * The band's links to the escape studies of the same version, each with the weak-noise prediction's
 * most probable escape orders at the study's stored value nearest to the band's representative
 * parameter inside the band (which value, said beside it).
 */
function BandStudies({ band, studies, graphP, parameter }: { band: RegimeBand; studies: readonly VersionStudy[]; graphP?: number; parameter: string }) {
  if (!studies.length) return null;
  const links = bandStudyLinks(band, studies, graphP);
  return (
    <>
      <h4>Escape studies of this version</h4>
      <ul className="dg-studies" data-testid="band-studies">
        {links.map((l) => (
          <li key={l.runId} data-testid="band-study" data-run={l.runId} data-at={l.at?.p ?? ''}>
            <a href={l.href} data-testid="band-study-link">{l.label}</a>
            {l.at ? (
                <table className="dg-exits dg-study-orders" data-testid="band-study-orders">
                  <caption className="dg-muted">Weak-noise prediction at the study’s {parameter} = {formatValue(l.at.p, 6)} (its stored value in this band nearest to the band’s representative {parameter} = {formatValue(l.representative, 6)})</caption>
                  <thead><tr><th scope="col">Escape order</th><th scope="col">Probability</th></tr></thead>
                  <tbody>
                    {l.at.orders.map((o, k) => (
                      <tr key={k}><td>{o.order.join(' → ')}</td><td className="num">{o.probability === null ? '—' : formatValue(o.probability, 3)}</td></tr>
                    ))}
                  </tbody>
                </table>
            ) : <p className="dg-muted" data-testid="band-study-none">This study has no stored value inside this band.</p>}
          </li>
        ))}
      </ul>
      <p className="dg-muted">Predictions are indicative; defer to domain experts and local regulation.</p>
    </>
  );
}

/** Eigenvalues stored in a special point's evidence (the classifier records them there), if any. */
function evidenceEigenvalues(evidence: Record<string, unknown>): Eigenvalue[] | undefined {
  const v = evidence.eigenvalues;
  return Array.isArray(v) && v.every((e) => typeof e?.re === 'number' && typeof e?.im === 'number') ? v as Eigenvalue[] : undefined;
}

function Evidence({ evidence }: { evidence: Record<string, unknown> }) {
  const shownApart = evidenceEigenvalues(evidence) ? ['reason', 'eigenvalues'] : ['reason'];
  const rest = Object.entries(evidence).filter(([k]) => !shownApart.includes(k));
  if (!rest.length) return null;
  const show = (v: unknown): string => typeof v === 'number' ? formatValue(v, 8) : Array.isArray(v) ? v.map(show).join(', ') : typeof v === 'object' && v ? JSON.stringify(v) : String(v);
  return (
    <table className="dg-kv"><caption>Evidence</caption>
      <tbody>{rest.map(([k, v]) => <tr key={k}><th scope="row">{k}</th><td className="num">{show(v)}</td></tr>)}</tbody>
    </table>
  );
}

function TagForm({ band, onAddTag }: { band: Pick<RegimeBand, 'from' | 'to'>; onAddTag: (tag: BandTag) => Promise<void> }) {
  const [name, setName] = useState('');
  const [colour, setColour] = useState('#2f7d6d');
  const [note, setNote] = useState('');
  const [from, setFrom] = useState(String(band.from));
  const [to, setTo] = useState(String(band.to));
  const [error, setError] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [done, setDone] = useState(false);
  const submit = async (e: React.FormEvent) => {
    e.preventDefault();
    setError(null); setDone(false);
    const f = Number(from), t = Number(to);
    if (!name.trim()) { setError('Give the tag a name.'); return; }
    if (!Number.isFinite(f) || !Number.isFinite(t) || f >= t) { setError('“From” must be a number smaller than “to”.'); return; }
    setBusy(true);
    try { await onAddTag({ from: f, to: t, name: name.trim(), colour, note }); setDone(true); setName(''); setNote(''); }
    catch (err) { setError(err instanceof Error ? err.message : 'The tag could not be saved.'); }
    finally { setBusy(false); }
  };
  return (
    <form className="dg-tag-form" onSubmit={submit} data-testid="tag-form">
      <h4>Add a tag to this range</h4>
      <p className="dg-muted">Your tag is stored beside the automatic label; it never replaces it.</p>
      <label>Name <input value={name} onChange={(e) => setName(e.target.value)} required maxLength={80} /></label>
      <div className="dg-row">
        <label>From <input value={from} onChange={(e) => setFrom(e.target.value)} inputMode="decimal" /></label>
        <label>To <input value={to} onChange={(e) => setTo(e.target.value)} inputMode="decimal" /></label>
        <label>Colour <input type="color" value={colour} onChange={(e) => setColour(e.target.value)} /></label>
      </div>
      <label>Note <textarea value={note} onChange={(e) => setNote(e.target.value)} rows={2} maxLength={2000} /></label>
      {error ? <p className="dg-error" role="alert">{error}</p> : null}
      {done ? <p className="dg-ok" role="status">Tag added.</p> : null}
      <button type="submit" disabled={busy}>{busy ? 'Saving…' : 'Add tag'}</button>
    </form>
  );
}

export function SidePanel({ diagram, projection, selection, regimes, unlabelled = [], escapeGraphs, escapeStudies = [], canTag, onAddTag, onClose }: Props) {
  const headRef = useRef<HTMLHeadingElement>(null);
  const [fullGraph, setFullGraph] = useState<EscapeGraph | null>(null);
  useEffect(() => { if (selection) headRef.current?.focus(); }, [selection]);
  const close = <button type="button" className="dg-close" onClick={onClose} aria-label="Close details">Close</button>;
  // Escape inside the full-size dialog closes the dialog only (the browser does that), not the panel.
  const onKey = (e: React.KeyboardEvent) => { if (e.key === 'Escape' && !fullGraph) { e.stopPropagation(); onClose(); } };

  let body: React.ReactNode;
  if (!selection) {
    body = (
      <div className="dg-panel-empty">
        <h3 className="dg-panel-title">Details</h3>
        <p>Click a branch, a special-point glyph or a band (or tab to one and press Enter) to read its values here.</p>
        <p className="dg-muted">Drag to pan, scroll to zoom the parameter axis; + and − zoom, 0 resets.</p>
      </div>
    );
  } else if (selection.kind === 'point') {
    const b = diagram.branches[selection.branch];
    const pt = b?.points[selection.index];
    body = pt ? (
      <>
        <h3 className="dg-panel-title" tabIndex={-1} ref={headRef}>Branch {b.id}, point {selection.index}</h3>{close}
        <dl className="dg-dl">
          <dt>{diagram.parameter}</dt><dd className="num">{formatValue(pt.p, 10)}</dd>
          <dt>Stability</dt><dd>{pt.unstable === 0 ? 'stable (all eigenvalues have negative real part)' : `unstable: ${pt.unstable} eigenvalue${pt.unstable > 1 ? 's' : ''} with positive real part`}</dd>
        </dl>
        <StateTable names={diagram.variables} x={pt.x} projection={projection} />
        <EigenTable values={pt.eigenvalues} />
      </>
    ) : null;
  } else if (selection.kind === 'special') {
    const sp = diagram.bifurcations.find((s) => s.id === selection.id);
    body = sp ? (
      <>
        <h3 className="dg-panel-title" tabIndex={-1} ref={headRef}>
          <svg width={18} height={18} aria-hidden="true" className={`dg-special-${sp.type}`}><path className="dg-glyph" d={markerPath(sp.type, 9, 9, 7)} fillRule={markerFillRule(sp.type)} /></svg>
          {SPECIAL_LABEL[sp.type]}
        </h3>{close}
        <p className="dg-muted">{SPECIAL_DESCRIPTION[sp.type]}</p>
        <dl className="dg-dl">
          <dt>{diagram.parameter}</dt><dd className="num" data-testid="special-p">{formatValue(sp.p, 10)}</dd>
          <dt>Branches</dt><dd>{sp.branches.join(', ') || '—'}</dd>
          {sp.frequency != null ? <><dt>Frequency</dt><dd className="num">{formatValue(sp.frequency, 8)} (imaginary part of the critical pair)</dd></> : null}
        </dl>
        <h4>Why this type</h4>
        <p className="dg-reason" data-testid="special-reason">{sp.evidence.reason}</p>
        {sp.note ? <p className="dg-warn">{sp.note}</p> : null}
        <StateTable names={diagram.variables} x={sp.x} projection={projection} />
        {evidenceEigenvalues(sp.evidence) ? <EigenTable values={evidenceEigenvalues(sp.evidence)} testId="special-eigenvalues" /> : null}
        <Evidence evidence={sp.evidence} />
      </>
    ) : null;
  } else if (selection.kind === 'gap') {
    const gap = unlabelled[selection.index];
    body = gap ? (
      <>
        <h3 className="dg-panel-title" tabIndex={-1} ref={headRef}><span className="dg-swatch dg-swatch-unlabelled" aria-hidden="true" />Not labelled</h3>{close}
        <dl className="dg-dl">
          <dt>Range</dt><dd className="num">{formatValue(gap.from, 8)} to {formatValue(gap.to, 8)}</dd>
          {gap.start !== 'all-base' ? <><dt>Start</dt><dd>{gap.start}</dd></> : null}
        </dl>
        <h4>Why</h4>
        <p className="dg-reason" data-testid="unlabelled-reason">{gap.reason}</p>
        <p className="dg-muted">A label needs a stable {gap.start} state and, for each index-1 saddle that leads out of it, the state its other manifold branch reaches. Where the engine could not establish that, it leaves the stretch unlabelled rather than guess; the run’s diagnostics list each case with its parameter value.</p>
      </>
    ) : null;
  } else if (selection.kind === 'range') {
    body = (
      <>
        <h3 className="dg-panel-title" tabIndex={-1} ref={headRef}>Tag a parameter range</h3>{close}
        <p className="dg-muted">Starts as the range in view; edit “from” and “to” as needed.</p>
        {canTag ? <TagForm key={`${selection.from}:${selection.to}`} band={selection} onAddTag={onAddTag} /> : <p className="dg-muted">Only modelers and owners add tags.</p>}
      </>
    );
  } else {
    const band = regimes[selection.index];
    const graph = band ? escapeGraphs.find((g) => g.p >= band.from && g.p <= band.to) : undefined;
    body = band ? (
      <>
        <h3 className="dg-panel-title" tabIndex={-1} ref={headRef}><span className={`dg-swatch dg-band-${band.regime}`} aria-hidden="true" />{REGIME_LABEL[band.regime]}</h3>{close}
        <dl className="dg-dl">
          <dt>Range</dt><dd className="num">{formatValue(band.from, 8)} to {formatValue(band.to, 8)}</dd>
          <dt>Lower edge</dt><dd data-testid="band-lower-edge"><span className="dg-edge-kind">{bandEdgeKind(band.bounds[0] ?? '')}</span>{edgeDetail(band.bounds[0])}</dd>
          <dt>Upper edge</dt><dd data-testid="band-upper-edge"><span className="dg-edge-kind">{bandEdgeKind(band.bounds[1] ?? '')}</span>{edgeDetail(band.bounds[1])}</dd>
        </dl>
        <BandReason band={band} names={diagram.variables} parameter={diagram.parameter} />
        <h4>Escape graph{graph ? ` at ${diagram.parameter} = ${formatValue(graph.p)}` : ''}</h4>
        {graph ? (
          <>
            <EscapeGraphDrawing graph={graph} names={diagram.variables} />
            <button type="button" className="dg-open-full" onClick={() => setFullGraph(graph)} data-testid="escape-graph-open">Open full size</button>
          </>
        ) : <p className="dg-muted">No escape graph was stored for this band.</p>}
        <BandStudies band={band} studies={escapeStudies} graphP={graph?.p} parameter={diagram.parameter} />
        {canTag ? <TagForm key={selection.index} band={band} onAddTag={onAddTag} /> : null}
      </>
    ) : null;
  }
  return (
    <aside className="dg-side" aria-label="Details of the selection" data-testid="side-panel" onKeyDown={onKey}>
      {body}
      {fullGraph ? <EscapeGraphDialog graph={fullGraph} names={diagram.variables} parameter={diagram.parameter} onClose={() => setFullGraph(null)} /> : null}
    </aside>
  );
}
