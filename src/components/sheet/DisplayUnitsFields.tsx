import { memo, useId } from 'react';
import { DISPLAY_UNIT_CHOICES, type DisplayUnits } from '../../lib/sheet/display-units';
import { useIssueAt, useSheetFields } from './editor-context';
import { selectInput, smallLabel } from './sheet-styles';

const PARTS = Object.keys(DISPLAY_UNIT_CHOICES) as (keyof DisplayUnits)[];

function UnitChoice({ part }: { part: keyof DisplayUnits }) {
  const { units, update, readOnly } = useSheetFields();
  const id = useId();
  const choice = DISPLAY_UNIT_CHOICES[part];
  const issue = useIssueAt(['display', part]);
  return (
    <div>
      <label htmlFor={id} className={smallLabel}>{choice.label}</label>
      <select id={id} className={selectInput} disabled={readOnly} value={units[part]} data-display-unit={part} onChange={(event) => update(['display', part], event.target.value)}>
        {choice.units.map((unit) => (
          <option key={unit}>{unit}</option>
        ))}
      </select>
      {issue && <span className="block text-[11px] text-sienna" role="alert">{issue}</span>}
    </div>
  );
}

/**
 * The sheet's one choice of display units: results, derivation, comparison and report follow it; inputs and exports stay SI.
 * Without props, it re-renders only through the units it reads, not with every edit of the sheet.
 */
const DisplayUnitsFields = memo(function DisplayUnitsFields() {
  return (
    <fieldset className="min-w-0" data-display-units>
      <legend className="text-[11px] font-semibold text-ink">show numbers in (inputs and exports stay SI)</legend>
      <div className="flex flex-wrap gap-3">
        {PARTS.map((part) => (
          <UnitChoice key={part} part={part} />
        ))}
      </div>
    </fieldset>
  );
});

export default DisplayUnitsFields;
