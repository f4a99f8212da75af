import { useState } from 'react';
import { request } from '../editor/api-client';

/**
 * Marks a review comment resolved or open again (modelers act on reviews of their models). With
 * `showState` the comment's state ("open" / "resolved") sits beside the button and follows it.
 */
export default function ResolveButton({ commentId, resolved, showState = false }: { commentId: number; resolved: boolean; showState?: boolean }) {
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
    <span className="bm-resolve" data-resolved={String(state)}>
      {showState ? <span className="bm-resolve-state" data-testid="comment-state">{state ? 'resolved' : 'open'}</span> : null}
      <button type="button" className="bm-button-quiet bm-button-small" onClick={toggle} disabled={busy} aria-pressed={state} data-testid="resolve-comment">
        {state ? null : (
          <svg width="12" height="12" viewBox="0 0 12 12" aria-hidden="true">
            <path d="M2 6.3 L4.8 9 L10 3" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinecap="round" strokeLinejoin="round" />
          </svg>
        )}
        {state ? 'Reopen' : 'Mark resolved'}
      </button>
      {error ? <span role="alert" className="bm-resolve-error"> {error}</span> : null}
    </span>
  );
}
