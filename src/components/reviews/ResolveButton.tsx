import { useState } from 'react';
import { request } from '../editor/api-client';
import '../editor/editor.css';

/** Marks a review comment resolved or open again (modelers act on reviews of their models). */
export default function ResolveButton({ commentId, resolved }: { commentId: number; resolved: boolean }) {
  const [state, setState] = useState(resolved);
  const [error, setError] = useState('');
  const [busy, setBusy] = useState(false);
  const toggle = async () => {
    setBusy(true);
    const r = await request('PATCH', `/api/comments/${commentId}`, { resolved: !state });
    setBusy(false);
    if (!r.ok) setError(r.message);
    else { setError(''); setState(!state); }
  };
  return (
    <span className="ed-root" style={{ display: 'inline' }}>
      <button type="button" className="ed-btn ed-btn-quiet" onClick={toggle} disabled={busy} aria-pressed={state}>
        {state ? 'Reopen' : 'Mark resolved'}
      </button>
      {error ? <span role="alert" className="ed-field-errors"> {error}</span> : null}
    </span>
  );
}
