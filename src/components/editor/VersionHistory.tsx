import { useEffect, useState } from 'react';
import { describeDiffEntry, diffModelDocuments, type LabelContext } from '../../lib/editor';
import { api, type VersionSummary } from './api-client';

/**
 * The model's versions, newest first, and a field-level diff of any two of them
 * in the modeler's words ("Link alder → birch weight: 0.25 → 0.2").
 */
export function VersionHistory({ modelId, refreshKey, onLoad }: { modelId: string; refreshKey: number; onLoad?: (document: unknown, number: number) => void }) {
  const [versions, setVersions] = useState<VersionSummary[] | null>(null);
  const [error, setError] = useState('');
  const [pair, setPair] = useState<{ a: number; b: number } | null>(null);
  const [diff, setDiff] = useState<string[] | null>(null);
  const [diffError, setDiffError] = useState('');

  useEffect(() => {
    let live = true;
    api.listVersions(modelId).then((r) => {
      if (!live) return;
      if (!r.ok) { setError(r.message); return; }
      const list = [...(r.data.versions ?? [])].sort((x, y) => y.number - x.number);
      setVersions(list);
      setError('');
      if (list.length >= 2) setPair({ a: list[1].number, b: list[0].number });
    });
    return () => { live = false; };
  }, [modelId, refreshKey]);

  useEffect(() => {
    if (!pair) return;
    let live = true;
    setDiff(null);
    Promise.all([api.getVersion(modelId, pair.a), api.getVersion(modelId, pair.b)]).then(([ra, rb]) => {
      if (!live) return;
      if (!ra.ok || !rb.ok) { setDiffError((!ra.ok ? ra.message : !rb.ok ? rb.message : '')); return; }
      setDiffError('');
      const parse = (d: unknown) => (typeof d === 'string' ? JSON.parse(d) : d);
      const before = parse(ra.data.version.document) as LabelContext;
      const after = parse(rb.data.version.document) as LabelContext;
      setDiff(diffModelDocuments(before, after).map((e) => describeDiffEntry(e, before, after)));
    });
    return () => { live = false; };
  }, [modelId, pair?.a, pair?.b]);

  const load = async (n: number) => {
    const r = await api.getVersion(modelId, n);
    if (r.ok && onLoad) onLoad(typeof r.data.version.document === 'string' ? JSON.parse(r.data.version.document) : r.data.version.document, n);
  };

  return (
    <section className="ed-section" aria-labelledby="ed-history-h">
      <h2 id="ed-history-h">Version history</h2>
      {error ? <p className="ed-error-box" role="alert">{error}</p> : null}
      {versions === null && !error ? <p className="ed-hint">Loading versions…</p> : null}
      {versions && versions.length > 0 ? (
        <ol className="ed-versions" reversed>
          {versions.map((v) => (
            <li key={v.number}>
              <span className="ed-mono">v{v.number}</span>
              <span>{v.changeNote || <em>no change note</em>}</span>
              <span className="ed-hint">{[v.createdByName ?? v.createdBy, v.createdAt ? new Date(v.createdAt).toLocaleString() : ''].filter(Boolean).join(' · ')}</span>
              {v.hash ? <span className="ed-hint ed-mono" title={`content hash ${v.hash}`}>{v.hash.slice(0, 10)}</span> : null}
              {onLoad ? <button type="button" className="ed-btn ed-btn-quiet" onClick={() => load(v.number)}>Load into editor</button> : null}
            </li>
          ))}
        </ol>
      ) : null}
      {versions && versions.length >= 2 && pair ? (
        <div className="ed-diff">
          <div className="ed-row">
            <label className="ed-label" htmlFor="ed-diff-a">Compare version</label>
            <select id="ed-diff-a" className="ed-input" value={pair.a} onChange={(e) => setPair({ ...pair, a: Number(e.target.value) })}>
              {versions.map((v) => <option key={v.number} value={v.number}>v{v.number}</option>)}
            </select>
            <label className="ed-label" htmlFor="ed-diff-b">with</label>
            <select id="ed-diff-b" className="ed-input" value={pair.b} onChange={(e) => setPair({ ...pair, b: Number(e.target.value) })}>
              {versions.map((v) => <option key={v.number} value={v.number}>v{v.number}</option>)}
            </select>
          </div>
          {diffError ? <p className="ed-error-box" role="alert">{diffError}</p> : null}
          {diff === null && !diffError ? <p className="ed-hint">Computing the differences…</p> : null}
          {diff && diff.length === 0 ? <p className="ed-hint">The two versions are identical.</p> : null}
          {diff && diff.length > 0 ? (
            <ul className="ed-diff-list" aria-label={`Differences from v${pair.a} to v${pair.b}`}>
              {diff.map((line, k) => <li key={k}>{line}</li>)}
            </ul>
          ) : null}
        </div>
      ) : null}
    </section>
  );
}
