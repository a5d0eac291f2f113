import { getAt } from '../../lib/sheet/document-path';
import { DEFAULT_SOLVER } from '../../lib/sheet/sheet-constants';
import { useDocumentSelect, useSheetFields } from './editor-context';
import { PlainNumber, Quantity, Toggle } from './fields';
import { button } from './sheet-styles';

const SOLVER = ['solver'];
const NOISE = ['motion', 'run', 'noise'];

/**
 * The thresholds the warnings are judged against and the run's measurement noise, on the sheet
 * rather than only in the file: blank solver fields take the default shown, and every value is
 * checked by the sheet reader, its problems shown at the field.
 */
export default function SolverSettingsFields() {
  const { update, readOnly } = useSheetFields();
  const noise = useDocumentSelect((document) => getAt(document, NOISE) !== undefined);
  return (
    <div className="space-y-3">
      <fieldset data-solver-settings>
        <legend className="text-[11px] font-semibold text-ink">solver thresholds (blank = default; the warnings are judged against them)</legend>
        <div className="grid grid-cols-2 gap-3 md:grid-cols-5">
          <Quantity path={[...SOLVER, 'axisDistance']} label="axis distance" kind="length" placeholder={`${DEFAULT_SOLVER.axisDistance} m`} />
          <Quantity path={[...SOLVER, 'minTangentialSpeed']} label="min. tangential speed" kind="speed" placeholder={`${DEFAULT_SOLVER.minTangentialSpeed} m/s`} />
          <Quantity path={[...SOLVER, 'contactTolerance']} label="contact tolerance" kind="length" placeholder={`${DEFAULT_SOLVER.contactTolerance} m`} />
          <PlainNumber path={[...SOLVER, 'singularRatio']} label={`singular ratio (blank = ${DEFAULT_SOLVER.singularRatio})`} />
          <Quantity path={[...SOLVER, 'damping']} label="damping" kind="length" placeholder={`${DEFAULT_SOLVER.damping} m`} />
        </div>
        <div className="mt-2">
          <Toggle path={[...SOLVER, 'softFinger']} label="soft-finger contacts" fallback={DEFAULT_SOLVER.softFinger} />
        </div>
      </fieldset>
      <fieldset data-noise-settings>
        <legend className="text-[11px] font-semibold text-ink">run noise (measurement noise added to the object pose each step)</legend>
        {!noise ? (
          // Empty fields, required until filled: invented noise would change every run without anyone choosing it.
          <button type="button" className={`${button} text-xs`} disabled={readOnly} onClick={() => update(NOISE, {})}>
            Add run noise
          </button>
        ) : (
          <>
            <div className="grid grid-cols-3 gap-3">
              <PlainNumber path={[...NOISE, 'seed']} label="seed" integer />
              <Quantity path={[...NOISE, 'position']} label="position noise" kind="length" />
              <Quantity path={[...NOISE, 'angle']} label="angle noise" kind="angle" />
            </div>
            {!readOnly && (
              <button type="button" className="mt-1 text-[11px] underline text-graphite" onClick={() => update(NOISE, undefined)}>
                remove run noise
              </button>
            )}
          </>
        )}
      </fieldset>
    </div>
  );
}
