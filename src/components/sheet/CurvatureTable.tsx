import type { PlainSheetResult } from '../../lib/kinematics';
import { DEFAULT_DISPLAY_UNITS, type DisplayUnits } from '../../lib/sheet/display-units';
import { displayNumber, displayUnit, displayValue, findOutput, type OutputDefinition } from '../../lib/sheet/outputs';

const SURFACES = [
  { name: 'object', region: findOutput('curvature.object.region'), values: findOutput('curvature.object'), direction: findOutput('curvature.object.direction') },
  { name: 'roller', region: findOutput('curvature.roller.region'), values: findOutput('curvature.roller'), direction: findOutput('curvature.roller.direction') },
] as const;

const [relative, relativeDirection, rollerSpeed, objectSpeed, rollerVelocity, objectVelocity] = [
  'curvature.relative', 'curvature.relative.direction', 'curvature.wander.rollerSpeed', 'curvature.wander.objectSpeed',
  'curvature.wander.rollerVelocity', 'curvature.wander.objectVelocity',
].map(findOutput);

/** Why the contact point's motion is not given, in the reader's words. */
const NO_MOTION: Record<string, string> = {
  'not-touching': 'The roller does not touch the object, so there is no rolling contact to follow.',
  singular: 'The two surfaces conform along a line (line contact): the contact point is not determined along it.',
  undefined: 'A surface has a sharp edge or rim at the contact: it has no curvature there, and the contact point stays on the edge.',
  'not computed': 'Not computed for this result.',
};

function shown(definition: OutputDefinition, result: PlainSheetResult, finger: number, units: DisplayUnits = DEFAULT_DISPLAY_UNITS): string {
  return displayValue(definition, definition.read(result, finger), units);
}

/** One contact's surface curvatures (object, roller, relative) and how fast the contact point moves over roller and object. */
export function CurvatureTable({ result, finger, units = DEFAULT_DISPLAY_UNITS }: { result: PlainSheetResult; finger: number; units?: DisplayUnits }) {
  const status = String(findOutput('curvature.wander.status').read(result, finger));
  const speed = (definition: OutputDefinition) => displayNumber(definition, Number(definition.read(result, finger)), units);
  return (
    <div className="mt-3" data-curvature={finger}>
      <table className="w-full text-sm">
        <caption className="text-left text-[11px] uppercase tracking-wide text-graphite">surface curvature at the contact, 1/m (κ1 ≥ κ2; directions in the palm frame)</caption>
        <thead>
          <tr className="border-b border-ink text-left text-xs text-graphite">
            <th className="py-1 font-normal">surface</th>
            <th className="py-1 font-normal">where</th>
            <th className="py-1 text-right font-normal">κ1, κ2</th>
            <th className="py-1 text-right font-normal">κ1 direction</th>
          </tr>
        </thead>
        <tbody>
          {SURFACES.map((surface) => (
            <tr key={surface.name} className="border-b border-rule/60">
              <th scope="row" className="py-0.5 pr-3 text-left font-normal text-graphite">{surface.name}</th>
              <td className="py-0.5">{shown(surface.region, result, finger)}</td>
              <td className="num text-right" data-result={`${finger}.${surface.values.id}`}>{shown(surface.values, result, finger)}</td>
              <td className="num text-right">{shown(surface.direction, result, finger)}</td>
            </tr>
          ))}
          <tr className="border-b border-rule/60">
            <th scope="row" className="py-0.5 pr-3 text-left font-normal text-graphite">relative</th>
            <td className="py-0.5">{result.fingers[finger].curvature?.relative.status ?? 'not computed'}</td>
            <td className="num text-right" data-result={`${finger}.${relative.id}`}>{shown(relative, result, finger)}</td>
            <td className="num text-right">{shown(relativeDirection, result, finger)}</td>
          </tr>
        </tbody>
      </table>
      <p className="mt-1 text-xs text-graphite" data-result={`${finger}.curvature.wander`}>
        {status === 'defined' ? (
          <>
            The contact point moves over the roller at <span className="num">{speed(rollerSpeed)}</span> {displayUnit(rollerSpeed, units)}, velocity{' '}
            <span className="num">{shown(rollerVelocity, result, finger, units)}</span>, and over the object at <span className="num">{speed(objectSpeed)}</span>{' '}
            {displayUnit(objectSpeed, units)}, velocity <span className="num">{shown(objectVelocity, result, finger, units)}</span>, with the full solution&apos;s joint rates.
          </>
        ) : (
          (NO_MOTION[status] ?? status)
        )}
      </p>
    </div>
  );
}
