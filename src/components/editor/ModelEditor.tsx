import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import {
  changeKind, documentToState, emptyEditorState, fieldLabel, modelNameKey, nextFreeName, recordChange, redo, startHistory, undo, plainMessage, engineWords, stateToDocument, unknownSymbols, type EditorState, type FieldIssue, type LabelContext, type NetworkDocument,
} from '../../lib/editor';
import type { Diagram, Diagnostic } from '../../lib/atlas/types';
import { api } from './api-client';
import { TextField, FieldErrors, fieldDomId, issuesAt } from './fields';
import { TexPreview, MarkedExpression } from './TexPreview';
import { ParametersTable } from './ParametersTable';
import { NetworkEditor } from './NetworkEditor';
import DiagramView from '../diagram/DiagramView';
import { VersionHistory } from './VersionHistory';
import './editor.css';

/** Largest network the live preview computes inside a request (issue 6). */
export const PREVIEW_MAX_NODES = 4;
/** Quiet time after the last keystroke before validating and previewing. */
const DEBOUNCE_MS = 300;
/** Preview status while the model is incomplete; see previewMessage for what is shown. */
const NOT_READY = 'not-ready';

export interface ModelEditorProps {
  /** Absent for a new model. */
  modelId?: string;
  initialDocument?: NetworkDocument | null;
  /** The model's description (kept on the model, not in the document). */
  initialDescription?: string;
  latestVersion?: number;
  /** The model's name, which the Name field edits (its versions' documents may carry an older one). */
  modelName?: string;
}

type PreviewState =
  | { kind: 'idle'; message: string }
  | { kind: 'busy' }
  | { kind: 'done'; diagram: Diagram; diagnostics: Diagnostic[]; elapsedMs?: number; truncated?: boolean }
  | { kind: 'error'; message: string };

