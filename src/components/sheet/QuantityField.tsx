import { useEffect, useId, useMemo, useState } from 'react';
import { fromSI, parseQuantity, QUANTITY_KINDS, type QuantityKind, type VariableScope } from '../../lib/sheet/units';
import { fieldInput } from './sheet-styles';

type Kind = Exclude<QuantityKind, 'any'>;

/** Units offered for showing a value, first = default. */
export const DISPLAY_UNITS: Record<Kind, string[]> = {
  length: ['mm', 'm', 'in'],
  angle: ['deg', 'rad'],
  time: ['ms', 's'],
  speed: ['mm/s', 'm/s'],
  angularSpeed: ['rad/s', 'rpm', 'deg/s'],
  acceleration: ['m/s^2', 'mm/s^2'],
  angularAcceleration: ['rad/s^2', 'deg/s^2'],
  rate: ['Hz', '1/s'],
};

const PLAIN_NUMBER = /^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*$/;

/** The stored value for a typed text: a plain number (SI) stays a number, anything else is kept as written. */
export function storedValue(text: string): number | string {
  return PLAIN_NUMBER.test(text) ? Number(text) : text;
}

const shown = (value: number) => {
  const rounded = Number(value.toPrecision(6));
  return String(Object.is(rounded, -0) ? 0 : rounded);
};

export interface QuantityFieldProps {
  label: string;
  value: unknown;
  kind: Kind;
  /** Called with undefined when an optional field is emptied (the default then applies). */
  onChange: (value: number | string | undefined) => void;
  /** Blank is allowed and means the default shown as placeholder. */
  optional?: { placeholder: string };
  variables: VariableScope;
  /** Issue the sheet reader found at this field (shown when the field itself reads fine). */
  issue?: string;
  disabled?: boolean;
  /** Path of the field in the document, for tests and for locating issues. */
  path: string;
}

/**
 * A quantity input: takes a number in SI, a value with a unit or an expression over the sheet's
 * variables; shows the SI value and the value in the unit the person picked, and flags a wrong
 * dimension as it is typed.
 */
export default function QuantityField({ label, value, kind, onChange, variables, issue, disabled, path, optional }: QuantityFieldProps) {
  const id = useId();
  const written = value === undefined || value === null ? '' : String(value);
  const [text, setText] = useState(written);
  const [unit, setUnit] = useState(DISPLAY_UNITS[kind][0]);
  useEffect(() => {
    // Follow the document when it changes from outside (template applied, conflict re-applied).
    setText((current) => (String(storedValue(current)) === written ? current : written));
  }, [written]);

  const read = useMemo(() => (text.trim() === '' ? null : parseQuantity(storedValue(text), kind, variables)), [text, kind, variables]);
  const blank = text.trim() === '';
  const message = blank ? (optional ? issue : 'required') : read && !read.ok ? read.message : issue;
  const si = QUANTITY_KINDS[kind].si === 's^-1' ? '1/s' : QUANTITY_KINDS[kind].si;

  return (
    <div className="min-w-0" data-quantity={path}>
      <label htmlFor={id} className="block text-[11px] uppercase tracking-wide text-graphite truncate">
        {label}
      </label>
      <input
        id={id}
        className={fieldInput}
        value={text}
        disabled={disabled}
        spellCheck={false}
        placeholder={optional?.placeholder}
        aria-invalid={message ? true : undefined}
        aria-describedby={message ? `${id}-error` : `${id}-value`}
        onChange={(event) => {
          setText(event.target.value);
          onChange(optional && event.target.value.trim() === '' ? undefined : storedValue(event.target.value));
        }}
      />
      {message ? (
        <span id={`${id}-error`} role="alert" className="mt-0.5 block text-[11px] leading-tight text-sienna">
          {message}
        </span>
      ) : read?.ok ? (
        <span id={`${id}-value`} className="mt-0.5 flex items-baseline gap-1 text-[11px] text-graphite">
          <span className="num" data-si>
            {shown(read.value)} {si}
          </span>
          <span aria-hidden>·</span>
          <span className="num" data-shown>
            {shown(fromSI(read.value, kind, unit))}
          </span>
          <select
            aria-label={`unit to show ${label} in`}
            className="bg-transparent text-[11px] text-graphite focus:outline-none"
            value={unit}
            onChange={(event) => setUnit(event.target.value)}
          >
            {DISPLAY_UNITS[kind].map((u) => (
              <option key={u}>{u}</option>
            ))}
          </select>
        </span>
      ) : null}
    </div>
  );
}
