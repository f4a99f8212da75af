import { describe, expect, it } from 'vitest';
import { loadRunDiagram } from '../../../src/components/runs/RunDiagram';

const diagram = { parameter: 'beta', variables: ['P1'], branches: [], bifurcations: [] };
const ok = (body: unknown) => new Response(JSON.stringify(body), { status: 200, headers: { 'Content-Type': 'application/json' } });

describe('loadRunDiagram(runId, drawBudget, fetcher)', () => {
  it('asks for the thinned result and the tags of that run and hands DiagramView its props', async () => {
    const asked: string[] = [];
    const fetcher = (async (url: string) => {
      asked.push(url);
      if (url.includes('/tags')) return ok({ tags: [{ id: 'x', from: 0, to: 0.1, name: 'Tag', colour: '#112233', note: 'n', createdBy: 'u' }] });
      return ok({ run: {}, result: { diagram, regimes: { regimes: [{ regime: 'weak', from: 0, to: 1 }], escapeGraphs: [{ p: 0.5, states: [], saddles: [] }] } } });
    }) as typeof fetch;
    const loaded = await loadRunDiagram(7, 20000, fetcher);
    expect(asked.sort()).toEqual(['/api/runs/7/result?points=20000', '/api/runs/7/tags']);
    expect(loaded.diagram).toEqual(diagram);
    expect(loaded.regimes.map((b) => b.regime)).toEqual(['weak']);
    expect(loaded.escapeGraphs).toHaveLength(1);
    expect(loaded.tags).toEqual([{ from: 0, to: 0.1, name: 'Tag', colour: '#112233', note: 'n' }]);
  });

  it('a result without regimes gives empty bands, not a crash', async () => {
    const fetcher = (async (url: string) => (url.includes('/tags') ? ok({ tags: [] }) : ok({ result: { diagram, regimes: null } }))) as typeof fetch;
    const loaded = await loadRunDiagram(1, 100, fetcher);
    expect(loaded.regimes).toEqual([]);
    expect(loaded.escapeGraphs).toEqual([]);
  });

  it('a refused fetch says what failed with the server message, or the status line without one', async () => {
    const refused = (async (url: string) => (url.includes('/tags') ? ok({ tags: [] })
      : new Response(JSON.stringify({ error: { message: 'run 9 has no result (it is running)' } }), { status: 409 }))) as typeof fetch;
    await expect(loadRunDiagram(9, 100, refused)).rejects.toThrow('The diagram could not be loaded: run 9 has no result (it is running)');
    const bare = (async (url: string) => (url.includes('/tags') ? new Response('oops', { status: 502, statusText: 'Bad Gateway' }) : ok({ result: { diagram } }))) as typeof fetch;
    await expect(loadRunDiagram(9, 100, bare)).rejects.toThrow('The band tags could not be loaded: the server answered 502 Bad Gateway');
  });
});
