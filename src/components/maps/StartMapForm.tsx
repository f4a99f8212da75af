/**
 * "Map over a second parameter": the small form that starts a two-parameter map (a run of kind
 * 'map', docs/maps.md "Maps in the workspace") from a finished diagram run or the model page. It
 * validates with the very schema the API uses (mapSettingsSchema, plain zod), shows each problem
 * beside its field, posts to /api/runs and opens the new run's page. Shown to modelers and owners
 * only; the server refuses reviewers anyway.
 */
import { useMemo, useState } from 'react';
import { mapSettingsSchema } from '../../lib/server/maps/schema';
import '../editor/editor.css';
import './maps.css';

export interface MapParameter { readonly name: string; readonly value: number }

export interface StartMapFormProps {
  readonly modelId: number;
  readonly version: number;
  /** The swept parameter (not offered). */
  readonly swept: string;
  /** The document's other parameters with their values. */
  readonly parameters: readonly MapParameter[];
  /** The run's sweep of the swept parameter, passed on as the map's from/to. */
  readonly sweep?: { from: number; to: number };
}

type Field = 'second' | 'secondFrom' | 'secondTo';

/** A default range around the document's value: half to one and a half times it (0 to 1 around 0). */
export function defaultRange(value: number): [number, number] {
  if (value === 0) return [0, 1];
  const a = value * 0.5, b = value * 1.5;
  return a < b ? [a, b] : [b, a];
}

const num = (s: string) => (s.trim() === '' ? undefined : Number(s));

export default function StartMapForm(props: StartMapFormProps) {
  const [open, setOpen] = useState(false);
  const first = props.parameters[0];
  const [second, setSecond] = useState(first?.name ?? '');
  const [from, setFrom] = useState(first ? String(defaultRange(first.value)[0]) : '');
  const [to, setTo] = useState(first ? String(defaultRange(first.value)[1]) : '');
  const [notify, setNotify] = useState(false);
  const [busy, setBusy] = useState(false);
  const [serverError, setServerError] = useState<{ field: Field | null; message: string } | null>(null);

  const checked = useMemo(() => {
    const raw = { second, secondFrom: num(from), secondTo: num(to), ...(props.sweep ? { from: props.sweep.from, to: props.sweep.to } : {}) };
    const r = mapSettingsSchema.safeParse(raw);
    const errors: Partial<Record<Field, string>> = {};
    if (!r.success) for (const i of r.error.issues) {
      const k = String(i.path[0]) as Field;
      if (!errors[k]) errors[k] = i.message === 'Expected number, received nan' ? 'must be a number' : i.message;
    }
    return { ok: r.success, errors, raw };
  }, [second, from, to, props.sweep]);

  const choose = (name: string) => {
    setSecond(name);
    const p = props.parameters.find((q) => q.name === name);
    if (p) { const [a, b] = defaultRange(p.value); setFrom(String(a)); setTo(String(b)); }
  };

  const submit = async () => {
    setServerError(null);
    if (!checked.ok) return;
    setBusy(true);
    let res: Response;
    try {
      res = await fetch('/api/runs', {
        method: 'POST', credentials: 'same-origin',
        headers: { 'Content-Type': 'application/json', Accept: 'application/json' },
        body: JSON.stringify({ modelId: props.modelId, version: props.version, kind: 'map', notify, settings: checked.raw }),
      });
    } catch {
      setBusy(false);
      setServerError({ field: null, message: 'The server could not be reached; nothing was started.' });
      return;
    }
    const body = (await res.json().catch(() => null)) as { run?: { id: number }; error?: { message?: string; field?: string } } | null;
    if (!res.ok || !body?.run) {
      setBusy(false);
      const field = body?.error?.field?.replace(/^settings\./, '') as Field | undefined;
      const message = body?.error?.message?.replace(/^settings\.\w+: /, '') ?? `The server answered ${res.status}.`;
      setServerError({ field: field && ['second', 'secondFrom', 'secondTo'].includes(field) ? field : null, message: res.status === 403 ? 'Starting a map needs the modeler or owner role.' : message });
      return;
    }
    window.location.assign(`/runs/${body.run.id}`);
  };

  const err = (k: Field) => checked.errors[k] ?? (serverError?.field === k ? serverError.message : undefined);

  if (props.parameters.length === 0) return null;
  if (!open) {
    return (
      <div className="ed-root ed-root-full">
        <button type="button" className="ed-btn" onClick={() => setOpen(true)} data-testid="start-map-open">Map over a second parameter…</button>
      </div>
    );
  }
  return (
    <form className="ed-root ed-root-full" onSubmit={(e) => { e.preventDefault(); void submit(); }} aria-label="Map over a second parameter" noValidate data-testid="start-map-form">
      <div className="ed-section">
        <h3 className="ed-label" style={{ fontSize: '1rem' }}>Map over a second parameter</h3>
        <p className="ed-hint">
          Curves of saddle-nodes, pitchforks and Hopf points in the plane of {props.swept} and a second parameter, with the coupling regimes between them.
          A small network takes seconds to a minute. Model results are indicative; defer to domain experts and local regulation.
        </p>
        <div className="ed-three">
          <div className="ed-field">
            <label className="ed-label" htmlFor="mp-second">Second parameter</label>
            <select id="mp-second" className="ed-input" value={second} onChange={(e) => choose(e.target.value)} data-testid="mp-second">
              {props.parameters.map((p) => <option key={p.name} value={p.name}>{p.name} (now {p.value})</option>)}
            </select>
            {err('second') ? <ul className="ed-field-errors" data-testid="mp-second-error"><li>{err('second')}</li></ul> : null}
          </div>
          {([['secondFrom', 'From', from, setFrom], ['secondTo', 'To', to, setTo]] as const).map(([k, label, v, set]) => (
            <div className="ed-field" key={k}>
              <label className="ed-label" htmlFor={`mp-${k}`}>{label}</label>
              <input id={`mp-${k}`} className="ed-input ed-mono" inputMode="decimal" value={v} onChange={(e) => set(e.target.value)}
                aria-invalid={err(k) ? true : undefined} data-testid={`mp-${k}`} />
              {err(k) ? <ul className="ed-field-errors" data-testid={`mp-${k}-error`}><li>{err(k)}</li></ul> : null}
            </div>
          ))}
        </div>
        <label className="ed-row"><input type="checkbox" checked={notify} onChange={(e) => setNotify(e.target.checked)} /> E-mail me when it is done</label>
        {serverError && !serverError.field ? <p role="alert" className="ed-field-errors">{serverError.message}</p> : null}
        <div className="ed-row">
          <button type="submit" className="ed-btn" disabled={busy || !checked.ok} data-testid="start-map-submit">{busy ? 'Starting…' : 'Start the map'}</button>
          <button type="button" className="ed-btn" onClick={() => setOpen(false)}>Cancel</button>
        </div>
      </div>
    </form>
  );
}
