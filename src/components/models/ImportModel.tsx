import { useState, type ChangeEvent } from 'react';
import '../editor/editor.css';
import { describeIssue, issuesFromErrorBody, plainMessage } from '../../lib/editor';

/**
 * Import a model document (JSON file) as a new model through the service's import endpoint. A refused
 * file lists every problem in the editor's words ("Link 1 to: unknown node 'cedar'"); a name the
 * workspace already has is imported as "name (2)", which the model page then says.
 */
export default function ImportModel() {
  const [error, setError] = useState<{ lines: string[] } | null>(null);
  const [busy, setBusy] = useState(false);
  const onFile = async (e: ChangeEvent<HTMLInputElement>) => {
    const file = e.target.files?.[0];
    e.target.value = '';
    if (!file) return;
    setBusy(true);
    setError(null);
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
        const issues = issuesFromErrorBody(body).map((i) => describeIssue(i));
        const message = typeof body?.error?.message === 'string' ? plainMessage(body.error.message) : `the server answered ${res.status}`;
        setError({ lines: issues.length > 0 ? issues : [message] });
        return;
      }
      const renamed = typeof body.renamedFrom === 'string' ? `?renamedFrom=${encodeURIComponent(body.renamedFrom)}` : '';
      window.location.assign(`/models/${body.model.id}${renamed}`);
    } catch {
      setError({ lines: ['the server could not be reached'] });
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
        {error ? (
          <div id="import-error" className="ed-error-box" role="alert" data-testid="import-error">
            {error.lines.length === 1 ? <p>The file was not imported: {error.lines[0]}</p> : (
              <>
                <p>The file was not imported ({error.lines.length} problems):</p>
                <ul>{error.lines.map((l, k) => <li key={k}>{l}</li>)}</ul>
              </>
            )}
          </div>
        ) : null}
      </div>
    </div>
  );
}
