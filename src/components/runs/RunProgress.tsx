import { useEffect, useRef, useState } from 'react';
import { request } from '../editor/api-client';
import '../editor/editor.css';

interface Progress { status: string; progress: number; phrase: string; error?: { message?: string } | null }

const TERMINAL = new Set(['done', 'failed', 'cancelled']);
const STATUS_WORDS: Record<string, string> = {
  queued: 'Waiting for a worker',
  running: 'Computing',
  done: 'Finished',
  failed: 'Failed',
  cancelled: 'Cancelled',
};

/**
 * Progress of one run from the service's event stream (polling every second when the stream is not
 * available), with the worker's phrase and a cancel button. When the run ends the page reloads so the
 * server renders the stored diagram.
 */
export default function RunProgress({ runId, initial, canCancel }: { runId: number; initial: Progress; canCancel: boolean }) {
  const [p, setP] = useState<Progress>(initial);
  const [error, setError] = useState('');
  const [cancelling, setCancelling] = useState(false);
  const reloaded = useRef(false);

  useEffect(() => {
    if (TERMINAL.has(initial.status)) return;
    let stopped = false;
    let poll: number | undefined;
    let source: EventSource | null = null;
    const apply = (data: Partial<Progress>) => {
      setP((old) => ({ ...old, ...data }));
      if (data.status && TERMINAL.has(data.status) && !reloaded.current) {
        reloaded.current = true;
        source?.close();
        window.setTimeout(() => window.location.reload(), 400);
      }
    };
    const startPolling = () => {
      if (poll !== undefined || stopped) return;
      poll = window.setInterval(async () => {
        const r = await request<{ run?: Progress } & Partial<Progress>>('GET', `/api/runs/${runId}`);
        if (r.ok) apply(r.data.run ?? r.data);
      }, 1000);
    };
    if (typeof EventSource !== 'undefined') {
      source = new EventSource(`/api/runs/${runId}/events`);
      const onData = (e: MessageEvent) => {
        try { apply(JSON.parse(e.data)); } catch { /* a comment or keep-alive line */ }
      };
      source.onmessage = onData;
      source.addEventListener('progress', onData as EventListener);
      source.addEventListener('status', onData as EventListener);
      source.addEventListener('end', ((e: MessageEvent) => {
        let data: Partial<Progress> = {};
        try { data = JSON.parse(e.data); } catch { /* no body */ }
        source?.close();
        apply({ ...data, status: data.status && TERMINAL.has(data.status) ? data.status : 'done' });
      }) as EventListener);
      source.onerror = () => {
        source?.close();
        startPolling();
      };
    } else startPolling();
    return () => {
      stopped = true;
      source?.close();
      if (poll !== undefined) window.clearInterval(poll);
    };
  }, [runId, initial.status]);

  const cancel = async () => {
    setCancelling(true);
    const r = await request<{ run: Progress }>('POST', `/api/runs/${runId}/cancel`, {});
    setCancelling(false);
    if (!r.ok) setError(r.message);
    else setP((old) => ({ ...old, ...r.data.run }));
  };

  const pct = Math.round(Math.max(0, Math.min(1, p.progress || 0)) * 100);
  const active = !TERMINAL.has(p.status);
  return (
    <div className="ed-root" style={{ maxWidth: "none", marginBottom: "1.25rem" }}><section className="ed-section run-progress" aria-labelledby="run-progress-h" data-status={p.status}>
      <h2 id="run-progress-h">{STATUS_WORDS[p.status] ?? p.status}</h2>
      <div
        className="run-bar"
        role="progressbar"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={pct}
        aria-valuetext={`${pct} percent: ${p.phrase}`}
        aria-labelledby="run-progress-h"
        data-testid="run-progress"
      >
        <div className="run-bar-fill" style={{ width: `${pct}%` }} />
      </div>
      <p aria-live="polite" className="run-phrase" data-testid="run-phrase">
        {pct}% — {p.phrase || (active ? 'working' : '')}
      </p>
      {p.status === 'failed' && p.error?.message ? <div className="ed-error-box" role="alert">{p.error.message}</div> : null}
      {error ? <div className="ed-error-box" role="alert">{error}</div> : null}
      {active && canCancel ? (
        <button type="button" className="ed-btn" onClick={cancel} disabled={cancelling}>{cancelling ? 'Cancelling…' : 'Cancel run'}</button>
      ) : null}
    </section></div>
  );
}
