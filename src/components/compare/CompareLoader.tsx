/**
 * The compare page's island: fetches the compared runs' diagrams (GET /api/compare?runs=…) after the
 * page has loaded, instead of carrying them inline in the HTML. While they load it keeps the
 * comparison's place and says so; a failed fetch says what failed (the server's message) and offers
 * to try again; then it renders CompareView.
 */
import { useCallback, useEffect, useState } from 'react';
import type { Diagram } from '../../lib/atlas/types';
import type { Provenance } from '../../lib/plot/provenance';
import type { RegimeBand } from '../../lib/regimes/types';
import { CompareView, type CompareItem } from './CompareView';

export interface CompareLoaderProps {
  /** Two to four run ids, in the order of the page's address. */
  readonly runIds: readonly number[];
  /** The workspace the page shows (sent as X-Workspace, so the data comes from the same workspace). */
  readonly workspaceId: string;
  /** Points per diagram (the API's default when left out). */
  readonly points?: number;
}

interface ApiItem { runId: number; label: string; shortLabel: string; diagram: Diagram; regimes: RegimeBand[]; provenance: Provenance }

/** The API's JSON error message, or the status line when the body is not one. */
async function failure(res: Response): Promise<string> {
  try {
    const body = (await res.json()) as { error?: { message?: string } };
    if (body.error?.message) return `The diagrams could not be loaded: ${body.error.message}`;
  } catch { /* not JSON */ }
  return `The diagrams could not be loaded: the server answered ${res.status}${res.statusText ? ` ${res.statusText}` : ''}`;
}

export async function loadCompareItems(props: CompareLoaderProps, fetcher: typeof fetch = fetch): Promise<CompareItem[]> {
  const q = new URLSearchParams({ runs: props.runIds.join(',') });
  if (props.points) q.set('points', String(props.points));
  let res: Response;
  try {
    res = await fetcher(`/api/compare?${q}`, { headers: { Accept: 'application/json', 'X-Workspace': props.workspaceId } });
  } catch (e) {
    throw new Error(`The diagrams could not be loaded: no answer from the server (${e instanceof Error ? e.message : String(e)}).`);
  }
  if (!res.ok) throw new Error(await failure(res));
  const body = (await res.json()) as { items: ApiItem[] };
  return body.items.map((it) => ({ label: it.label, shortLabel: it.shortLabel, diagram: it.diagram, regimes: it.regimes, provenance: it.provenance }));
}

type State = { kind: 'loading' } | { kind: 'failed'; message: string } | { kind: 'ready'; items: CompareItem[] };

export default function CompareLoader(props: CompareLoaderProps) {
  const { runIds, workspaceId, points } = props;
  const [state, setState] = useState<State>({ kind: 'loading' });
  const key = runIds.join(',');
  const load = useCallback(() => {
    setState({ kind: 'loading' });
    let live = true;
    loadCompareItems({ runIds, workspaceId, points }).then(
      (items) => { if (live) setState({ kind: 'ready', items }); },
      (e: unknown) => { if (live) setState({ kind: 'failed', message: e instanceof Error ? e.message : String(e) }); },
    );
    return () => { live = false; };
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [key, workspaceId, points]);
  useEffect(load, [load]);

  if (state.kind === 'ready') return <CompareView items={state.items} />;
  const names = runIds.map((id) => `run ${id}`);
  return (
    <div className="bm-card cmp-status text-sm text-ink-soft" style={{ minHeight: 480 }} data-testid="compare-status" data-state={state.kind} aria-live="polite" aria-busy={state.kind === 'loading'}>
      {state.kind === 'loading' ? <p>Loading the diagrams of {names.slice(0, -1).join(', ')} and {names[names.length - 1]}…</p> : (
        <div>
          <p className="bm-error mb-2" role="alert">{state.message}</p>
          <button type="button" className="bm-button" onClick={load}>Try again</button>
        </div>
      )}
    </div>
  );
}
