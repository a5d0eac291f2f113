import { memo, useCallback, useEffect, useId, useLayoutEffect, useRef, useState } from 'react';
import { DEFAULT_DISPLAY_UNITS, shownUnit, toShown, type DisplayUnits } from '../../lib/sheet/display-units';
import { lengthNote, type PlausibleLengthKind } from '../../lib/sheet/plausibility';
import { QUANTITY_KINDS, type QuantityKind } from '../../lib/sheet/quantity-kinds';
import type { FieldReading } from '../../lib/sheet/readings';
import { fieldInput, fieldReading, readingBare, smallLabel } from './sheet-styles';

type Kind = Exclude<QuantityKind, 'any'>;

const PLAIN_NUMBER = /^\s*[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?\s*$/;

/** The stored value for a typed text: a plain number (SI) stays a number, anything else is kept as written. */
export function storedValue(text: string): number | string {
  return PLAIN_NUMBER.test(text) ? Number(text) : text;
}

const formatted = (value: number) => {
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
  /** How the evaluation read this field's text (over the sheet's variables); shown while it is the text in the field. */
  reading?: FieldReading;
  /** Issue the sheet reader found at this field. */
  issue?: string;
  disabled?: boolean;
  /** Path of the field in the document, for tests and for locating issues. */
  path: string;
  /** The sheet's display units: the reading is shown in them beside SI. */
  units?: DisplayUnits;
  /** For a length: which plausible range its value is judged against (content/docs/units.md); "hand" by default. */
  plausible?: PlausibleLengthKind;
}

/**
 * A quantity input: takes a number in SI, a value with a unit or an expression over the sheet's
 * variables; shows how it reads (prominently for a bare number, which is SI) in SI and in the
 * sheet's display unit, notes an implausible length, and flags a wrong dimension. A bare number
 * reads here; text reads in the evaluation (the worker, or the server for the page as drawn), which
 * answers within the keystroke, so the page carries no expression reader.
 * No picker of its own: the sheet's one display-unit choice keeps a hand's tab stops to its fields.
 */
function QuantityFieldView({ label, value, kind, onChange, reading, issue, disabled, path, optional, units = DEFAULT_DISPLAY_UNITS, plausible = 'hand' }: QuantityFieldProps) {
  const id = useId();
  const written = value === undefined || value === null ? '' : String(value);
  const [text, setText] = useState(written);
  useEffect(() => {
    // Follow the document when it changes from outside (template applied, conflict re-applied).
    setText((current) => (String(storedValue(current)) === written ? current : written));
  }, [written]);

  const blank = text.trim() === '';
  const stored = storedValue(text);
  const bare = typeof stored === 'number';
  const textReading = reading && reading.text === text && reading.kind === kind ? reading.value : null;
  // The SI value the field reads as, or null while it does not read (the issue then says why).
  const read = blank ? null : typeof stored === 'number' ? (Number.isFinite(stored) ? stored : null) : textReading;
  const message = blank ? (optional ? issue : 'required') : issue;
  const si = QUANTITY_KINDS[kind].si === 's^-1' ? '1/s' : QUANTITY_KINDS[kind].si;
  const shown = shownUnit(si, units);
  const note = read !== null && kind === 'length' ? lengthNote(read, plausible, bare, units) : null;

  return (
    <div className="min-w-0" data-quantity={path}>
      <label htmlFor={id} className={`${smallLabel} truncate`}>
        {label}
      </label>
      <input
        id={id}
        className={fieldInput}
        value={text}
        disabled={disabled}
        spellCheck={false}
        // Not personal data, and no autofill scan of the fields while the page is parsed (see fields.tsx).
        autoComplete="off"
        placeholder={optional?.placeholder}
        aria-invalid={message ? true : undefined}
        aria-describedby={[read !== null && `${id}-value`, message && `${id}-error`].filter(Boolean).join(' ') || undefined}
        onChange={(event) => {
          setText(event.target.value);
          onChange(optional && event.target.value.trim() === '' ? undefined : storedValue(event.target.value));
        }}
      />
      {read !== null && (
        // The reading stays beside a limit the sheet reader refuses (85 m for a roller), so the person sees how the value was read.
        <span id={`${id}-value`} className={fieldReading} data-reading={bare ? 'bare' : 'unit'}>
          {bare && <span className={readingBare}>reads as</span>}
          <span className={bare ? `num ${readingBare}` : 'num'} data-si>
            {formatted(read)} {si}
          </span>
          {shown !== si && (
            <span className="num" data-shown>
              = {formatted(toShown(read, si, units))} {shown}
            </span>
          )}
        </span>
      )}
      {message && (
        <span id={`${id}-error`} role="alert" className="mt-0.5 block text-[11px] leading-tight text-sienna break-words">
          {message}
        </span>
      )}
      {note && (
        <span role="note" className="mt-0.5 block border-l-2 border-ochre pl-1 text-[11px] leading-tight text-ink break-words" data-input-note>
          {note}
        </span>
      )}
    </div>
  );
}

/** Same field, same look: every prop but onChange (a fresh closure on each render of the caller), the optional placeholder by value. */
function sameField(a: QuantityFieldProps, b: QuantityFieldProps): boolean {
  return (
    a.label === b.label && a.value === b.value && a.kind === b.kind && a.reading === b.reading && a.issue === b.issue && a.disabled === b.disabled &&
    a.path === b.path && a.units === b.units && a.plausible === b.plausible && a.optional?.placeholder === b.optional?.placeholder
  );
}

const MemoField = memo(QuantityFieldView, sameField);

/**
 * The field re-renders only when what it shows changes, so a keystroke in one field leaves the
 * sheet's other fields alone; a change still goes through the caller's newest onChange (which may
 * close over the other components of a vector).
 */
export default function QuantityField(props: QuantityFieldProps) {
  const latest = useRef(props.onChange);
  useLayoutEffect(() => {
    latest.current = props.onChange;
  });
  const onChange = useCallback((value: number | string | undefined) => latest.current(value), []);
  return <MemoField {...props} onChange={onChange} />;
}
