import { useState } from 'react';
import { request } from '../editor/api-client';
import { describeIssue } from '../../lib/editor/field-labels';
import '../editor/editor.css';

/** "Start a run" form on the model overview: version, optional sweep range, e-mail when done. */
export default function StartRun({ modelId, versions, defaultFrom, defaultTo, parameter }: {
  modelId: number;
  versions: number[];
  defaultFrom?: number;
  defaultTo?: number;
  parameter?: string;
}) {
  const [version, setVersion] = useState(versions[0]);
  const [from, setFrom] = useState(defaultFrom !== undefined ? String(defaultFrom) : '');
  const [to, setTo] = useState(defaultTo !== undefined ? String(defaultTo) : '');
  const [notify, setNotify] = useState(false);
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState('');

  const start = async () => {
    setError('');
    const settings: Record<string, number> = {};
    for (const [key, text] of [['from', from], ['to', to]] as const) {
      if (text.trim() === '') continue;
      const v = Number(text);
      if (!Number.isFinite(v)) { setError(`The sweep ${key} value "${text}" is not a number.`); return; }
      settings[key] = v;
    }
    setBusy(true);
    const r = await request<{ run: { id: number } }>('POST', '/api/runs', { modelId, version, settings, notify });
    if (!r.ok) {
      setBusy(false);
      setError(r.issues.length ? r.issues.map((i) => describeIssue(i)).join('; ') : r.message);
      return;
    }
    window.location.assign(`/runs/${r.data.run.id}`);
  };

  return (
    <form className="ed-root ed-root-full" onSubmit={(e) => { e.preventDefault(); void start(); }} aria-label="Start a run" noValidate>
      <div className="ed-section">
        <h2>Start a run</h2>
        <div className="ed-three">
          <div className="ed-field">
            <label className="ed-label" htmlFor="run-version">Version</label>
            <select id="run-version" className="ed-input" value={version} onChange={(e) => setVersion(Number(e.target.value))}>
              {versions.map((v) => <option key={v} value={v}>v{v}{v === versions[0] ? ' (latest)' : ''}</option>)}
            </select>
          </div>
          <div className="ed-field">
            <label className="ed-label" htmlFor="run-from">Sweep {parameter ?? ''} from</label>
            <input id="run-from" className="ed-input ed-mono" inputMode="decimal" value={from} onChange={(e) => setFrom(e.target.value)} />
          </div>
          <div className="ed-field">
            <label className="ed-label" htmlFor="run-to">to</label>
            <input id="run-to" className="ed-input ed-mono" inputMode="decimal" value={to} onChange={(e) => setTo(e.target.value)} />
          </div>
        </div>
        <div className="ed-row">
          <input id="run-notify" type="checkbox" className="ed-check" checked={notify} onChange={(e) => setNotify(e.target.checked)} />
          <label htmlFor="run-notify">E-mail me when it finishes or fails</label>
        </div>
        <div className="ed-row">
          <button type="submit" className="ed-btn ed-btn-primary" disabled={busy} data-testid="start-run">{busy ? 'Starting…' : 'Start run'}</button>
        </div>
        {error ? <div className="ed-error-box" role="alert">Not started: {error}</div> : null}
      </div>
    </form>
  );
}