/** The model editor island: every field of a network document, live checks, preview and saving. */
export default function ModelEditor({ modelId, initialDocument, initialDescription, latestVersion, modelName }: ModelEditorProps) {
  // Every edit goes through the undo history; the form shows its present state.
  const [history, setHistory] = useState(() => startHistory<EditorState>(initialDocument ? { ...documentToState(initialDocument, initialDescription ?? ''), ...(modelName ? { name: modelName } : {}) } : starterState()));
  const state = history.present;
  /** Replaces the form as one undoable step (loading a version). */
  const setStateRaw = useCallback((f: (s: EditorState) => EditorState) => setHistory((h) => recordChange(h, f(h.present), null, Date.now())), []);
  const [serverIssues, setServerIssues] = useState<FieldIssue[]>([]);
  const [checking, setChecking] = useState(false);
  const [preview, setPreview] = useState<PreviewState>({ kind: 'idle', message: 'The preview appears once the model is valid.' });
  const [changeNote, setChangeNote] = useState(initialDocument ? '' : 'First version');
  const [saving, setSaving] = useState(false);
  const [saveError, setSaveError] = useState<{ message: string; issues: FieldIssue[] } | null>(null);
  const [saved, setSaved] = useState('');
  const [dirty, setDirty] = useState(false);
  const [historyKey, setHistoryKey] = useState(0);
  const [announcement, setAnnouncement] = useState('');
  const [version, setVersion] = useState(latestVersion ?? 0);
  const savedDescription = useRef((initialDescription ?? '').trim());
  const savedName = useRef((modelName ?? initialDocument?.name ?? '').trim());
  /** Set just before navigating away after a successful save, so the unsaved-changes guard stays quiet. */
  const leaving = useRef(false);

  /** An edit; `ownStep` makes it an undo step of its own even when it looks like typing (a CSV load). */
  const setState = useCallback((f: (s: EditorState) => EditorState, ownStep?: boolean) => {
    setHistory((h) => {
      const next = f(h.present);
      return recordChange(h, next, ownStep ? null : changeKind(h.present, next), Date.now());
    });
    setDirty(true);
    setSaved('');
  }, []);
  const step = useCallback((direction: 'undo' | 'redo') => {
    setHistory((h) => (direction === 'undo' ? undo(h) : redo(h)));
    setDirty(true);
    setSaved('');
  }, []);
  // Ctrl+Z / Ctrl+Shift+Z (Ctrl+Y) anywhere on the page except in a field outside the editor (the
  // header's search), so they also work after a click on the page itself or on a drawing.
  const formRef = useRef<HTMLFormElement | null>(null);
  useEffect(() => {
    const onKey = (e: globalThis.KeyboardEvent) => {
      if (!(e.ctrlKey || e.metaKey) || e.altKey) return;
      const key = e.key.toLowerCase();
      if (key !== 'z' && key !== 'y') return;
      const target = e.target instanceof Element ? e.target : null;
      const inForm = target !== null && formRef.current?.contains(target);
      const editable = target !== null && target.closest('input, textarea, select, [contenteditable=""], [contenteditable="true"]') !== null;
      if (!inForm && editable) return;
      // Our history, not the text field's own: the form state is what gets saved.
      e.preventDefault();
      step(key === 'y' || e.shiftKey ? 'redo' : 'undo');
    };
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [step]);
  const announce = useCallback((m: string) => setAnnouncement(m), []);

  // A name the workspace has: say so before saving. A new model would be saved as "name (2)"; an
  // existing one cannot be renamed onto another model's name.
  const [nameTaken, setNameTaken] = useState<{ existing: string; savedAs: string } | null>(null);
  useEffect(() => {
    const name = state.name.trim();
    if (name === '' || (modelId && modelNameKey(name) === modelNameKey(savedName.current))) {
      setNameTaken(null);
      return;
    }
    const ctrl = new AbortController();
    const timer = window.setTimeout(async () => {
      try {
        const names = await api.similarNames(name, ctrl.signal);
        if (ctrl.signal.aborted || names === null) return;
        const existing = names.find((n) => modelNameKey(n) === modelNameKey(name));
        setNameTaken(existing === undefined ? null : { existing, savedAs: nextFreeName(name, names) });
      } catch {
        // Aborted by the next keystroke.
      }
    }, DEBOUNCE_MS);
    return () => {
      ctrl.abort();
      window.clearTimeout(timer);
    };
  }, [state.name, modelId]);

  const conversion = useMemo(() => stateToDocument(state), [state]);
  const localIssues = conversion.ok ? [] : conversion.issues;
  // Problems are shown for the parts the modeler has changed, and for everything after a save attempt,
  // so a fresh form does not open covered in complaints about fields nobody has typed in yet.
  const initialState = useRef(state);
  const [saveAttempted, setSaveAttempted] = useState(false);
  const touched = useMemo(() => touchedSections(initialState.current, state), [state]);
  const issues = useMemo(() => {
    const all = [...localIssues, ...serverIssues, ...(saveError?.issues ?? [])].filter(
      (i) => saveAttempted || initialDocument != null || touched.has(sectionOf(i.path)),
    );
    const seen = new Set<string>();
    return all.filter((i) => {
      const k = `${i.path}\u0000${i.message}`;
      if (seen.has(k)) return false;
      seen.add(k);
      return true;
    });
  }, [localIssues, serverIssues, saveError, saveAttempted, touched, initialDocument]);

  // Debounced server validation, then the live preview for small networks.
  const abortRef = useRef<AbortController | null>(null);
  useEffect(() => {
    if (!conversion.ok) {
      setServerIssues([]);
      setPreview({ kind: 'idle', message: NOT_READY });
      return;
    }
    const doc = conversion.document;
    const timer = window.setTimeout(async () => {
      abortRef.current?.abort();
      const ctrl = new AbortController();
      abortRef.current = ctrl;
      setChecking(true);
      try {
        const v = await api.validate(doc, ctrl.signal);
        if (ctrl.signal.aborted) return;
        if (!v.ok) {
          setServerIssues(v.issues);
          setPreview({ kind: 'error', message: `Could not check the model: ${v.message}` });
          return;
        }
        setServerIssues(v.data.issues ?? []);
        if (!v.data.valid) {
          setPreview({ kind: 'idle', message: NOT_READY });
          return;
        }
        if (doc.nodes.length > PREVIEW_MAX_NODES) {
          setPreview({ kind: 'idle', message: `The live preview covers networks of up to ${PREVIEW_MAX_NODES} nodes; save and start a run to see this one.` });
          return;
        }
        setPreview({ kind: 'busy' });
        const p = await api.preview(doc, ctrl.signal);
        if (ctrl.signal.aborted) return;
        if (!p.ok) setPreview({ kind: 'error', message: p.message });
        else if (!p.data.valid || !p.data.diagram) {
          setServerIssues(p.data.issues ?? []);
          setPreview({ kind: 'idle', message: NOT_READY });
        } else {
          setPreview({ kind: 'done', diagram: p.data.diagram, diagnostics: p.data.diagnostics ?? p.data.diagram.diagnostics, elapsedMs: p.data.elapsedMs, truncated: p.data.truncated });
        }
      } catch (e) {
        if ((e as Error).name !== 'AbortError') setPreview({ kind: 'error', message: 'The preview failed; your edits are unaffected.' });
      } finally {
        if (!ctrl.signal.aborted) setChecking(false);
      }
    }, DEBOUNCE_MS);
    return () => window.clearTimeout(timer);
  }, [conversion]);

  useEffect(() => {
    if (!dirty) return;
    const warn = (e: BeforeUnloadEvent) => {
      if (leaving.current) return;
      e.preventDefault();
    };
    window.addEventListener('beforeunload', warn);
    return () => window.removeEventListener('beforeunload', warn);
  }, [dirty]);

  const save = async () => {
    setSaved('');
    setSaveAttempted(true);
    if (!conversion.ok) {
      setSaveError({ message: 'Not saved: some fields cannot be read yet. They are marked above.', issues: [] });
      announce('Not saved: some fields cannot be read yet.');
      return;
    }
    if (changeNote.trim() === '') {
      setSaveError({ message: 'Not saved: write a short change note saying what this version changes.', issues: [{ path: 'changeNote', message: 'write a short change note' }] });
      return;
    }
    setSaving(true);
    setSaveError(null);
    const name = state.name.trim();
    const renamed = Boolean(modelId) && name !== savedName.current;
    if (modelId && (renamed || state.description.trim() !== savedDescription.current)) {
      const d = await api.updateMeta(modelId, { ...(renamed ? { name } : {}), description: state.description.trim() });
      if (!d.ok) {
        setSaving(false);
        const what = d.issues.some((i) => i.path === 'name') ? 'the new name' : 'the description';
        setSaveError({ message: `Not saved: ${what} could not be stored (${d.message}). Your edits are kept.`, issues: d.issues });
        announce(`Not saved: ${d.message}`);
        return;
      }
      savedDescription.current = state.description.trim();
      if (renamed) {
        savedName.current = name;
        // The heading and the tab title are server-rendered outside the island.
        const heading = document.querySelector('[data-testid="edit-heading-name"]');
        if (heading) heading.textContent = name;
        document.title = document.title.replace(/^Edit .*?( · |$)/, `Edit ${name}$1`);
      }
    }
    const r = modelId
      ? await api.saveVersion(modelId, conversion.document, changeNote.trim(), version || undefined)
      : await api.createModel(conversion.document, state.description.trim(), changeNote.trim());
    setSaving(false);
    if (!r.ok) {
      const message = r.issues.length > 0 ? `Not saved: ${r.issues.length} problem${r.issues.length === 1 ? '' : 's'} — see the marked fields. Your edits are kept.` : `Not saved: ${r.message} Your edits are kept.`;
      setSaveError({ message, issues: r.issues });
      announce(message);
      return;
    }
    setDirty(false);
    if (!modelId) {
      const created = r.data as { model: { id: number | string; name?: string }; renamedFrom?: string };
      const id = created.model.id;
      setSaved(created.renamedFrom ? `Saved as "${created.model.name}". Opening the model…` : 'Saved. Opening the model…');
      announce('Model saved.');
      leaving.current = true;
      const renamed = created.renamedFrom ? `?renamedFrom=${encodeURIComponent(created.renamedFrom)}` : '';
      window.location.assign(`/models/${encodeURIComponent(String(id))}${renamed}`);
      return;
    }
    const n = (r.data as { version?: { number: number } }).version?.number ?? version + 1;
    setVersion(n);
    // The page heading ("Edit … from version N") is server-rendered outside the island.
    const heading = document.querySelector('[data-testid="edit-heading-version"]');
    if (heading) heading.textContent = `at version ${n}, just saved`;
    setChangeNote('');
    setHistoryKey((k) => k + 1);
    const msg = `Saved as version ${n}.`;
    setSaved(msg);
    announce(msg);
  };

  const rateIssues = issuesAt(issues, 'element.rate');
  const rateUnknowns = unknownSymbols(state.rate, [state.variable.trim(), ...state.parameters.map((p) => p.name.trim())])
    .filter((name) => name !== state.coupling.parameter.trim() && name !== 'source' && name !== 'target');
  const addParameter = (name: string) => {
    setState((s) => (s.parameters.some((p) => p.name === name) ? s : { ...s, parameters: [...s.parameters, { name, value: '0' }] }));
    announce(`Parameter ${name} added with the value 0.`);
  };
  const termIssues = issuesAt(issues, 'coupling.term');
  // The coupling term may use the element's parameters too (besides source and target); the state
  // variable and the coupling parameter are not offered, as a parameter of that name would clash.
  const termUnknowns = unknownSymbols(state.coupling.term, ['source', 'target', ...state.parameters.map((p) => p.name.trim())])
    .filter((name) => name !== state.coupling.parameter.trim() && name !== state.variable.trim());
  const offers = (names: string[], testId: string) => names.length > 0 ? (
    <p className="ed-row ed-unknowns" data-testid={testId}>
      <span className="ed-hint">Not yet parameters:</span>
      {names.map((name) => (
        <button key={name} type="button" className="ed-btn ed-btn-quiet" onClick={() => addParameter(name)}>
          Add parameter <span className="ed-mono">{name}</span>
        </button>
      ))}
    </p>
  ) : null;
  const sweepChoices = [...new Set([state.coupling.parameter, ...state.parameters.map((p) => p.name)].filter(Boolean))];

  return (
    <form className="ed-root" onSubmit={(e) => { e.preventDefault(); void save(); }} ref={formRef} noValidate aria-label="Model editor">
      <div className="ed-sr" role="status" aria-live="polite">{announcement}</div>
      <div className="ed-row ed-undo" role="toolbar" aria-label="Undo and redo">
        <button type="button" className="ed-btn ed-btn-quiet" onClick={() => step('undo')} disabled={history.past.length === 0} aria-keyshortcuts="Control+Z" title="Undo (Ctrl+Z)">Undo</button>
        <button type="button" className="ed-btn ed-btn-quiet" onClick={() => step('redo')} disabled={history.future.length === 0} aria-keyshortcuts="Control+Shift+Z" title="Redo (Ctrl+Shift+Z)">Redo</button>
      </div>
      <ErrorSummary issues={issues} checking={checking} pending={!conversion.ok || serverIssues.length > 0} context={state} />

      <section className="ed-section" aria-labelledby="ed-basics-h">
        <h2 id="ed-basics-h">Model</h2>
        <TextField
          label="Name"
          path="name"
          value={state.name}
          onChange={(v) => setState((s) => ({ ...s, name: v }))}
          issues={issues}
          required
          after={nameTaken ? (
            <p className="ed-notice" data-testid="name-taken" role="status">
              {modelId
                ? <>The workspace already has a model named “{nameTaken.existing}”. Choose another name: two models of one name could not be told apart.</>
                : <>The workspace already has a model named “{nameTaken.existing}”. Rename this one, or it will be saved as “{nameTaken.savedAs}”.</>}
            </p>
          ) : null}
        />
        <TextField label="Description" path="description" value={state.description} onChange={(v) => setState((s) => ({ ...s, description: v }))} issues={issues} multiline hint="What the model represents and where its numbers come from." />
      </section>

      <section className="ed-section" aria-labelledby="ed-element-h">
        <h2 id="ed-element-h">Element</h2>
        <div className="ed-two">
          <div>
            <TextField label="State variable" path="element.variable" value={state.variable} onChange={(v) => setState((s) => ({ ...s, variable: v }))} issues={issues} mono hint="One name, used in the rate expression." />
            <TextField
              label="Rate expression"
              path="element.rate"
              value={state.rate}
              onChange={(v) => setState((s) => ({ ...s, rate: v }))}
              issues={issues}
              mono
              placeholder={ratePlaceholder(state.variable)}
              hint="Arithmetic, ^ for powers, and exp, log, sqrt, sin, cos, tan, tanh, abs…"
              after={
                <>
                  <MarkedExpression id="ed-rate-marked" expression={state.rate} messages={rateIssues.map((i) => i.message)} />
                  {offers(rateUnknowns, 'rate-unknowns')}
                </>
              }
            />
          </div>
          <TexPreview expression={state.rate} variable={state.variable} label="Typeset rate equation" />
        </div>
      </section>

      <ParametersTable state={state} setState={setState} issues={issues} />
      <NetworkEditor state={state} setState={setState} issues={issues} announce={announce} />

      <section className="ed-section" aria-labelledby="ed-coupling-h">
        <h2 id="ed-coupling-h">Coupling</h2>
        <p className="ed-hint">Each link adds <em>coupling parameter × weight × term</em> to the rate of the node it points to. In the term, <code>source</code> is the linked node's state and <code>target</code> the node's own.</p>
        <div className="ed-three">
          <TextField label="Coupling parameter" path="coupling.parameter" value={state.coupling.parameter} onChange={(v) => setState((s) => ({ ...s, coupling: { ...s.coupling, parameter: v } }))} issues={issues} mono />
          <TextField label="Coupling value" path="coupling.value" value={state.coupling.value} onChange={(v) => setState((s) => ({ ...s, coupling: { ...s.coupling, value: v } }))} issues={issues} mono inputMode="decimal" hint="Used when the sweep is over another parameter." />
          <TextField
            label="Coupling term"
            path="coupling.term"
            value={state.coupling.term}
            onChange={(v) => setState((s) => ({ ...s, coupling: { ...s.coupling, term: v } }))}
            issues={issues}
            mono
            placeholder="source - target"
            after={<><MarkedExpression id="ed-term-marked" expression={state.coupling.term} messages={termIssues.map((i) => i.message)} />{offers(termUnknowns, 'term-unknowns')}</>}
          />
        </div>
        <TexPreview expression={state.coupling.term} label="Typeset coupling term" />
      </section>

      <section className="ed-section" aria-labelledby="ed-sweep-h">
        <h2 id="ed-sweep-h">Sweep</h2>
        <div className="ed-three">
          <div className="ed-field">
            <label htmlFor={fieldDomId('sweep.parameter')} className="ed-label">Swept parameter</label>
            <select
              id={fieldDomId('sweep.parameter')}
              className={`ed-input ed-mono${issuesAt(issues, 'sweep.parameter').length ? ' ed-invalid' : ''}`}
              value={state.sweep.parameter}
              onChange={(e) => setState((s) => ({ ...s, sweep: { ...s.sweep, parameter: e.target.value } }))}
              aria-invalid={issuesAt(issues, 'sweep.parameter').length ? true : undefined}
              aria-describedby={issuesAt(issues, 'sweep.parameter').length ? `${fieldDomId('sweep.parameter')}-errors` : undefined}
            >
              {!sweepChoices.includes(state.sweep.parameter) ? <option value={state.sweep.parameter}>{state.sweep.parameter || '(choose)'}</option> : null}
              {sweepChoices.map((p) => <option key={p} value={p}>{p}{p === state.coupling.parameter ? ' (coupling)' : ''}</option>)}
            </select>
            <FieldErrors id={`${fieldDomId('sweep.parameter')}-errors`} issues={issuesAt(issues, 'sweep.parameter')} />
          </div>
          <TextField label="From" path="sweep.from" value={state.sweep.from} onChange={(v) => setState((s) => ({ ...s, sweep: { ...s.sweep, from: v } }))} issues={issues} mono inputMode="decimal" />
          <TextField label="To" path="sweep.to" value={state.sweep.to} onChange={(v) => setState((s) => ({ ...s, sweep: { ...s.sweep, to: v } }))} issues={issues} mono inputMode="decimal" />
        </div>
      </section>

      <section className="ed-section ed-preview" aria-labelledby="ed-preview-h" aria-busy={preview.kind === 'busy'}>
        <h2 id="ed-preview-h">Live preview</h2>
        <p className="ed-hint">Recomputed a moment after you stop typing, for networks of up to {PREVIEW_MAX_NODES} nodes. Indicative only: a saved run gives the full, stored diagram.</p>
        <div aria-live="polite" className="ed-preview-status" data-testid="preview-status">
          {preview.kind === 'busy' ? 'Computing the preview…' : preview.kind === 'idle' ? previewMessage(preview.message, issues.length) : preview.kind === 'error' ? preview.message : `${preview.diagram.branches.length} branches, ${preview.diagram.bifurcations.length} special points${preview.elapsedMs !== undefined ? ` in ${Math.round(preview.elapsedMs)} ms` : ''}${preview.truncated ? ' (cut short to stay fast — the run computes all of it)' : ''}.`}
        </div>
        {preview.kind === 'done' ? (
          <>
            <div data-testid="live-preview">
              <DiagramView
                diagram={preview.diagram}
                height={300}
                title="Preview (not saved)"
                provenance={{ modelName: state.name || 'unsaved model', versionHash: 'unsaved', runId: 'live preview', engineVersion: preview.diagram.engineVersion, date: new Date().toISOString() }}
              />
            </div>
            {preview.diagnostics.filter((d) => d.level !== 'info').length > 0 ? (
              <ul className="ed-diagnostics">
                {preview.diagnostics.filter((d) => d.level !== 'info').slice(0, 6).map((d, k) => <li key={k}>{engineWords(d.message)}</li>)}
              </ul>
            ) : null}
          </>
        ) : null}
      </section>

      <section className="ed-section ed-save" aria-labelledby="ed-save-h">
        <h2 id="ed-save-h">{modelId ? 'Save as a new version' : 'Save the model'}</h2>
        <TextField label="Change note" path="changeNote" value={changeNote} onChange={setChangeNote} issues={issues} hint="What this version changes, for the history." />
        <div className="ed-row">
          <button type="submit" className="ed-btn ed-btn-primary" disabled={saving} data-testid="save-model">
            {saving ? 'Saving…' : modelId ? `Save version ${version + 1}` : 'Create model'}
          </button>
          {dirty ? <span className="ed-hint">Unsaved changes</span> : null}
        </div>
        {saveError ? <div className="ed-error-box" role="alert" data-testid="save-error">{saveError.message}</div> : null}
        {saved ? <p className="ed-ok" role="status">{saved}</p> : null}
      </section>

      {modelId ? (
        <VersionHistory
          modelId={modelId}
          refreshKey={historyKey}
          onLoad={(doc, n) => {
            setStateRaw((s) => documentToState(doc as NetworkDocument, s.description));
            setDirty(true);
            setChangeNote(`Restored from version ${n}`);
            announce(`Version ${n} loaded into the editor. Save to make it the newest version.`);
          }}
        />
      ) : null}
    </form>
  );
}

/** The idle preview text: "fix the marked fields" only when some field is marked. */
function previewMessage(message: string, shownIssues: number): string {
  if (message !== NOT_READY) return message;
  return shownIssues > 0 ? 'Fix the fields marked above to see a preview.' : 'The preview appears once the model is complete: a rate, its parameters and at least one node.';
}

/** The rate placeholder in the modeler's current variable (the form starts with x). */
function ratePlaceholder(variable: string): string {
  const v = /^[A-Za-z_][A-Za-z0-9_]*$/.test(variable.trim()) ? variable.trim() : 'x';
  return `a - b * ${v} + ${v}^8 / (1 + ${v}^8)`;
}

/** Summary entries keep the nodes' ids for labels like "b on node upper". */
function labelContext(state: EditorState): LabelContext {
  return { nodes: state.nodes, links: state.links };
}

function ErrorSummary({ issues, checking, pending, context }: { issues: readonly FieldIssue[]; checking: boolean; pending: boolean; context: EditorState }) {
  return (
    <div className="ed-summary" aria-live="polite" data-testid="issue-summary">
      {issues.length === 0 ? (
        <p className="ed-hint">{checking ? 'Checking the model…' : pending ? 'Fill in the model; each part is checked as you go.' : 'No problems found.'}</p>
      ) : (
        <div className="ed-error-box">
          <p>{issues.length} problem{issues.length === 1 ? '' : 's'} to fix:</p>
          <ul>
            {issues.slice(0, 12).map((i, k) => (
              <li key={k}>
                <a href={`#${fieldDomId(i.path)}`}>{fieldLabel(i.path, labelContext(context))}</a>: {plainMessage(i.message, i.path)}
              </li>
            ))}
          </ul>
        </div>
      )}
    </div>
  );
}

/** The top-level part of the document a field path belongs to ("nodes[1].parameters.a" → "nodes"). */
function sectionOf(path: string): string {
  const head = path.split(/[.[]/)[0];
  return head === 'changeNote' || head === '(document)' ? '*' : head;
}

/** Parts of the document whose form fields differ from how the form started. */
function touchedSections(a: EditorState, b: EditorState): Set<string> {
  const out = new Set<string>(['*']);
  const same = (x: unknown, y: unknown) => JSON.stringify(x) === JSON.stringify(y);
  if (a.name !== b.name) out.add('name');
  if (a.description !== b.description) out.add('description');
  if (a.variable !== b.variable || a.rate !== b.rate || !same(a.parameters, b.parameters)) out.add('element');
  if (!same(a.nodes, b.nodes)) out.add('nodes');
  if (!same(a.links, b.links)) out.add('links');
  if (!same(a.coupling, b.coupling)) out.add('coupling');
  if (!same(a.sweep, b.sweep)) out.add('sweep');
  return out;
}

/** A new model starts empty: the modeler types the element, nodes and links from scratch. */
function starterState(): EditorState {
  return emptyEditorState();
}
