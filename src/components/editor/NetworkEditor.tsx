import { useState, type ChangeEvent } from 'react';
import {
  linksToMatrix, setMatrixCell, matrixToLinks, parseAdjacencyCsv, describeCsvIssue, parseNumber, formatNumber,
  renameNode, removeNode, nextNodeId, type EditorState, type FieldIssue, type LinkRow,
} from '../../lib/editor';
import { CellInput, FieldErrors, fieldDomId, issuesAt } from './fields';
import { NetworkDrawing } from './NetworkDrawing';

interface Props {
  state: EditorState;
  setState: (f: (s: EditorState) => EditorState, ownStep?: boolean) => void;
  issues: readonly FieldIssue[];
  announce: (message: string) => void;
}

/** Node list, link table and adjacency matrix over the same link rows, plus CSV upload and a drawing. */
export function NetworkEditor({ state, setState, issues, announce }: Props) {
  const ids = state.nodes.map((n) => n.id);
  const [csvProblems, setCsvProblems] = useState<string[]>([]);
  const [csvNote, setCsvNote] = useState('');

  const updateLink = (k: number, patch: Partial<LinkRow>) =>
    setState((s) => ({ ...s, links: s.links.map((l, i) => (i === k ? { ...l, ...patch } : l)) }));

  const onCsv = async (e: ChangeEvent<HTMLInputElement>) => {
    const file = e.target.files?.[0];
    e.target.value = '';
    if (!file) return;
    const text = await file.text();
    const r = parseAdjacencyCsv(text);
    if (!r.ok) {
      const lines = r.issues.map(describeCsvIssue);
      setCsvProblems(lines);
      setCsvNote('');
      announce(`The file ${file.name} was not used: ${lines.length} problem${lines.length === 1 ? '' : 's'}. ${lines[0]}`);
      return;
    }
    const added = r.nodeIds.filter((id) => !ids.includes(id));
    setState((s) => ({
      ...s,
      nodes: [...s.nodes, ...added.map((id) => ({ id, overrides: {} }))],
      links: matrixToLinks(r.nodeIds, r.matrix),
    }), true);
    setCsvProblems([]);
    const note = `Links replaced from ${file.name}: ${r.nodeIds.length} nodes${added.length ? `, new nodes ${added.join(', ')}` : ''}.`;
    setCsvNote(note);
    announce(note);
  };

  return (
    <section className="ed-section" aria-labelledby="ed-network-h">
      <h2 id="ed-network-h">Network</h2>
      <FieldErrors id={fieldDomId('nodes')} issues={issuesAt(issues, 'nodes')} />
      <div className="ed-network-grid">
        <div>
          <h3>Nodes</h3>
          <ol className="ed-node-list">
            {state.nodes.map((n, i) => {
              const path = `nodes[${i}].id`;
              const mine = issuesAt(issues, path).concat(issuesAt(issues, `nodes[${i}]`));
              return (
                <li key={i}>
                  {/* Visible, so "Node 2 id" in a message is a label the modeler can see. */}
                  <label className="ed-node-label" htmlFor={fieldDomId(path)}>
                    Node {i + 1}<span className="ed-sr"> id</span>
                  </label>
                  <input
                    id={fieldDomId(path)}
                    className={`ed-input ed-mono${mine.length ? ' ed-invalid' : ''}`}
                    value={n.id}
                    aria-invalid={mine.length ? true : undefined}
                    aria-describedby={mine.length ? `${fieldDomId(path)}-errors` : undefined}
                    onChange={(e) => setState((s) => renameNode(s, i, e.target.value))}
                    autoComplete="off"
                    spellCheck={false}
                  />
                  <button type="button" className="ed-btn ed-btn-quiet" onClick={() => setState((s) => removeNode(s, i))} aria-label={`Remove node ${n.id || i + 1} and its links`}>
                    Remove
                  </button>
                  <FieldErrors id={`${fieldDomId(path)}-errors`} issues={mine} />
                </li>
              );
            })}
          </ol>
          <button type="button" className="ed-btn" onClick={() => setState((s) => ({ ...s, nodes: [...s.nodes, { id: nextNodeId(s), overrides: {} }] }))}>
            Add node
          </button>
        </div>
        <div className="ed-drawing">
          <NetworkDrawing nodeIds={ids} links={state.links} />
          {state.links.length > 0 ? (
            <p className="ed-hint" data-testid="network-legend">Line width: size of the weight. <span className="ed-legend-negative">Dashed</span>: negative weight.</p>
          ) : null}
        </div>
      </div>

      <h3>Links</h3>
      <p className="ed-hint">A link from A to B lets A's state act on B through the coupling term. Two-way adds the reverse link with the same weight.</p>
      <FieldErrors id={fieldDomId('links')} issues={issuesAt(issues, 'links')} />
      <table className="ed-table" aria-label="Links">
        <thead>
          <tr>
            <th scope="col"><span className="ed-sr">Link</span></th>
            <th scope="col">From</th>
            <th scope="col">To</th>
            <th scope="col">Weight</th>
            <th scope="col">Two-way</th>
            <th scope="col"><span className="ed-sr">Actions</span></th>
          </tr>
        </thead>
        <tbody>
          {state.links.length === 0 ? (
            <tr>
              <td colSpan={6} className="ed-hint">No links yet: add one here, in the matrix below, or upload a CSV.</td>
            </tr>
          ) : null}
          {state.links.map((l, k) => {
            const rowIssues = issuesAt(issues, `links[${k}]`).concat(issuesAt(issues, `links[${k}].from`), issuesAt(issues, `links[${k}].to`));
            return (
              <tr key={k} className={rowIssues.length ? 'ed-row-invalid' : undefined}>
                <th scope="row" className="ed-link-label">Link {k + 1}</th>
                <td>
                  <select aria-label={`Link ${k + 1} from`} className="ed-input" value={l.from} onChange={(e) => updateLink(k, { from: e.target.value })} id={fieldDomId(`links[${k}].from`)}>
                    {!ids.includes(l.from) ? <option value={l.from}>{l.from || '(none)'}</option> : null}
                    {ids.map((id) => <option key={id} value={id}>{id}</option>)}
                  </select>
                  <FieldErrors id={`${fieldDomId(`links[${k}]`)}-errors`} issues={rowIssues} />
                </td>
                <td>
                  <select aria-label={`Link ${k + 1} to`} className="ed-input" value={l.to} onChange={(e) => updateLink(k, { to: e.target.value })} id={fieldDomId(`links[${k}].to`)}>
                    {!ids.includes(l.to) ? <option value={l.to}>{l.to || '(none)'}</option> : null}
                    {ids.map((id) => <option key={id} value={id}>{id}</option>)}
                  </select>
                </td>
                <td>
                  <CellInput label={`Link ${k + 1} weight`} path={`links[${k}].weight`} value={l.weight} onChange={(v) => updateLink(k, { weight: v })} issues={issues} />
                </td>
                <td>
                  <input type="checkbox" className="ed-check" aria-label={`Link ${k + 1} two-way`} checked={l.twoWay} onChange={(e) => updateLink(k, { twoWay: e.target.checked })} />
                </td>
                <td>
                  <button type="button" className="ed-btn ed-btn-quiet" onClick={() => setState((s) => ({ ...s, links: s.links.filter((_, i) => i !== k) }))} aria-label={`Remove link ${k + 1} (${l.from} to ${l.to})`}>
                    Remove
                  </button>
                </td>
              </tr>
            );
          })}
        </tbody>
      </table>
      <button
        type="button"
        className="ed-btn"
        disabled={ids.length === 0}
        onClick={() => setState((s) => ({ ...s, links: [...s.links, { from: ids[0], to: ids[Math.min(1, ids.length - 1)], weight: '1', twoWay: false }] }))}
      >
        Add link
      </button>

      <h3>Adjacency matrix</h3>
      <p className="ed-hint">Row: the node a link comes from. Column: the node it acts on. A blank or 0 cell means no link. Edits here change the link table above.</p>
      {ids.length > 0 ? <AdjacencyGrid ids={ids} links={state.links} onSet={(from, to, w) => setState((s) => ({ ...s, links: setMatrixCell(s.links, from, to, w) }))} /> : null}

      <div className="ed-field">
        <label htmlFor="ed-csv" className="ed-label">
          Upload an adjacency matrix (CSV)
        </label>
        <input id="ed-csv" type="file" accept=".csv,text/csv,text/plain" className="ed-file" onChange={onCsv} aria-describedby="ed-csv-hint ed-csv-problems" />
        <p id="ed-csv-hint" className="ed-hint">
          First row: a corner cell, then the node ids. Every further row: a node id, then one weight per column. The upload replaces all links; unknown ids become new nodes.
        </p>
        <div id="ed-csv-problems">
          {csvProblems.length > 0 ? (
            <div className="ed-error-box" role="alert">
              <p>The file was not used. Fix these cells and upload it again:</p>
              <ul>
                {csvProblems.map((p, k) => <li key={k}>{p}</li>)}
              </ul>
            </div>
          ) : null}
          {csvNote ? <p className="ed-ok">{csvNote}</p> : null}
        </div>
      </div>
    </section>
  );
}

