/**
 * "Study escapes": the form that starts an escape study (a run of kind 'escapes', docs/noise.md
 * "Escape studies as runs") from a model page or a finished diagram run. It validates with the very
 * schema the API uses (escapeSettingsSchema, plain zod) and shows each problem beside its field,
 * estimates the cost in words as the settings change (lib/plot/escape-estimate.ts, the service's
 * own count), posts to /api/runs and opens the new run's page, where the progress bar follows it.
 */
import { useMemo, useState } from 'react';
import { escapeSettingsSchema } from '../../lib/server/escapes/schema';
import { studyCost } from '../../lib/plot/escape-estimate';
import '../editor/editor.css';
import './escapes.css';

export interface StudyEscapesFormProps {
  readonly modelId: number;
  /** Versions to choose from, newest first; one entry on a run page (the run's version). */
  readonly versions: readonly number[];
  readonly parameter: string;
  readonly sweep?: { from: number; to: number };
  /** The document's noise.amplitude, the default level. */
  readonly defaultNoise?: number;
  /** State dimension, for the estimate. */
  readonly dimension: number;
  /** Cores of the worker's machine (the server's), the most threads that help. */
  readonly cores: number;
  /** Trace settings of the diagram the study should stand on (a trace run's settings). */
  readonly atlas?: Record<string, number>;
  /** Where the form sits: says which diagram it uses. */
  readonly context: 'model' | 'run';
  readonly runId?: number;
}

type Field = 'noise' | 'start' | 'values' | 'from' | 'to' | 'count' | 'paths' | 'dt' | 'tMax' | 'seed' | 'threads';

/** Text of a number field to a number; '' → undefined; anything else not a number → an error. */
function num(text: string): { value?: number; error?: string } {
  const t = text.trim();
  if (t === '') return {};
  const v = Number(t);
  return Number.isFinite(v) ? { value: v } : { error: `“${t}” is not a number` };
}

