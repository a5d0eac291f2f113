import { getAt, pathText, setAt, type DocumentPath } from '../../lib/sheet/document-path';
import type { QuantityKind } from '../../lib/sheet/units';
import { useSheetEditing } from './editor-context';
import { OrientationFields } from './ObjectSection';
import { ComponentHeads, HIDDEN_LABELS, PlainNumber, Quantity, QuantityVector, Toggle } from './fields';
import QuantityField from './QuantityField';

const ACCELERATION: DocumentPath = ['object', 'acceleration'];

/**
 * One part of the object's optional acceleration: blank components are stored as 0, and a part
 * left all blank or zero is removed (and the acceleration once both parts are gone), so a sheet
 * without an acceleration stays as it was written.
 */
function AccelerationVector({ part, label, kind }: { part: 'linear' | 'angular'; label: string; kind: Exclude<QuantityKind, 'any'> }) {
  const { document, update, issues, variables, readOnly } = useSheetEditing();
  const path = [...ACCELERATION, part];
  const vector = getAt(document, path);
  const components: unknown[] = Array.isArray(vector) ? vector : [];
  const change = (index: number, value: number | string | undefined) => {
    const next = [0, 1, 2].map((k) => (k === index ? value : components[k]));
    // A zero vector means the same as none, so clearing or zeroing every component removes the part.
    const blank = next.every((x) => x === undefined || x === 0);
    const rest = setAt(getAt(document, ACCELERATION) ?? {}, [part], blank ? undefined : next.map((x) => x ?? 0));
    update(ACCELERATION, Object.keys(rest as object).length === 0 ? undefined : rest);
  };
  const whole = issues.get(pathText(path));
  return (
    <fieldset className="min-w-0">
      <legend className="text-[11px] font-semibold text-ink">{label}</legend>
      <ComponentHeads parts={['x', 'y', 'z']} />
      <div className={`grid grid-cols-3 gap-2 ${HIDDEN_LABELS}`}>
        {(['x', 'y', 'z'] as const).map((axis, index) => (
          <QuantityField
            key={axis}
            label={`${label} ${axis}`}
            kind={kind}
            path={pathText([...path, index])}
            value={components[index]}
            variables={variables}
            issue={issues.get(pathText([...path, index]))}
            disabled={readOnly}
            optional={{ placeholder: '0' }}
            onChange={(value) => change(index, value)}
          />
        ))}
      </div>
      {whole && <span className="block text-[11px] text-sienna" role="alert">{whole}</span>}
    </fieldset>
  );
}

/** Motion: the object's twist and acceleration, the target pose of a run and the run settings. */
export default function MotionSection() {
  const run = ['motion', 'run'];
  return (
    <div className="space-y-4">
      <div className="grid gap-3 md:grid-cols-2">
        <QuantityVector path={['object', 'twist', 'linear']} label="twist: origin velocity" kind="speed" />
        <QuantityVector path={['object', 'twist', 'angular']} label="twist: angular velocity" kind="angularSpeed" />
        <AccelerationVector part="linear" label="acceleration: origin (feed-forward; blank = 0)" kind="acceleration" />
        <AccelerationVector part="angular" label="acceleration: angular (blank = 0)" kind="angularAcceleration" />
      </div>
      <QuantityVector path={['motion', 'target', 'position']} label="target position" kind="length" />
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
    </div>
  );
}
