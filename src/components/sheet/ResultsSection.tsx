import { memo } from 'react';
import type { ContactWander, PlainSheetResult } from '../../lib/kinematics';
import { describeCommanded } from '../../lib/sheet/commanded';
import { DEFAULT_DISPLAY_UNITS, type DisplayUnits } from '../../lib/sheet/display-units';
import { displayNumber, displayUnit, displayValue, findOutput, formatShownNumber, labelWithFrame, STEER_FEEDFORWARD_REASONS, type OutputDefinition } from '../../lib/sheet/outputs';
import { CurvatureTable } from './CurvatureTable';
import { SafetyCaution } from './SafetyCaution';
import { resultLabel, resultRow, resultUnit, resultValue } from './sheet-styles';

/** A row re-renders only when its text changes: most rows of the results keep their values across an edit. */
const Row = memo(function Row({ label, value, unit, test }: { label: string; value: string; unit: string; test?: string }) {
  return (
    <tr className={resultRow}>
      <th scope="row" className={resultLabel}>{label}</th>
      <td className={resultValue} data-result={test}>{value}</td>
      <td className={resultUnit}>{unit}</td>
    </tr>
  );
});

/** A catalogue output of finger `finger` (or of the grasp) as one row, in its display unit; `test` marks the cell for browser tests. */
function OutputRow({ id, result, finger = -1, test = false, units }: { id: string; result: PlainSheetResult; finger?: number; test?: boolean; units: DisplayUnits }) {
  const definition = findOutput(id);
  const testId = definition.scope === 'grasp' ? id : `${finger}.${id}`;
  return (
    <Row
      label={labelWithFrame(definition, true)}
      value={displayValue(definition, definition.read(result, finger), units)}
      unit={displayUnit(definition, units)}
      test={test ? testId : undefined}
    />
  );
}

/** Why the feed-forward falls back to the material points, by the contact's wander status ('defined' only without a curvature). */
const MATERIAL_POINTS_REASON: Record<ContactWander['status'], string> = {
  singular: 'a line contact, the contact point is not determined along it',
  undefined: 'a sharp edge, no curvature there',
  'not-touching': 'the roller does not touch the object',
  defined: 'no contact curvature',
};

const JOINT_COLUMNS = ['jointAngles', 'commanded.rates', 'full.rates', 'steer.rates', 'steer.rateDifference', 'acceleration.jointAccelerations', 'acceleration.steer.jointAccelerations'].map(findOutput);

/** The k-th joint's value of a per-joint output, in its display unit. */
function jointCell(definition: OutputDefinition, result: PlainSheetResult, finger: number, joint: number, units: DisplayUnits): string {
  const values = definition.read(result, finger);
  return typeof values === 'object' ? displayNumber(definition, values[joint], units) : '';
}

const [conditionBefore, conditionAfter, singularValues, conditionNumber, manipulability] = [
  'steer.conditionBefore', 'steer.conditionAfter', 'full.singularValues', 'full.conditionNumber', 'full.manipulability',
].map(findOutput);
const [fullRank, rankTolerance, driveSingularValues, driveRank, graspSingularValues] = [
  'full.rank', 'full.rankTolerance', 'steer.driveSingularValues', 'driveRank', 'grasp.singularValues',
].map(findOutput);

/** One joint's row of the joint table: its name and the cells' text; re-renders only when a text changes. */
const JointValues = memo(
  function JointValues({ name, finger, joint, cells }: { name: string; finger: number; joint: number; cells: readonly string[] }) {
    return (
      <tr className={resultRow}>
        <td className="py-0.5">{name}</td>
        {JOINT_COLUMNS.map((column, c) => (
          <td key={column.id} className="num text-right" data-result={column.id === 'full.rates' || column.id === 'commanded.rates' ? `${finger}.${column.id}.${joint}` : undefined}>
            {cells[c]}
          </td>
        ))}
      </tr>
    );
  },
  (a, b) => a.name === b.name && a.finger === b.finger && a.joint === b.joint && a.cells.every((cell, c) => cell === b.cells[c]),
);

/** One table per finger (its contact and its rates) and one for the grasp, labels, units and readers from the output catalogue; the full solution beside steer-and-roll. */
function ResultsSection({ result, stale, units = DEFAULT_DISPLAY_UNITS }: { result: PlainSheetResult | null; stale: boolean; units?: DisplayUnits }) {
  if (!result) return <p className="text-sm text-graphite">No results until the sheet reads without errors.</p>;
  // The tables follow the result alone: marking them stale while an edit computes re-renders only this wrapper.
  return (
    <div className={`space-y-5 transition-opacity ${stale ? 'opacity-60' : ''}`} aria-busy={stale}>
      <ResultTables result={result} units={units} />
    </div>
  );
}