function AdjacencyGrid({ ids, links, onSet }: { ids: string[]; links: LinkRow[]; onSet: (from: string, to: string, w: number) => void }) {
  const matrix = linksToMatrix(ids, links);
  const [draft, setDraft] = useState<{ key: string; text: string } | null>(null);
  return (
    <div className="ed-matrix-wrap">
      <table className="ed-matrix" aria-label="Adjacency matrix: rows are sources, columns are targets">
        <thead>
          <tr>
            <th scope="col"><span className="ed-sr">From \ to</span><span aria-hidden="true">from \ to</span></th>
            {ids.map((id, j) => <th key={j} scope="col" className="ed-mono">{id}</th>)}
          </tr>
        </thead>
        <tbody>
          {ids.map((from, i) => (
            <tr key={i}>
              <th scope="row" className="ed-mono">{from}</th>
              {ids.map((to, j) => {
                const key = `${i}:${j}`;
                const v = matrix[i][j];
                const shown = draft?.key === key ? draft.text : Number.isNaN(v) ? '?' : v === 0 ? '' : formatNumber(v);
                const bad = draft?.key === key && draft.text.trim() !== '' && parseNumber(draft.text) === null;
                return (
                  <td key={j} className={v !== 0 ? 'ed-matrix-on' : undefined}>
                    <input
                      className={`ed-input ed-cell ed-mono${bad ? ' ed-invalid' : ''}`}
                      aria-label={`Weight from ${from} to ${to}`}
                      aria-invalid={bad ? true : undefined}
                      inputMode="decimal"
                      value={shown}
                      placeholder="0"
                      data-cell={key}
                      onChange={(e) => {
                        const text = e.target.value;
                        setDraft({ key, text });
                        const w = text.trim() === '' ? 0 : parseNumber(text);
                        if (w !== null) onSet(from, to, w);
                      }}
                      onBlur={() => setDraft(null)}
                      autoComplete="off"
                    />
                  </td>
                );
              })}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
