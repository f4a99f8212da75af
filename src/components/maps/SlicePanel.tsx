/**
 * The one-parameter diagram at a value of the map's second parameter, in place under the map
 * (docs/maps.md, "From the map back to one parameter"): while the slice computes, its progress
 * (polled every second from GET /api/runs/:id/progress, as the run page falls back to when its event
 * stream is not there); then the run's diagram through the run page's own island (RunDiagram →
 * DiagramView), labelled as a slice with the overridden value in its title and provenance, and a link
 * to the slice's run page.
 */
import { useEffect } from 'react';
import RunDiagram from '../runs/RunDiagram';
import type { Provenance } from '../../lib/plot/provenance';
import { overrideNote } from '../../lib/plot/run-override';
import { formatValue } from '../../lib/plot/ticks';

export interface SliceState {
  readonly value: number;
  /** The slice's trace run, once the server has answered. */
  readonly id?: number;
  /** A run status, or 'starting' (asked), 'missing' (none stored and the viewer may not start one), 'error'. */
  readonly status: string;
  readonly progress: number;
  readonly phrase: string;
  /** The server answered with a slice that was already there. */
  readonly cached: boolean;
  readonly error?: string;
  readonly engineVersion?: string;
  readonly finishedAt?: string | null;
}

const TERMINAL = new Set(['done', 'failed', 'cancelled']);
const WORDS: Record<string, string> = { starting: 'Starting', queued: 'Waiting for a worker', running: 'Computing', failed: 'Failed', cancelled: 'Cancelled' };

export interface SlicePanelProps {
  readonly slice: SliceState;
  readonly mapRunId: number;
  /** [swept parameter, second parameter]. */
  readonly names: readonly string[];
  readonly firstRange: readonly number[];
  /** The map's provenance: model name and version hash (the slice's run and engine replace the rest). */
  readonly provenance: Provenance;
  readonly onUpdate: (u: { id: number; status: string; progress: number; phrase: string; error?: string; finishedAt?: string | null }) => void;
  readonly onClose: () => void;
}

export default function SlicePanel({ slice, mapRunId, names, firstRange, provenance, onUpdate, onClose }: SlicePanelProps) {
  const { id, status } = slice;
  useEffect(() => {
    if (id === undefined || TERMINAL.has(status)) return;
    let stopped = false;
    const timer = window.setInterval(async () => {
      const res = await fetch(`/api/runs/${id}/progress`, { headers: { Accept: 'application/json' } }).catch(() => null);
      if (stopped || !res?.ok) return;
      const p = ((await res.json()) as { progress: { status: string; progress: number; phrase: string; error?: { message?: string } | null; finishedAt?: string | null } }).progress;
      onUpdate({ id, status: p.status, progress: p.progress, phrase: p.phrase, error: p.error?.message, finishedAt: p.finishedAt });
    }, 1000);
    return () => { stopped = true; window.clearInterval(timer); };
  }, [id, status, onUpdate]);

  const note = overrideNote({ settings: { override: { parameter: names[1], value: slice.value } }, sliceOf: mapRunId })!;
  const shown = formatValue(slice.value);
  return (
    <section className="mp-slice" data-testid="map-slice-panel" data-value={String(slice.value)} data-run={id ?? ''} data-status={status} data-cached={String(slice.cached)} aria-live="polite"
      aria-label={`One-parameter diagram at ${names[1]} = ${shown}`}>
      <div className="mp-slice-head">
        <h3 className="dg-title">One-parameter diagram at {names[1]} = {shown}</h3>
        <span className="mp-slice-actions">
          {id !== undefined ? <a href={`/runs/${id}`} data-testid="map-slice-link">Open run {id}</a> : null}
          <button type="button" onClick={onClose}>Close</button>
        </span>
      </div>
      <p className="dg-muted mp-what">
        Run {id ?? '…'}: the same model version traced over {names[0]} from {String(firstRange[0])} to {String(firstRange[1])} with {names[1]} set to {String(slice.value)} for
        this run only (no new model version). It is labelled &ldquo;{note}&rdquo; wherever it is shown.
        {slice.cached ? ' Already computed for this value: the stored run is shown, nothing was recomputed.' : ''}
      </p>
      {status === 'missing' ? (
        <p className="dg-muted" data-testid="map-slice-missing">No diagram has been computed at {names[1]} = {shown} yet; modelers and owners compute one by clicking here.</p>
      ) : status === 'error' ? (
        <p role="alert" className="dg-error">The diagram was not started: {slice.error}</p>
      ) : status === 'done' && id !== undefined ? (
        <RunDiagram key={id} runId={id} drawBudget={8000} height={320}
          title={`${provenance.modelName} · ${names[1]} = ${shown} (slice of map run ${mapRunId})`}
          provenance={{ modelName: provenance.modelName, versionHash: provenance.versionHash, runId: String(id), engineVersion: slice.engineVersion ?? provenance.engineVersion.split('+')[0], date: slice.finishedAt ?? new Date().toISOString(), override: note }} />
      ) : TERMINAL.has(status) ? (
        <p role="alert" className="dg-error" data-testid="map-slice-failed">{WORDS[status] ?? status}: {slice.error ?? slice.phrase} <a href={`/runs/${id}`}>See the run page</a>.</p>
      ) : (
        <div data-testid="map-slice-progress">
          <p className="mp-what">{WORDS[status] ?? status}{slice.phrase ? `: ${slice.phrase}` : ''}</p>
          <progress max={1} value={slice.progress} aria-label={`Progress of run ${id ?? ''}`} style={{ width: '100%', maxWidth: '28rem' }} />
        </div>
      )}
    </section>
  );
}
