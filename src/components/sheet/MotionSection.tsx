import { memo, useId } from 'react';
import { getAt, setAt, type DocumentPath } from '../../lib/sheet/document-path';
import { COMMANDED_SOLUTIONS, DEFAULT_COMMANDED } from '../../lib/sheet/sheet-constants';
import type { QuantityKind } from '../../lib/sheet/quantity-kinds';
import { useCurrentDocument, useDocumentAt, useDocumentSelect, useIssueAt, useQuantityFeedback, useSheetFields } from './editor-context';
import { selectInput } from './sheet-styles';
import { OrientationFields } from './ObjectSection';
import { Choice, ComponentHeads, HIDDEN_LABELS, PlainNumber, Quantity, QuantityVector, Toggle } from './fields';
import MatrixFields from './MatrixFields';
import QuantityField from './QuantityField';
import SolverSettingsFields from './SolverSettingsFields';

const ACCELERATION: DocumentPath = ['object', 'acceleration'];
const OPTIONAL_ZERO = { placeholder: '0' };

/**
 * Three optional quantities [x, y, z] at `path`, each blank one shown as 0; `store` gets the components
 * (blank ones undefined) and writes them back as the field's meaning asks.
 */
function OptionalVector({ path, label, kind, store, test }: {
  path: DocumentPath; label: string; kind: Exclude<QuantityKind, 'any'>; store: (next: unknown[]) => void; test?: string;
}) {
  const vector = useDocumentAt(path);
  const components: unknown[] = Array.isArray(vector) ? vector : [];
  const whole = useIssueAt(path);
  return (
    <fieldset className="min-w-0" data-testid={test}>
      <legend className="text-[11px] font-semibold text-ink">{label}</legend>
      <ComponentHeads parts={['x', 'y', 'z']} />
      <div className={`grid grid-cols-3 gap-2 ${HIDDEN_LABELS}`}>
        {(['x', 'y', 'z'] as const).map((axis, index) => (
          <OptionalComponent
            key={axis}
            path={[...path, index]}
            label={`${label} ${axis}`}
            kind={kind}
            value={components[index]}
            onChange={(value) => store([0, 1, 2].map((k) => (k === index ? value : components[k])))}
          />
        ))}
      </div>
      {whole && <span className="block text-[11px] text-sienna" role="alert">{whole}</span>}
    </fieldset>
  );
}

/** One component of an optional vector, with its own reading and issue. */
function OptionalComponent({ path, label, kind, value, onChange }: {
  path: DocumentPath; label: string; kind: Exclude<QuantityKind, 'any'>; value: unknown; onChange: (value: number | string | undefined) => void;
}) {
  const { units, readOnly } = useSheetFields();
  const { at, reading, issue } = useQuantityFeedback(path);
  return (
    <QuantityField
      label={label}
      kind={kind}
      path={at}
      value={value}
      reading={reading}
      units={units}
      issue={issue}
      disabled={readOnly}
      optional={OPTIONAL_ZERO}
      onChange={onChange}
    />
  );
}

/**
 * One part of the object's optional acceleration: blank components are stored as 0, and a part
 * left all blank or zero is removed (and the acceleration once both parts are gone), so a sheet
 * without an acceleration stays as it was written.
 */
function AccelerationVector({ part, label, kind }: { part: 'linear' | 'angular'; label: string; kind: Exclude<QuantityKind, 'any'> }) {
  const { update } = useSheetFields();
  const current = useCurrentDocument();
  const store = (next: unknown[]) => {
    // A zero vector means the same as none, so clearing or zeroing every component removes the part.
    const blank = next.every((x) => x === undefined || x === 0);
    const rest = setAt(getAt(current(), ACCELERATION) ?? {}, [part], blank ? undefined : next.map((x) => x ?? 0));
    update(ACCELERATION, Object.keys(rest as object).length === 0 ? undefined : rest);
  };
  return <OptionalVector path={[...ACCELERATION, part]} label={label} kind={kind} store={store} />;
}

const TWIST: DocumentPath = ['object', 'twist'];

/** The point the entered twist is about: blank components are 0, and all blank removes it (the object origin). */
function TwistPoint({ frame }: { frame: string }) {
  const { update } = useSheetFields();
  const path = [...TWIST, 'about'];
  return (
    <OptionalVector
      path={path}
      label={`twist about the point (${frame} frame${frame === 'object' ? ', from the object centre' : ''}; blank = object origin)`}
      kind="length"
      test="twist-about"
      store={(next) => update(path, next.every((x) => x === undefined) ? undefined : next.map((x) => x ?? 0))}
    />
  );
}

const ORIGIN = 'the object origin';
const POINT = 'a point';
const contactOption = (finger: string) => `the contact of ${finger}`;

