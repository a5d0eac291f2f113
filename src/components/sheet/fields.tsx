import { memo, useId } from 'react';
import { pathText, type DocumentPath } from '../../lib/sheet/document-path';
import type { QuantityKind } from '../../lib/sheet/quantity-kinds';
import { useDocumentAt, useIssueAt, useQuantityFeedback, useSheetFields } from './editor-context';
import type { PlausibleLengthKind } from '../../lib/sheet/plausibility';
import QuantityField, { storedValue } from './QuantityField';
import { fieldInput, selectInput, smallLabel } from './sheet-styles';

type Kind = Exclude<QuantityKind, 'any'>;

// The fields say autoComplete="off" (QuantityField too): they hold engineering quantities, never personal data, and
// without it Chromium's autofill looks over the page's fields after each chunk the parser adds, forcing a style and
// layout of the whole page each time while the sheet loads.

/**
 * Same props, paths compared by their text (callers build path arrays afresh on each render): a field
 * then re-renders only when its own value in the document, its issue or reading (each subscribed to by
 * path), or the units change.
 */
export function samePropsByPath<P extends object>(a: P, b: P): boolean {
  const keys = Object.keys(a) as (keyof P)[];
  if (keys.length !== Object.keys(b).length) return false;
  return keys.every((key) =>
    key === 'path' ? pathText(a[key] as DocumentPath) === pathText(b[key] as DocumentPath) : Object.is(a[key], b[key]),
  );
}

/** A quantity of the document at path. */
export const Quantity = memo(function Quantity({ path, label, kind, placeholder, plausible }: { path: DocumentPath; label: string; kind: Kind; placeholder?: string; plausible?: PlausibleLengthKind }) {
  const { update, units, readOnly } = useSheetFields();
  const value = useDocumentAt(path);
  const { at, reading, issue } = useQuantityFeedback(path);
  return (
    <QuantityField
      label={label}
      kind={kind}
      path={at}
      value={value}
      reading={reading}
      units={units}
      plausible={plausible}
      issue={issue}
      disabled={readOnly}
      optional={placeholder === undefined ? undefined : { placeholder }}
      onChange={(next) => update(path, next)}
    />
  );
}, samePropsByPath);

/**
 * The x, y, z (or w, x, y, z) heads over a vector's inputs. Each input is labelled in full
 * ("roller centre at home x") for assistive technology, with the label hidden: the vector's legend
 * and these heads already say it on screen.
 */
export function ComponentHeads({ parts }: { parts: readonly string[] }) {
  return (
    <div className={`grid ${parts.length === 4 ? 'grid-cols-4' : 'grid-cols-3'} gap-2 text-[11px] uppercase tracking-wide text-graphite`} aria-hidden>
      {parts.map((part) => (
        <span key={part}>{part}</span>
      ))}
    </div>
  );
}

/** Hides the full labels of a vector's inputs on screen (see ComponentHeads). */
export const HIDDEN_LABELS = '[&_label]:sr-only';

/** Three quantities [x, y, z] at path. */
export const QuantityVector = memo(function QuantityVector({ path, label, kind, plausible }: { path: DocumentPath; label: string; kind: Kind; plausible?: PlausibleLengthKind }) {
  const whole = useIssueAt(path);
  return (
    <fieldset className="min-w-0">
      <legend className="text-[11px] font-semibold text-ink">{label}</legend>
      <ComponentHeads parts={['x', 'y', 'z']} />
      <div className={`grid grid-cols-3 gap-2 ${HIDDEN_LABELS}`}>
        {(['x', 'y', 'z'] as const).map((axis, index) => (
          <Quantity key={axis} path={[...path, index]} label={`${label} ${axis}`} kind={kind} plausible={plausible} />
        ))}
      </div>
      {whole && <span className="block text-[11px] text-sienna" role="alert">{whole}</span>}
    </fieldset>
  );
}, samePropsByPath);

