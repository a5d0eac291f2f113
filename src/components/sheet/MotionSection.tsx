import { OrientationFields } from './ObjectSection';
import { PlainNumber, Quantity, QuantityVector, Toggle } from './fields';

/** Motion: the object's twist, the target pose of a run and the run settings. */
export default function MotionSection() {
  const run = ['motion', 'run'];
  return (
    <div className="space-y-4">
      <div className="grid gap-3 md:grid-cols-2">
        <QuantityVector path={['object', 'twist', 'linear']} label="twist: origin velocity" kind="speed" />
        <QuantityVector path={['object', 'twist', 'angular']} label="twist: angular velocity" kind="angularSpeed" />
      </div>
      <QuantityVector path={['motion', 'target', 'position']} label="target position" kind="length" />
      <OrientationFields path={['motion', 'target', 'orientation']} />
      <fieldset>
        <legend className="text-[11px] font-semibold text-ink">run settings (blank = default)</legend>
        <div className="grid grid-cols-2 gap-3 md:grid-cols-5">
          <Quantity path={[...run, 'gain']} label="gain" kind="rate" placeholder="2 /s" />
          <Quantity path={[...run, 'dt']} label="tick" kind="time" placeholder="5 ms" />
          <PlainNumber path={[...run, 'maxTicks']} label="max ticks" integer />
          <Quantity path={[...run, 'positionTolerance']} label="position tol." kind="length" placeholder="0.1 mm" />
          <Quantity path={[...run, 'angleTolerance']} label="angle tol." kind="angle" placeholder="0.001 rad" />
        </div>
        <div className="mt-2">
          <Toggle path={[...run, 'stopOnSingular']} label="stop on a singular warning" fallback />
        </div>
      </fieldset>
    </div>
  );
}
