import { PlainNumber, Quantity } from './fields';

/** Settings of the grasp quality under friction: cone edges, the soft finger's torsional friction and the torque length (each optional, defaults in the placeholders). */
export function GraspQualityFields() {
  const base = ['graspQuality'];
  return (
    <fieldset className="border border-rule p-3">
      <legend className="px-1 text-sm font-semibold">Grasp quality under friction</legend>
      <div className="grid gap-3 md:grid-cols-3">
        <PlainNumber path={[...base, 'coneEdges']} label="cone edges (3 to 32, empty = 8)" integer />
        <Quantity path={[...base, 'torsionalFriction']} label="torsional friction (soft finger)" kind="length" placeholder="0 mm" />
        <Quantity path={[...base, 'torqueLength']} label="torque length" kind="length" placeholder="largest contact distance" />
      </div>
    </fieldset>
  );
}