/** A unitless number at path (axis and quaternion components, ratios, counts). */
export const PlainNumber = memo(function PlainNumber({ path, label, integer }: { path: DocumentPath; label: string; integer?: boolean }) {
  const { update, readOnly } = useSheetFields();
  const id = useId();
  const value = useDocumentAt(path);
  const issue = useIssueAt(path);
  return (
    <div className="min-w-0">
      <label htmlFor={id} className={smallLabel}>{label}</label>
      <input
        id={id}
        className={fieldInput}
        inputMode={integer ? 'numeric' : 'decimal'}
        autoComplete="off"
        disabled={readOnly}
        value={value === undefined ? '' : String(value)}
        aria-invalid={issue ? true : undefined}
        onChange={(event) => update(path, event.target.value.trim() === '' ? undefined : storedValue(event.target.value))}
      />
      {issue && <span className="block text-[11px] leading-tight text-sienna" role="alert">{issue}</span>}
    </div>
  );
}, samePropsByPath);

/** A direction [x, y, z] of plain numbers at path. */
export const DirectionVector = memo(function DirectionVector({ path, label }: { path: DocumentPath; label: string }) {
  const whole = useIssueAt(path);
  return (
    <fieldset className="min-w-0">
      <legend className="text-[11px] font-semibold text-ink">{label}</legend>
      <ComponentHeads parts={['x', 'y', 'z']} />
      <div className={`grid grid-cols-3 gap-2 ${HIDDEN_LABELS}`}>
        {(['x', 'y', 'z'] as const).map((axis, index) => (
          <PlainNumber key={axis} path={[...path, index]} label={`${label} ${axis}`} />
        ))}
      </div>
      {whole && <span className="block text-[11px] text-sienna" role="alert">{whole}</span>}
    </fieldset>
  );
}, samePropsByPath);

/** A text field at path. */
export const TextField = memo(function TextField({ path, label }: { path: DocumentPath; label: string }) {
  const { update, readOnly } = useSheetFields();
  const id = useId();
  const issue = useIssueAt(path);
  const value = useDocumentAt(path);
  return (
    <div className="min-w-0">
      <label htmlFor={id} className={smallLabel}>{label}</label>
      <input
        id={id}
        className={`${fieldInput} font-sans`}
        autoComplete="off"
        disabled={readOnly}
        value={String(value ?? '')}
        aria-invalid={issue ? true : undefined}
        onChange={(event) => update(path, event.target.value)}
      />
      {issue && <span className="block text-[11px] text-sienna" role="alert">{issue}</span>}
    </div>
  );
}, samePropsByPath);

/**
 * A choice among fixed values at path. With `fallback`, an absent field shows the default it reads as, and choosing
 * that default leaves it absent, so a sheet that never chose stays as it was written.
 */
export const Choice = memo(function Choice({ path, label, options, onChoose, fallback, test }: {
  path: DocumentPath; label: string; options: readonly string[]; onChoose?: (value: string) => void; fallback?: string; test?: string;
}) {
  const { update, readOnly } = useSheetFields();
  const id = useId();
  const current = useDocumentAt(path);
  const store = (value: string) => update(path, value === fallback && current === undefined ? undefined : value);
  return (
    <div>
      <label htmlFor={id} className={smallLabel}>{label}</label>
      <select
        id={id}
        className={selectInput}
        autoComplete="off"
        disabled={readOnly}
        data-testid={test}
        value={String(current ?? fallback ?? '')}
        onChange={(event) => (onChoose ? onChoose(event.target.value) : store(event.target.value))}
      >
        {options.map((option) => (
          <option key={option}>{option}</option>
        ))}
      </select>
    </div>
  );
}, samePropsByPath);

/** A yes/no switch at path. */
export const Toggle = memo(function Toggle({ path, label, fallback }: { path: DocumentPath; label: string; fallback: boolean }) {
  const { update, readOnly } = useSheetFields();
  const value = useDocumentAt(path);
  return (
    <label className="flex items-center gap-2 text-sm">
      <input type="checkbox" disabled={readOnly} checked={typeof value === 'boolean' ? value : fallback} onChange={(event) => update(path, event.target.checked)} />
      {label}
    </label>
  );
}, samePropsByPath);