export default function StudyEscapesForm(props: StudyEscapesFormProps) {
  const [open, setOpen] = useState(false);
  const [version, setVersion] = useState(props.versions[0]);
  const [noise, setNoise] = useState(props.defaultNoise !== undefined ? String(props.defaultNoise) : '');
  const [start, setStart] = useState<'all-base' | 'all-tipped'>('all-base');
  const [mode, setMode] = useState<'grid' | 'list'>('grid');
  const [list, setList] = useState('');
  const [from, setFrom] = useState(props.sweep ? String(props.sweep.from) : '');
  const [to, setTo] = useState(props.sweep ? String(props.sweep.to) : '');
  const [count, setCount] = useState('5');
  const [paths, setPaths] = useState('1000');
  const [dt, setDt] = useState('');
  const [tMax, setTMax] = useState('');
  const [seed, setSeed] = useState('1');
  const [threads, setThreads] = useState(String(Math.min(2, props.cores)));
  const [notify, setNotify] = useState(false);
  const [touched, setTouched] = useState(false);
  /** Fields edited so far: their problems show as they are typed, the others' after "Start". */
  const [edited, setEdited] = useState<ReadonlySet<Field>>(new Set());
  const edit = (key: Field) => setEdited((old) => (old.has(key) ? old : new Set([...old, key])));
  const [busy, setBusy] = useState(false);
  const [serverError, setServerError] = useState<{ field: Field | null; message: string } | null>(null);

  /** The request's settings and the problems per field (client-side, the API's schema). */
  const checked = useMemo(() => {
    const errors: Partial<Record<Field, string>> = {};
    let general: string | null = null;
    const raw: Record<string, unknown> = { start };
    const put = (key: Field, text: string) => { const r = num(text); if (r.error) errors[key] = r.error; else if (r.value !== undefined) raw[key] = r.value; };
    put('noise', noise);
    if (props.defaultNoise === undefined && noise.trim() === '' && !errors.noise) errors.noise = 'required: the model states no noise level';
    if (mode === 'list') {
      const parts = list.split(/[\s,;]+/).filter(Boolean);
      const bad = parts.find((p) => !Number.isFinite(Number(p)));
      if (bad !== undefined) errors.values = `“${bad}” is not a number`;
      else if (parts.length) raw.values = parts.map(Number);
    } else { put('from', from); put('to', to); put('count', count); }
    put('paths', paths); put('dt', dt); put('tMax', tMax); put('seed', seed); put('threads', threads);
    if (props.atlas && Object.keys(props.atlas).length) raw.atlas = props.atlas;
    const parsed = escapeSettingsSchema.safeParse(raw);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        const key = String(issue.path[0] ?? '') as Field;
        if (!FIELDS.includes(key)) { general = `${issue.path.join('.') || 'settings'}: ${issue.message}`; continue; }
        if (!errors[key]) errors[key] = issue.message;
      }
    }
    if (props.sweep && !errors.values && !errors.from && !errors.to) {
      const lo = Math.min(props.sweep.from, props.sweep.to), hi = Math.max(props.sweep.from, props.sweep.to);
      const outside = (k: Field, v: unknown) => { if (typeof v === 'number' && (v < lo || v > hi)) errors[k] = `lies outside the diagram's sweep, ${lo} to ${hi}`; };
      if (Array.isArray(raw.values)) { const o = (raw.values as number[]).find((v) => v < lo || v > hi); if (o !== undefined) errors.values = `${o} lies outside the diagram's sweep, ${lo} to ${hi}`; }
      else { outside('from', raw.from); outside('to', raw.to); }
    }
    const valueCount = Array.isArray(raw.values) ? raw.values.length : typeof raw.count === 'number' ? raw.count : 0;
    return { raw, errors, general, valueCount, ok: Object.keys(errors).length === 0 && parsed.success };
  }, [noise, start, mode, list, from, to, count, paths, dt, tMax, seed, threads, props.atlas, props.sweep]);

  const cost = useMemo(() => {
    const r = checked.raw as { paths?: number; dt?: number; tMax?: number; threads?: number };
    return studyCost({ paths: r.paths ?? 1000, n: props.dimension, valueCount: Math.max(1, checked.valueCount), dt: r.dt, tMax: r.tMax, threads: r.threads ?? 1, cores: props.cores });
  }, [checked, props.dimension, props.cores]);

  const submit = async () => {
    setTouched(true);
    setServerError(null);
    if (!checked.ok) return;
    setBusy(true);
    let res: Response;
    try {
      res = await fetch('/api/runs', {
        method: 'POST', credentials: 'same-origin',
        headers: { 'Content-Type': 'application/json', Accept: 'application/json' },
        body: JSON.stringify({ modelId: props.modelId, version, kind: 'escapes', notify, settings: checked.raw }),
      });
    } catch {
      setBusy(false);
      setServerError({ field: null, message: 'The server could not be reached; nothing was started.' });
      return;
    }
    const body = (await res.json().catch(() => null)) as { run?: { id: number }; error?: { message?: string; field?: string } } | null;
    if (!res.ok || !body?.run) {
      setBusy(false);
      const field = body?.error?.field?.replace(/^settings\./, '').split('.')[0] as Field | undefined;
      const message = body?.error?.message?.replace(/^settings\.\w+: /, '') ?? `The server answered ${res.status}.`;
      setServerError({ field: field && FIELDS.includes(field) ? field : null, message: res.status === 403 ? 'Starting a study needs the modeler or owner role.' : message });
      return;
    }
    window.location.assign(`/runs/${body.run.id}`);
  };

  const err = (key: Field) => (touched || edited.has(key) ? checked.errors[key] : undefined) ?? (serverError?.field === key ? serverError.message : undefined);
  const field = (key: Field, label: string, value: string, set: (v: string) => void, hint?: string) => {
    const e = err(key);
    return (
      <div className="ed-field">
        <label className="ed-label" htmlFor={`es-${key}`}>{label}</label>
        <input id={`es-${key}`} className="ed-input ed-mono" inputMode="decimal" value={value} onChange={(ev) => { set(ev.target.value); edit(key); }}
          aria-invalid={e ? 'true' : undefined} aria-describedby={e ? `es-${key}-error` : hint ? `es-${key}-hint` : undefined} data-testid={`es-${key}`} />
        {hint && !e ? <p className="ed-hint" id={`es-${key}-hint`}>{hint}</p> : null}
        {e ? <ul className="ed-field-errors" id={`es-${key}-error`} data-testid={`es-${key}-error`}><li>{e}</li></ul> : null}
      </div>
    );
  };

  if (!open) {
    return (
      <div className="ed-root ed-root-full es-form">
        <button type="button" className="ed-btn" onClick={() => setOpen(true)} data-testid="study-escapes-open">Study escapes…</button>
      </div>
    );
  }
  return (
    <form className="ed-root ed-root-full es-form" onSubmit={(e) => { e.preventDefault(); void submit(); }} aria-label="Study escapes" noValidate data-testid="study-escapes-form">
      <div className="ed-section">
        <h2>Study escapes</h2>
        <p className="ed-hint">
          Monte Carlo escapes with noise on every element, at each parameter value, beside the weak-noise prediction
          {props.context === 'run' ? ` — on the diagram of run ${props.runId} (same version and sweep).` : '; the diagram of the version is traced first when none is stored.'}
          {' '}Model results are indicative; defer to domain experts and local regulation.
        </p>
        <div className="ed-three">
          {props.versions.length > 1 ? (
            <div className="ed-field">
              <label className="ed-label" htmlFor="es-version">Version</label>
              <select id="es-version" className="ed-input" value={version} onChange={(e) => setVersion(Number(e.target.value))}>
                {props.versions.map((v) => <option key={v} value={v}>v{v}{v === props.versions[0] ? ' (latest)' : ''}</option>)}
              </select>
            </div>
          ) : null}
          {field('noise', 'Noise level σ', noise, setNoise, props.defaultNoise !== undefined ? `the model's is ${props.defaultNoise}` : 'the model has none: give one')}
          <div className="ed-field">
            <label className="ed-label" htmlFor="es-start">Start state</label>
            <select id="es-start" className="ed-input" value={start} onChange={(e) => setStart(e.target.value as typeof start)} data-testid="es-start">
              <option value="all-base">every element at its base state</option>
              <option value="all-tipped">every element tipped</option>
            </select>
          </div>
        </div>
        <fieldset className="ed-field" style={{ border: 0, padding: 0, margin: 0 }}>
          <legend className="ed-label">Values of {props.parameter}</legend>
          <div className="ed-row">
            <label className="ed-row"><input type="radio" name="es-mode" checked={mode === 'grid'} onChange={() => setMode('grid')} data-testid="es-mode-grid" /> evenly spaced</label>
            <label className="ed-row"><input type="radio" name="es-mode" checked={mode === 'list'} onChange={() => setMode('list')} data-testid="es-mode-list" /> a list</label>
          </div>
        </fieldset>
        {mode === 'grid' ? (
          <div className="ed-three">
            {field('from', 'From', from, setFrom)}
            {field('to', 'To', to, setTo)}
            {field('count', 'Number of values', count, setCount, 'at most 200')}
          </div>
        ) : (
          <div className="ed-field">
            <label className="ed-label" htmlFor="es-values">Values (commas or spaces)</label>
            <input id="es-values" className="ed-input ed-mono" value={list} onChange={(e) => { setList(e.target.value); edit('values'); }} placeholder="0.05, 0.1, 0.2"
              aria-invalid={err('values') ? 'true' : undefined} aria-describedby={err('values') ? 'es-values-error' : undefined} data-testid="es-values" />
            {err('values') ? <ul className="ed-field-errors" id="es-values-error" data-testid="es-values-error"><li>{err('values')}</li></ul> : null}
          </div>
        )}
        <div className="ed-three">
          {field('paths', 'Paths per value', paths, setPaths, 'Monte Carlo paths at each value')}
          {field('dt', 'Step dt (optional)', dt, setDt, 'default: 0.05 / fastest rate at the start state')}
          {field('tMax', 'Time cap (optional)', tMax, setTMax, 'default: from a pilot of the first 32 paths (5 × their longest time to the last escape, at least 10 × the predicted one)')}
          {field('seed', 'Seed', seed, setSeed, 'the same seed at every value')}
          {field('threads', 'Threads', threads, setThreads, `the numbers do not depend on it; this server has ${props.cores} core${props.cores === 1 ? '' : 's'}`)}
        </div>
        <p className="es-estimate" role="status" aria-live="polite" data-testid="es-estimate" data-over={String(cost.overBudget)}>
          <strong>Estimate:</strong> {cost.words}
        </p>
        <div className="ed-row">
          <input id="es-notify" type="checkbox" className="ed-check" checked={notify} onChange={(e) => setNotify(e.target.checked)} />
          <label htmlFor="es-notify">E-mail me when it finishes or fails</label>
        </div>
        <div className="ed-row">
          <button type="submit" className="ed-btn ed-btn-primary" disabled={busy} data-testid="study-escapes-start">{busy ? 'Starting…' : 'Start the study'}</button>
          <button type="button" className="ed-btn" onClick={() => setOpen(false)}>Close</button>
        </div>
        {touched && !checked.ok ? <div className="ed-error-box" role="alert">Not started: {checked.general ?? 'fix the fields marked above.'}</div> : null}
        {serverError && !serverError.field ? <div className="ed-error-box" role="alert" data-testid="es-server-error">Not started: {serverError.message}</div> : null}
      </div>
    </form>
  );
}

const FIELDS: readonly Field[] = ['noise', 'start', 'values', 'from', 'to', 'count', 'paths', 'dt', 'tMax', 'seed', 'threads'];