const ResultTables = memo(function ResultTables({ result, units }: { result: PlainSheetResult; units: DisplayUnits }) {
  return (
    <>
      {result.commanded && (
        <p className="border-l-4 border-ink pl-3 text-sm" data-testid="commanded-solution" data-solution={result.commanded.solution}>
          Commanded to the controller: <strong>{describeCommanded(result.commanded.solution, result.commanded.fingers)}</strong>; a steered pivot
          turns to its target angle within one time step of <span className="num">{formatShownNumber(result.commanded.timeStep * 1000)} ms</span>.
          Every vector is in the palm frame; the object twist is the object origin&apos;s velocity and the angular velocity.
        </p>
      )}
      {result.fingers.map((f, i) => {
        const c = f.contact;
        const commanded = result.commanded?.fingers[i];
        return (
          <div key={i} className="border border-rule bg-paper p-3" data-contact={i}>
            <h3 className="mb-2 text-sm font-semibold">
              Finger {i + 1}: {f.name} <span className="ml-2 text-xs font-normal text-graphite">contact {c.state}</span>
            </h3>
            <div className="grid gap-x-6 md:grid-cols-2">
              <table className="w-full text-sm">
                <tbody>
                  <OutputRow id="contact.objectPoint" result={result} finger={i} units={units} test />
                  <OutputRow id="contact.normal" result={result} finger={i} units={units} />
                  <OutputRow id="contact.gap" result={result} finger={i} units={units} test />
                  <OutputRow id="contact.normalSpeed" result={result} finger={i} units={units} />
                  <OutputRow id="contact.tangentialVelocity" result={result} finger={i} units={units} />
                  <OutputRow id="contact.tangentialSpeed" result={result} finger={i} units={units} />
                </tbody>
              </table>
              <table className="w-full text-sm">
                <tbody>
                  <OutputRow id="commanded.solution" result={result} finger={i} units={units} test />
                  {commanded?.pivot && (
                    <>
                      <OutputRow id="commanded.pivot.targetAngle" result={result} finger={i} units={units} test />
                      <OutputRow id="commanded.pivot.change" result={result} finger={i} units={units} test />
                      <OutputRow id="commanded.pivot.rate" result={result} finger={i} units={units} test />
                    </>
                  )}
                  <OutputRow id="steer.baseRates" result={result} finger={i} units={units} test />
                  <OutputRow id="steer.pivotAngle" result={result} finger={i} units={units} test />
                  <OutputRow id="steer.rollRate" result={result} finger={i} units={units} test />
                  <OutputRow id="steer.rateDifferenceNorm" result={result} finger={i} units={units} />
                  <Row
                    label="condition before / after steering"
                    value={`${displayValue(conditionBefore, conditionBefore.read(result, i))} / ${displayValue(conditionAfter, conditionAfter.read(result, i))}`}
                    unit={conditionAfter.display.unit}
                  />
                  <OutputRow id="full.residual" result={result} finger={i} units={units} />
                </tbody>
              </table>
            </div>
            {/* Seven number columns in the pad's width: each keeps a gap to its neighbour and the table scrolls rather than run numbers together. */}
            <div className="mt-3 overflow-x-auto">
              <table className="w-full text-sm [&_td+td]:pl-3 [&_th+th]:pl-3">
                <caption className="text-left text-[11px] uppercase tracking-wide text-graphite">joint rates, {units.angularSpeed}, and angles, {units.angle}: commanded ({commanded?.solution ?? 'not computed'}), then the full solution beside steer-and-roll; joint accelerations of the full solution beside steer-and-roll (pivot: its rate below)</caption>
                <thead>
                  <tr className="border-b border-ink text-left text-xs text-graphite">
                    <th className="py-1 font-normal">joint</th>
                    {JOINT_COLUMNS.map((column) => (
                      <th key={column.id} className="py-1 text-right font-normal">{column.tableLabel}</th>
                    ))}
                  </tr>
                </thead>
                <tbody>
                  {f.jointNames.map((name, k) => (
                    <JointValues key={name} name={name} finger={i} joint={k} cells={JOINT_COLUMNS.map((column) => jointCell(column, result, i, k, units))} />
                  ))}
                </tbody>
              </table>
            </div>
            {f.acceleration && (
              <table className="mt-3 w-full text-sm" data-acceleration={i}>
                <caption className="text-left text-[11px] uppercase tracking-wide text-graphite">
                  acceleration feed-forward (full solution, {f.acceleration.model === 'rolling-contact' ? 'rolling contact' : `material points, rolling term left out: ${MATERIAL_POINTS_REASON[f.curvature?.wander.status ?? 'defined']}`}; then steer-and-roll)
                </caption>
                <tbody>
                  <OutputRow id="acceleration.model" result={result} finger={i} units={units} test />
                  <OutputRow id="acceleration.objectPoint" result={result} finger={i} units={units} test />
                  <OutputRow id="acceleration.centripetal" result={result} finger={i} units={units} />
                  <OutputRow id="acceleration.jacobianRate" result={result} finger={i} units={units} />
                  <OutputRow id="acceleration.rollingTerm" result={result} finger={i} units={units} />
                  <OutputRow id="acceleration.residual" result={result} finger={i} units={units} />
                  <OutputRow id="acceleration.steer.status" result={result} finger={i} units={units} test />
                  {f.acceleration.steer.status === 'defined' ? (
                    <>
                      <OutputRow id="acceleration.steer.pivotRate" result={result} finger={i} units={units} test />
                      <OutputRow id="acceleration.steer.baseAccelerations" result={result} finger={i} units={units} test />
                      <OutputRow id="acceleration.steer.rollAcceleration" result={result} finger={i} units={units} test />
                    </>
                  ) : (
                    <tr className={resultRow}>
                      <td colSpan={3} className={resultUnit} data-result={`${i}.acceleration.steer.reason`}>
                        steer-and-roll feed-forward not defined: {STEER_FEEDFORWARD_REASONS[f.acceleration.steer.status]}
                      </td>
                    </tr>
                  )}
                </tbody>
              </table>
            )}
            <p className="mt-1 text-xs text-graphite" data-conditioning={i}>
              full solution: σ = <span className="num">{f.full.singularValues.map((s) => displayNumber(singularValues, s)).join(', ')}</span> {singularValues.display.unit}, rank{' '}
              <span className="num" data-result={`${i}.full.rank`}>{displayValue(fullRank, fullRank.read(result, i))}</span> {fullRank.display.unit} (σ counted above{' '}
              <span className="num">{displayValue(rankTolerance, rankTolerance.read(result, i))}</span> {rankTolerance.display.unit}),{' '}
              {f.full.rank < 3 ? (
                // Fewer independent joint directions than contact directions: a finger built so reads as such, not as an infinite condition number.
                <span data-result={`${i}.full.rankDeficient`}>
                  rank-deficient{f.jointNames.length < 3 || f.steer.available ? ' by design' : ''} ({f.jointNames.length} joints{f.steer.available ? ', the pivot steers rather than drives' : ''}), so no condition number or manipulability
                </span>
              ) : (
                <>
                  condition <span className="num">{displayValue(conditionNumber, conditionNumber.read(result, i))}</span>, manipulability{' '}
                  <span className="num">{displayValue(manipulability, manipulability.read(result, i))}</span>
                </>
              )}
              ; the rank-loss warning judges σmin/σmax of the {f.rankBasis === 'steered' ? 'drive columns after steering' : 'full contact Jacobian'}:{' '}
              <span className="num" data-result={`${i}.rankRatio`}>{formatShownNumber(f.rankRatio, 3)}</span>
            </p>
            {f.steer.available && (
              <p className="text-xs text-graphite">
                drive columns after steering: σ = <span className="num">{displayValue(driveSingularValues, driveSingularValues.read(result, i))}</span>{' '}
                {driveSingularValues.display.unit}, rank <span className="num" data-result={`${i}.driveRank`}>{displayValue(driveRank, driveRank.read(result, i))}</span>{' '}
                {driveRank.display.unit}
              </p>
            )}
            <CurvatureTable result={result} finger={i} units={units} />
          </div>
        );
      })}
      <div className="border border-rule bg-paper p-3" data-grasp>
        <h3 className="mb-2 text-sm font-semibold">Grasp</h3>
        <table className="text-sm">
          <tbody>
            <OutputRow units={units} id="grasp.contacts" result={result} />
            <OutputRow units={units} id="grasp.rank" result={result} test />
            <OutputRow units={units} id="grasp.undrivable" result={result} />
            <OutputRow units={units} id="grasp.forceClosure" result={result} test />
            <OutputRow units={units} id="grasp.sumQuality" result={result} test />
            <OutputRow units={units} id="grasp.maxQuality" result={result} />
            <OutputRow units={units} id="grasp.weakest" result={result} />
          </tbody>
        </table>
        <p className="mt-1 text-xs text-graphite">
          σ = <span className="num">{displayValue(graspSingularValues, graspSingularValues.read(result, -1))}</span> (1 for translations, m for rotations)
        </p>
        {result.grasp.undrivableCount > 0 && (
          <ul className="mt-2 text-xs text-graphite">
            {Array.from({ length: result.grasp.undrivableCount }, (_, k) => (
              <li key={k} className="num">
                v = ({result.grasp.undrivable.slice(6 * k, 6 * k + 3).map((x) => formatShownNumber(x, 3)).join(', ')}), ω = (
                {result.grasp.undrivable.slice(6 * k + 3, 6 * k + 6).map((x) => formatShownNumber(x, 3)).join(', ')})
              </li>
            ))}
          </ul>
        )}
      </div>
      <SafetyCaution />
    </>
  );
});

export default memo(ResultsSection);
