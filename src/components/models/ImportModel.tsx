import { useState, type ChangeEvent } from 'react';
import '../editor/editor.css';
import { plainMessage } from '../../lib/editor/field-labels';

/**
 * Import a model document (JSON file) as a new model through the service's import endpoint; the
 * server's message (naming the field) is shown under the control when the file is refused.
 */
export default function ImportModel() {
  const [error, setError] = useState('');
  const [busy, setBusy] = useState(false);
  const onFile = async (e: ChangeEvent<HTMLInputElement>) => {
    const file = e.target.files?.[0];
    e.target.value = '';
    if (!file) return;
    setBusy(true);
    setError('');
    try {
      // The file's bytes as the body (the service keeps them exactly); the change note names the file.
      const text = await file.text();
      const note = encodeURIComponent(`imported from ${file.name}`.slice(0, 1000));
      const res = await fetch(`/api/models/import?changeNote=${note}`, {
        method: 'POST',
        body: text,
        headers: { 'Content-Type': 'application/json' },
        credentials: 'same-origin',
      });
      const body = await res.json().catch(() => null);
      if (!res.ok) {
        const issues = (body?.error?.details?.issues ?? body?.error?.issues ?? []) as { path?: string; field?: string; message: string }[];
        const first = body?.error?.message ? plainMessage(body.error.message) : `the server answered ${res.status}`;
        setError(issues.length > 1 ? `${first}` : first);
        return;
      }
      window.location.assign(`/models/${body.model.id}`);
    } catch {
      setError('the server could not be reached');
    } finally {
      setBusy(false);
    }
  };
  return (
    <div className="ed-root" style={{ display: 'block' }}>
      <div className="ed-field" style={{ marginBottom: 0 }}>
        <label htmlFor="import-file" className="ed-label">Import from a file (model document, JSON)</label>
        <input id="import-file" type="file" accept=".json,application/json" className="ed-file" onChange={onFile} disabled={busy} aria-describedby={error ? 'import-error' : undefined} />
        {busy ? <p className="ed-hint" role="status">Importing…</p> : null}
        {error ? <div id="import-error" className="ed-error-box" role="alert">The file was not imported: {error}</div> : null}
      </div>
    </div>
  );
}
