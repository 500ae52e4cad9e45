/**
 * Form fields of the bench-setup screen. Quantities are typed as text with their unit ("632.8 nm",
 * "0.8 m"); the service parses and checks them (setup.check) and names the field of any problem, which is
 * shown next to that field.
 */
import { useId } from 'react';
import type { JSX, ReactNode } from 'react';

export function TextField(props: {
  label: string;
  value: string;
  onChange: (text: string) => void;
  /** Example or unit hint shown under the label, e.g. 'a length such as "4 mm"'. */
  hint?: string;
  problem?: string | null;
  testId?: string;
  placeholder?: string;
  width?: 'short' | 'normal' | 'wide';
}): JSX.Element {
  const id = useId();
  const errId = `${id}-err`;
  return (
    <div className={`field${props.problem ? ' field-bad' : ''}`}>
      <label htmlFor={id}>{props.label}</label>
      <input
        id={id}
        type="text"
        className={`input-${props.width ?? 'normal'}`}
        value={props.value}
        placeholder={props.placeholder}
        spellCheck={false}
        autoComplete="off"
        onChange={(e) => props.onChange(e.target.value)}
        aria-invalid={props.problem ? true : undefined}
        aria-describedby={props.problem ? errId : undefined}
        data-testid={props.testId}
      />
      {props.hint ? <span className="field-hint">{props.hint}</span> : null}
      {props.problem ? (
        <span className="field-problem" id={errId} role="alert">
          {props.problem}
        </span>
      ) : null}
    </div>
  );
}

export function SelectField(props: {
  label: string;
  value: string;
  options: { value: string; label: string }[];
  onChange: (value: string) => void;
  problem?: string | null;
  testId?: string;
  hint?: string;
}): JSX.Element {
  const id = useId();
  return (
    <div className={`field${props.problem ? ' field-bad' : ''}`}>
      <label htmlFor={id}>{props.label}</label>
      <select id={id} value={props.value} onChange={(e) => props.onChange(e.target.value)} data-testid={props.testId}>
        {props.options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      {props.hint ? <span className="field-hint">{props.hint}</span> : null}
      {props.problem ? <span className="field-problem" role="alert">{props.problem}</span> : null}
    </div>
  );
}

export function NumberField(props: {
  label: string;
  value: number;
  onChange: (v: number) => void;
  step?: number;
  min?: number;
  max?: number;
  testId?: string;
  unit?: string;
}): JSX.Element {
  const id = useId();
  return (
    <div className="field field-inline">
      <label htmlFor={id}>{props.label}</label>
      <input
        id={id}
        type="number"
        className="input-short"
        value={Number.isFinite(props.value) ? String(Math.round(props.value * 100) / 100) : ''}
        step={props.step ?? 1}
        min={props.min}
        max={props.max}
        onChange={(e) => {
          const v = Number(e.target.value);
          if (e.target.value.trim() !== '' && Number.isFinite(v)) props.onChange(v);
        }}
        data-testid={props.testId}
      />
      {props.unit ? <span className="field-unit">{props.unit}</span> : null}
    </div>
  );
}

export function FieldGroup(props: { title: string; children: ReactNode; note?: string }): JSX.Element {
  return (
    <fieldset className="field-group">
      <legend>{props.title}</legend>
      {props.note ? <p className="muted small-text">{props.note}</p> : null}
      <div className="field-grid">{props.children}</div>
    </fieldset>
  );
}