/** The named fingers' names, in order, as JSON text. */
function fingerNamesText(document: Record<string, unknown>): string {
  const fingers = getAt(document, ['hand', 'fingers']);
  const names = (Array.isArray(fingers) ? fingers : []).map((f: unknown) => (f !== null && typeof f === 'object' ? (f as { name?: unknown }).name : undefined));
  return JSON.stringify(names.filter((n): n is string => typeof n === 'string' && n !== ''));
}

/** What the entered twist is about: the object origin, a point typed in, or a finger's contact, which the sheet finds before converting. */
function TwistReference() {
  const { update, readOnly } = useSheetFields();
  const id = useId();
  const path = [...TWIST, 'about'];
  const about = useDocumentAt(path);
  const contactIssue = useIssueAt([...path, 'contact']);
  const wholeIssue = useIssueAt(path);
  const issue = contactIssue ?? (Array.isArray(about) ? undefined : wholeIssue);
  // The names as one text: the choice then re-renders when a finger is renamed, added or removed, not on every edit of a finger.
  const names = JSON.parse(useDocumentSelect(fingerNamesText)) as string[];
  const contact = about !== null && typeof about === 'object' && !Array.isArray(about) ? (about as { contact?: unknown }).contact : undefined;
  const current = about === undefined ? ORIGIN : typeof contact === 'string' ? contactOption(contact) : POINT;
  const options = [ORIGIN, POINT, ...names.map(contactOption)];
  if (!options.includes(current)) options.push(current);
  const choose = (value: string) => {
    if (value === ORIGIN) update(path, undefined);
    else if (value === POINT) update(path, [0, 0, 0]);
    else update(path, { contact: names.find((n) => contactOption(n) === value) ?? contact });
  };
  return (
    <div>
      <label htmlFor={id} className="block text-[11px] uppercase tracking-wide text-graphite">twist written about</label>
      <select id={id} className={selectInput} disabled={readOnly} data-testid="twist-reference" value={current} onChange={(event) => choose(event.target.value)}>
        {options.map((option) => <option key={option}>{option}</option>)}
      </select>
      {issue && <span className="block text-[11px] text-sienna" role="alert">{issue}</span>}
    </div>
  );
}

/** Motion: the object's twist and acceleration, the target pose of a run and the run settings. */
function MotionSection() {
  const run = ['motion', 'run'];
  const frame = useDocumentAt([...TWIST, 'frame']) === 'object' ? 'object' : 'palm';
  const written = useDocumentAt([...TWIST, 'about']);
  const about = written !== undefined;
  const point = Array.isArray(written);
  return (
    <div className="space-y-4">
      <div className="grid gap-3 md:grid-cols-2">
        <Choice path={['commanded']} label="commanded joint rates" options={COMMANDED_SOLUTIONS} fallback={DEFAULT_COMMANDED} test="commanded-choice" />
        <Choice path={[...TWIST, 'frame']} label="twist written in the frame" options={['palm', 'object']} fallback="palm" test="twist-frame" />
        <QuantityVector path={[...TWIST, 'linear']} label={`twist: ${point ? 'velocity of the point below' : about ? 'velocity of the contact point' : 'origin velocity'} (${frame} frame)`} kind="speed" />
        <QuantityVector path={[...TWIST, 'angular']} label={`twist: angular velocity (${frame} frame)`} kind="angularSpeed" />
        <TwistReference />
        {point && <TwistPoint frame={frame} />}
        <AccelerationVector part="linear" label="acceleration: origin (palm frame, feed-forward; blank = 0)" kind="acceleration" />
        <AccelerationVector part="angular" label="acceleration: angular (palm frame; blank = 0)" kind="angularAcceleration" />
      </div>
      <QuantityVector path={['motion', 'target', 'position']} label="target position (palm frame)" kind="length" />
      <OrientationFields path={['motion', 'target', 'orientation']} />
      <fieldset>
        <legend className="text-[11px] font-semibold text-ink">run settings (blank = default)</legend>
        <div className="grid grid-cols-2 gap-3 md:grid-cols-5">
          <Quantity path={[...run, 'gain']} label="gain" kind="rate" placeholder="2 /s" />
          <Quantity path={[...run, 'dt']} label="time step" kind="time" placeholder="5 ms" />
          <PlainNumber path={[...run, 'maxTicks']} label="most time steps" integer />
          <Quantity path={[...run, 'positionTolerance']} label="position tolerance" kind="length" placeholder="0.1 mm" />
          <Quantity path={[...run, 'angleTolerance']} label="angle tolerance" kind="angle" placeholder="0.001 rad" />
        </div>
        <div className="mt-2">
          <Toggle path={[...run, 'stopOnSingular']} label="stop on a singular warning" fallback />
        </div>
      </fieldset>
      <SolverSettingsFields />
      <section aria-label="Test matrix inputs" className="border-t-2 border-rule pt-3" id="matrix">
        <h3 className="mb-2 text-[11px] font-semibold uppercase tracking-wide text-ink">test matrix</h3>
        <MatrixFields />
      </section>
    </div>
  );
}

export default memo(MotionSection);
