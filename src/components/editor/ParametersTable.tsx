import { unknownSymbols, type EditorState, type FieldIssue } from '../../lib/editor';
import { CellInput, FieldErrors, fieldDomId, issuesAt } from './fields';

interface Props {
  state: EditorState;
  setState: (f: (s: EditorState) => EditorState) => void;
  issues: readonly FieldIssue[];
}

/**
 * Element parameters with one override column per node; a blank override cell means the node uses
 * the element value (shown as the placeholder).
 */
export function ParametersTable({ state, setState, issues }: Props) {
  const renameParameter = (k: number, name: string) =>
    setState((s) => {
      const old = s.parameters[k].name;
      return {
        ...s,
        parameters: s.parameters.map((p, i) => (i === k ? { ...p, name } : p)),
        nodes: s.nodes.map((n) => {
          if (!(old in n.overrides)) return n;
          const { [old]: v, ...rest } = n.overrides;
          return { ...n, overrides: { ...rest, [name]: v } };
        }),
      };
    });
  const removeParameter = (k: number) =>
    setState((s) => {
      const old = s.parameters[k].name;
      return {
        ...s,
        parameters: s.parameters.filter((_, i) => i !== k),
        nodes: s.nodes.map((n) => {
          const { [old]: _drop, ...rest } = n.overrides;
          return { ...n, overrides: rest };
        }),
      };
    });
  const setOverride = (nodeIndex: number, name: string, value: string) =>
    setState((s) => ({
      ...s,
      nodes: s.nodes.map((n, i) => (i === nodeIndex ? { ...n, overrides: { ...n.overrides, [name]: value } } : n)),
    }));

  return (
    <section className="ed-section" aria-labelledby="ed-params-h">
      <h2 id="ed-params-h">Parameters</h2>
      <p className="ed-hint">Values of the element's parameters. A value in a node's column overrides it for that node only; leave it blank to inherit.</p>
      <FieldErrors id={fieldDomId('element.parameters')} issues={issuesAt(issues, 'element.parameters')} />
      <div className="ed-matrix-wrap">
        <table className="ed-table" aria-label="Parameters and per-node overrides">
          <thead>
            <tr>
              <th scope="col">Name</th>
              <th scope="col">Element value</th>
              {state.nodes.map((n, i) => (
                <th key={i} scope="col" className="ed-mono">
                  {n.id || `node ${i + 1}`}
                </th>
              ))}
              <th scope="col"><span className="ed-sr">Actions</span></th>
            </tr>
          </thead>
          <tbody>
            {state.parameters.length === 0 ? (
              <tr>
                <td colSpan={3 + state.nodes.length} className="ed-hint">No parameters yet. Every symbol of the rate besides the variable needs one.</td>
              </tr>
            ) : null}
            {state.parameters.map((p, k) => {
              const namePath = `element.parameters[${k}]`;
              const nameIssues = issuesAt(issues, namePath);
              return (
                <tr key={k}>
                  <td>
                    <input
                      id={fieldDomId(namePath)}
                      className={`ed-input ed-cell ed-mono${nameIssues.length ? ' ed-invalid' : ''}`}
                      aria-label={`Parameter ${k + 1} name`}
                      value={p.name}
                      onChange={(e) => renameParameter(k, e.target.value)}
                      aria-invalid={nameIssues.length ? true : undefined}
                      aria-describedby={nameIssues.length ? `${fieldDomId(namePath)}-errors` : undefined}
                      autoComplete="off"
                      spellCheck={false}
                    />
                    <FieldErrors id={`${fieldDomId(namePath)}-errors`} issues={nameIssues} />
                  </td>
                  <td>
                    <CellInput
                      label={`Value of ${p.name || `parameter ${k + 1}`}`}
                      path={`element.parameters.${p.name}`}
                      value={p.value}
                      onChange={(v) => setState((s) => ({ ...s, parameters: s.parameters.map((q, i) => (i === k ? { ...q, value: v } : q)) }))}
                      issues={issues}
                    />
                  </td>
                  {state.nodes.map((n, i) => (
                    <td key={i}>
                      <CellInput
                        label={`${p.name} on node ${n.id}`}
                        path={`nodes[${i}].parameters.${p.name}`}
                        value={n.overrides[p.name] ?? ''}
                        placeholder={p.value}
                        onChange={(v) => setOverride(i, p.name, v)}
                        issues={issues}
                      />
                    </td>
                  ))}
                  <td>
                    <button type="button" className="ed-btn ed-btn-quiet" onClick={() => removeParameter(k)} aria-label={`Remove parameter ${p.name || k + 1}`}>
                      Remove
                    </button>
                  </td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
      <button
        type="button"
        className="ed-btn"
        onClick={() =>
          setState((s) => {
            const used = new Set(s.parameters.map((p) => p.name));
            // The rate's own unknown symbols first, so the new row is the parameter the rate needs.
            const wanted = unknownSymbols(s.rate, [s.variable.trim(), ...used])
              .filter((n) => n !== s.coupling.parameter.trim() && n !== 'source' && n !== 'target');
            let name = wanted[0] ?? 'a';
            for (let c = 97; !wanted.length && used.has(name); c++) name = c <= 122 ? String.fromCharCode(c) : `p${c - 122}`;
            return { ...s, parameters: [...s.parameters, { name, value: '0' }] };
          })
        }
      >
        Add parameter
      </button>
    </section>
  );
}
