import { useId, type ReactNode } from 'react';
import { plainMessage, type FieldIssue } from '../../lib/editor';

/** Issues whose path is exactly `path`. */
export function issuesAt(issues: readonly FieldIssue[], path: string): FieldIssue[] {
  return issues.filter((i) => i.path === path);
}

/** DOM id of the field showing `path`, for the error summary's links. */
export function fieldDomId(path: string): string {
  return `field-${path.replace(/[^A-Za-z0-9_-]+/g, '-')}`;
}

export function FieldErrors({ id, issues }: { id: string; issues: readonly FieldIssue[] }) {
  if (issues.length === 0) return null;
  return (
    <ul id={id} className="ed-field-errors">
      {issues.map((i, k) => (
        <li key={k}>{plainMessage(i.message, i.path)}</li>
      ))}
    </ul>
  );
}

interface TextFieldProps {
  label: string;
  path: string;
  value: string;
  onChange: (v: string) => void;
  issues: readonly FieldIssue[];
  hint?: ReactNode;
  mono?: boolean;
  multiline?: boolean;
  placeholder?: string;
  readOnly?: boolean;
  inputMode?: 'decimal' | 'text';
  after?: ReactNode;
  required?: boolean;
}

/** A labelled input whose errors sit right under it and are tied to it for screen readers. */
export function TextField(props: TextFieldProps) {
  const hintId = useId();
  const id = fieldDomId(props.path);
  const errorId = `${id}-errors`;
  const mine = issuesAt(props.issues, props.path);
  const describedBy = [props.hint ? hintId : '', mine.length ? errorId : ''].filter(Boolean).join(' ') || undefined;
  const common = {
    id,
    value: props.value,
    placeholder: props.placeholder,
    readOnly: props.readOnly,
    required: props.required,
    'aria-invalid': mine.length > 0 ? true : undefined,
    'aria-describedby': describedBy,
    className: `ed-input${props.mono ? ' ed-mono' : ''}${mine.length ? ' ed-invalid' : ''}`,
    spellCheck: props.mono ? false : undefined,
    autoComplete: 'off',
  } as const;
  return (
    <div className="ed-field">
      <label htmlFor={id} className="ed-label">
        {props.label}
      </label>
      {props.multiline ? (
        <textarea {...common} rows={3} onChange={(e) => props.onChange(e.target.value)} />
      ) : (
        <input {...common} type="text" inputMode={props.inputMode} onChange={(e) => props.onChange(e.target.value)} />
      )}
      {props.after}
      {props.hint ? (
        <p id={hintId} className="ed-hint">
          {props.hint}
        </p>
      ) : null}
      <FieldErrors id={errorId} issues={mine} />
    </div>
  );
}

/** A compact numeric cell for tables: the label is for screen readers, the error is under the cell. */
export function CellInput(props: {
  label: string;
  path: string;
  value: string;
  placeholder?: string;
  onChange: (v: string) => void;
  onBlur?: () => void;
  issues: readonly FieldIssue[];
  mono?: boolean;
}) {
  const id = fieldDomId(props.path);
  const mine = issuesAt(props.issues, props.path);
  const errorId = `${id}-errors`;
  return (
    <>
      <input
        id={id}
        type="text"
        inputMode="decimal"
        aria-label={props.label}
        value={props.value}
        placeholder={props.placeholder}
        onChange={(e) => props.onChange(e.target.value)}
        onBlur={props.onBlur}
        aria-invalid={mine.length > 0 ? true : undefined}
        aria-describedby={mine.length ? errorId : undefined}
        className={`ed-input ed-cell${props.mono === false ? '' : ' ed-mono'}${mine.length ? ' ed-invalid' : ''}`}
        autoComplete="off"
        spellCheck={false}
      />
      <FieldErrors id={errorId} issues={mine} />
    </>
  );
}
