import { useState } from 'react';
import { request } from '../editor/api-client';
import '../editor/editor.css';

export interface CommentTargetOption { value: string; label: string }

/**
 * A reviewer's comment on a run, one of its bands or one of its special points. The target list
 * comes from the page (it knows the stored result). The page reloads to show the new comment.
 */
export default function CommentForm({ runId, targets }: { runId: number; targets: CommentTargetOption[] }) {
  const [target, setTarget] = useState(targets[0]?.value ?? 'run');
  const [body, setBody] = useState('');
  const [busy, setBusy] = useState(false);
  const [error, setError] = useState('');
  const [done, setDone] = useState('');

  const submit = async () => {
    setError('');
    if (body.trim() === '') { setError('Write the comment first.'); return; }
    const [kind, ref] = target.split(':', 2);
    setBusy(true);
    const r = await request('POST', `/api/runs/${runId}/comments`, { target: kind === 'run' ? { kind } : { kind, ref }, body: body.trim() });
    setBusy(false);
    if (!r.ok) { setError(r.message); return; }
    setBody('');
    setDone('Comment added.');
    window.location.reload();
  };

  return (
    <form className="ed-root" onSubmit={(e) => { e.preventDefault(); void submit(); }} aria-label="Add a review comment" noValidate>
      <div className="ed-field">
        <label className="ed-label" htmlFor="comment-target">About</label>
        <select id="comment-target" className="ed-input" value={target} onChange={(e) => setTarget(e.target.value)}>
          {targets.map((t) => <option key={t.value} value={t.value}>{t.label}</option>)}
        </select>
      </div>
      <div className="ed-field">
        <label className="ed-label" htmlFor="comment-body">Comment</label>
        <textarea id="comment-body" className="ed-input" rows={3} value={body} onChange={(e) => setBody(e.target.value)} aria-describedby={error ? 'comment-error' : undefined} aria-invalid={error ? true : undefined} />
      </div>
      <div className="ed-row">
        <button type="submit" className="ed-btn ed-btn-primary" disabled={busy} data-testid="add-comment">{busy ? 'Sending…' : 'Add comment'}</button>
      </div>
      {error ? <div id="comment-error" className="ed-error-box" role="alert">Not added: {error}</div> : null}
      {done ? <p className="ed-ok" role="status">{done}</p> : null}
    </form>
  );
}
