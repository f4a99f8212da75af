/**
 * The run page's diagram, fetched after the page has loaded (GET /api/runs/:id/result?points=… and
 * …/tags) instead of inlined in the HTML: a 6-node result thinned for drawing is still megabytes of
 * JSON, and the page's text, comments and forms should not wait for it. While it loads the island
 * keeps the diagram's place (same height, "Loading the diagram…"); a failed fetch says what failed
 * and offers to try again. Then it renders DiagramView with the same props as before.
 */
import { useCallback, useEffect, useState } from 'react';
import type { Diagram } from '../../lib/atlas/types';
import type { BandTag, EscapeGraph, RegimeBand } from '../../lib/regimes/types';
import { DiagramView } from '../diagram/DiagramView';
import type { DiagramViewProps } from '../diagram/types';

type Loaded = { diagram: Diagram; regimes: RegimeBand[]; escapeGraphs: EscapeGraph[]; tags: BandTag[] };

export interface RunDiagramProps extends Omit<DiagramViewProps, 'diagram' | 'regimes' | 'escapeGraphs' | 'tags'> {
  readonly runId: number;
  /** Points drawn at most (the result is thinned on the server to about this many). */
  readonly drawBudget: number;
}

/** Reads the JSON error body of the API ({ error: { message } }) or falls back to the status line. */
async function failure(res: Response, what: string): Promise<string> {
  try {
    const body = (await res.json()) as { error?: { message?: string } };
    if (body.error?.message) return `${what}: ${body.error.message}`;
  } catch { /* not JSON */ }
  return `${what}: the server answered ${res.status}${res.statusText ? ` ${res.statusText}` : ''}`;
}

export async function loadRunDiagram(runId: number, drawBudget: number, fetcher: typeof fetch = fetch): Promise<Loaded> {
  const [result, tags] = await Promise.all([
    fetcher(`/api/runs/${runId}/result?points=${drawBudget}`, { headers: { Accept: 'application/json' } }),
    fetcher(`/api/runs/${runId}/tags`, { headers: { Accept: 'application/json' } }),
  ]);
  if (!result.ok) throw new Error(await failure(result, 'The diagram could not be loaded'));
  if (!tags.ok) throw new Error(await failure(tags, 'The band tags could not be loaded'));
  const r = (await result.json()) as { result: { diagram: Diagram; regimes?: { regimes?: RegimeBand[]; escapeGraphs?: EscapeGraph[] } | null } };
  const t = (await tags.json()) as { tags: (BandTag & { id?: unknown })[] };
  return {
    diagram: r.result.diagram,
    regimes: r.result.regimes?.regimes ?? [],
    escapeGraphs: r.result.regimes?.escapeGraphs ?? [],
    tags: t.tags.map((x) => ({ from: x.from, to: x.to, name: x.name, colour: x.colour, note: x.note })),
  };
}

export default function RunDiagram(props: RunDiagramProps) {
  const { runId, drawBudget, ...view } = props;
  const [state, setState] = useState<{ kind: 'loading' } | { kind: 'failed'; message: string } | { kind: 'ready'; data: Loaded }>({ kind: 'loading' });
  const load = useCallback(() => {
    setState({ kind: 'loading' });
    loadRunDiagram(runId, drawBudget).then(
      (data) => setState({ kind: 'ready', data }),
      (e: unknown) => setState({ kind: 'failed', message: e instanceof Error ? e.message : String(e) }),
    );
  }, [runId, drawBudget]);
  useEffect(load, [load]);

  if (state.kind === 'ready') return <DiagramView {...view} {...state.data} />;
  const height = (view.height ?? 420) + 60;
  return (
    <div className="bm-card grid place-items-center text-sm text-ink-soft" style={{ minHeight: height }} data-testid="run-diagram-status" aria-live="polite">
      {state.kind === 'loading' ? <p>Loading the diagram…</p> : (
        <div className="text-center">
          <p className="bm-error mb-2" role="alert">{state.message}</p>
          <button type="button" className="bm-button" onClick={load}>Try again</button>
        </div>
      )}
    </div>
  );
}
